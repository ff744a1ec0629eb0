import { keepPreviousData, queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { apiErrorSchema } from '../../../shared/api/common';
import { deckDetailSchema, deckListSchema } from '../../../shared/api/decks';
import {
  compareResultSchema,
  FINISHED_RUN_STATES,
  runCreatedSchema,
  runDetailSchema,
  runFileSchema,
  runPageSchema,
  runSchema,
  type RunState,
} from '../../../shared/api/runs';
import { api, ApiRequestError } from '../../lib/api';
import { sessionQueryKey } from '../../lib/session';

const runPath = (runId: string) => `/api/runs/${encodeURIComponent(runId)}`;

/** How often a page asks again about a run that has not finished. */
export const POLL_MS = 2000;

export const isFinished = (state: RunState) => FINISHED_RUN_STATES.includes(state);

export function runQuery(runId: string) {
  return queryOptions({
    queryKey: ['runs', runId],
    queryFn: ({ signal }) => api.get(runPath(runId), { signal, schema: runDetailSchema }),
    refetchInterval: (query) => (query.state.data && !isFinished(query.state.data.state) ? POLL_MS : false),
  });
}

export function blockRunsQuery(blockId: string, page: number, pageSize = 20, state?: RunState[]) {
  return queryOptions({
    queryKey: ['runs', 'list', { blockId, page, pageSize, state: state?.join(',') ?? null }],
    queryFn: ({ signal }) => api.get('/api/runs', { signal, query: { blockId, page, pageSize, state: state?.join(',') }, schema: runPageSchema }),
    placeholderData: keepPreviousData,
    refetchInterval: (query) => (query.state.data?.items.some((r) => !isFinished(r.state)) ? POLL_MS : false),
  });
}

/** The team's newest runs across its blocks, followed while any of them is unfinished. */
export function recentRunsQuery(pageSize: number) {
  return queryOptions({
    queryKey: ['runs', 'list', { blockId: null, page: 1, pageSize, state: null }],
    queryFn: ({ signal }) => api.get('/api/runs', { signal, query: { page: 1, pageSize }, schema: runPageSchema }),
    refetchInterval: (query) => (query.state.data?.items.some((r) => !isFinished(r.state)) ? POLL_MS : false),
  });
}

export function runFileQuery(runId: string, path: string) {
  return queryOptions({
    queryKey: ['runs', runId, 'file', path],
    queryFn: ({ signal }) => api.get(`${runPath(runId)}/file`, { signal, query: { path }, schema: runFileSchema }),
    // A run's files never change.
    staleTime: Infinity,
  });
}

export function compareQuery(runId: string, baseId: string, kind: 'new' | 'fixed' | 'persisting', page: number, pageSize = 50) {
  return queryOptions({
    queryKey: ['runs', runId, 'compare', baseId, kind, page, pageSize],
    queryFn: ({ signal }) => api.get(`${runPath(runId)}/compare/${encodeURIComponent(baseId)}`, { signal, query: { kind, page, pageSize }, schema: compareResultSchema }),
    placeholderData: keepPreviousData,
  });
}

/** The team's decks with their versions, for choosing what a new run checks against. */
export const deckChoicesQuery = queryOptions({
  queryKey: ['decks', 'choices'],
  queryFn: async ({ signal }) => {
    const { items } = await api.get('/api/decks', { signal, schema: deckListSchema });
    return Promise.all(items.map((d) => api.get(`/api/decks/${encodeURIComponent(d.id)}`, { signal, schema: deckDetailSchema })));
  },
});

export function useCancelRun(runId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api.post(`${runPath(runId)}/cancel`, undefined, { schema: runSchema }),
    onSettled: () => queryClient.invalidateQueries({ queryKey: ['runs'] }),
  });
}

export interface SubmitRunInput {
  blockId: string;
  files: File[];
  deckVersionId?: string;
  note: string;
  top?: string;
}

/**
 * POST /api/runs as multipart: the files and the run's options in one request. The shared
 * fetch wrapper speaks JSON only; this is its one multipart sibling, with the same error shape.
 */
async function postRun(input: SubmitRunInput): Promise<z.infer<typeof runCreatedSchema>> {
  const form = new FormData();
  form.set('blockId', input.blockId);
  if (input.deckVersionId) form.set('deckVersionId', input.deckVersionId);
  if (input.note) form.set('note', input.note);
  if (input.top) form.set('top', input.top);
  for (const file of input.files) form.append('files', file, file.name);
  let response: Response;
  try {
    response = await fetch('/api/runs', { method: 'POST', body: form, credentials: 'same-origin', headers: { Accept: 'application/json' } });
  } catch {
    throw new ApiRequestError(0, 'network', 'Keepwell’s server could not be reached. Check your connection and try again.');
  }
  const body: unknown = await response.json().catch(() => null);
  if (!response.ok) {
    const parsed = apiErrorSchema.safeParse(body);
    if (parsed.success) throw new ApiRequestError(response.status, parsed.data.error.code, parsed.data.error.message, parsed.data.error.details ?? []);
    throw new ApiRequestError(response.status, response.status >= 500 ? 'internal' : 'unexpected-response', `The server answered ${response.status}.`);
  }
  return runCreatedSchema.parse(body);
}

export function useSubmitRun() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: postRun,
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ['runs', 'list'] }),
    onError: (error) => {
      // The session ended meanwhile: the guard re-checks it and sends the user to sign in.
      if (error instanceof ApiRequestError && error.status === 401) return queryClient.invalidateQueries({ queryKey: sessionQueryKey });
    },
  });
}
