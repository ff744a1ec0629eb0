import { keepPreviousData, queryOptions } from '@tanstack/react-query';
import { ruleCatalogueSchema, type RuleCatalogueEntry } from '../../../shared/api/decks';
import { findingPageSchema, storedFindingSchema, type StoredFinding } from '../../../shared/api/runs';
import { api } from '../../lib/api';
import { viewQuery, type FindingsView } from './view-state';

const runPath = (runId: string) => `/api/runs/${encodeURIComponent(runId)}`;

export function findingsQuery(runId: string, view: FindingsView) {
  const query = viewQuery(view);
  return queryOptions({
    queryKey: ['runs', runId, 'findings', query],
    queryFn: ({ signal }) => api.get(`${runPath(runId)}/findings`, { signal, query, schema: findingPageSchema }),
    placeholderData: keepPreviousData,
  });
}

/** One finding by id, for a shared link whose finding is not on the page being shown. */
export function findingQuery(runId: string, findingId: number) {
  return queryOptions({
    queryKey: ['runs', runId, 'finding', findingId],
    queryFn: ({ signal }) => api.get(`${runPath(runId)}/findings/${findingId}`, { signal, schema: storedFindingSchema }),
  });
}

/** The most findings one file's gutter marks are gathered from (pages of 500). */
export const FILE_MARKS_LIMIT = 5000;

/** Every finding anchored in one file of the run, for the editor's gutter marks, in line order. */
export function fileFindingsQuery(runId: string, file: string) {
  return queryOptions({
    queryKey: ['runs', runId, 'file-findings', file],
    queryFn: async ({ signal }): Promise<{ items: StoredFinding[]; complete: boolean }> => {
      const items: StoredFinding[] = [];
      const pageSize = 500;
      for (let page = 1; (page - 1) * pageSize < FILE_MARKS_LIMIT; page++) {
        const result = await api.get(`${runPath(runId)}/findings`, { signal, query: { file, sort: 'location', page, pageSize }, schema: findingPageSchema });
        items.push(...result.items.filter((f) => f.file === file));
        if (page * pageSize >= result.total) return { items: sortByLine(items), complete: true };
      }
      return { items: sortByLine(items), complete: false };
    },
  });
}

function sortByLine(items: StoredFinding[]) {
  return items.sort((a, b) => a.line - b.line || a.column - b.column || a.id - b.id);
}

/** Titles, rationales and fixes of every rule Keepwell knows (the deck API's catalogue). */
export const ruleCatalogueQuery = queryOptions({
  queryKey: ['rules'],
  queryFn: ({ signal }) => api.get('/api/rules', { signal, schema: ruleCatalogueSchema }).then((r) => new Map<string, RuleCatalogueEntry>(r.items.map((e) => [e.id, e]))),
  staleTime: Infinity,
});
