import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import {
  deckDetailSchema,
  deckDiffSchema,
  deckListSchema,
  deckVersionSchema,
  previewSchema,
  type DeckVersion,
  type PatchOperation,
} from '../../../shared/api/decks';
import { api } from '../../lib/api';

const enc = encodeURIComponent;
export const versionPath = (deckId: string, versionId: string) => `/api/decks/${enc(deckId)}/versions/${enc(versionId)}`;
export const exportUrl = (deckId: string, versionId: string) => `${versionPath(deckId, versionId)}/export`;

export const decksQuery = queryOptions({
  queryKey: ['decks'],
  queryFn: ({ signal }) => api.get('/api/decks', { signal, schema: deckListSchema }).then((r) => r.items),
});

export function deckQuery(deckId: string) {
  return queryOptions({
    queryKey: ['decks', deckId],
    queryFn: ({ signal }) => api.get(`/api/decks/${enc(deckId)}`, { signal, schema: deckDetailSchema }),
  });
}

export function versionQuery(deckId: string, versionId: string) {
  return queryOptions({
    queryKey: ['decks', deckId, 'versions', versionId],
    queryFn: ({ signal }) => api.get(versionPath(deckId, versionId), { signal, schema: deckVersionSchema }),
  });
}

export function diffQuery(fromId: string, toId: string) {
  return queryOptions({
    queryKey: ['deck-diff', fromId, toId],
    queryFn: ({ signal }) => api.get('/api/decks/diff', { signal, query: { from: fromId, to: toId }, schema: deckDiffSchema }),
    // Published versions never change; a draft's diff is refetched when the draft is saved.
    staleTime: 30_000,
  });
}

/** After any change of a version: the version itself, its deck, the list and every diff are refetched. */
function useVersionSaved() {
  const queryClient = useQueryClient();
  return (version: DeckVersion) => {
    queryClient.setQueryData(versionQuery(version.deckId, version.id).queryKey, version);
    void queryClient.invalidateQueries({ queryKey: ['decks'], predicate: (q) => q.queryKey.length < 3 });
    void queryClient.invalidateQueries({ queryKey: ['deck-diff'] });
  };
}

export function useCreateDeck() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: { name: string; description?: string; content?: unknown }) => api.post('/api/decks', body, { schema: deckDetailSchema }),
    onSuccess: (deck) => {
      queryClient.setQueryData(deckQuery(deck.id).queryKey, deck);
      return queryClient.invalidateQueries({ queryKey: decksQuery.queryKey, exact: true });
    },
  });
}

export function useCreateDraft(deckId: string) {
  const saved = useVersionSaved();
  return useMutation({
    mutationFn: (fromVersionId?: string) => api.post(`/api/decks/${enc(deckId)}/drafts`, fromVersionId ? { fromVersionId } : {}, { schema: deckVersionSchema }),
    onSuccess: saved,
  });
}

/** Edit a draft. The version's lockVersion goes along; a 409 `stale-version` means someone saved first. */
export function usePatchVersion(version: DeckVersion) {
  const saved = useVersionSaved();
  return useMutation({
    mutationFn: (changes: PatchOperation[]) =>
      api.patch(versionPath(version.deckId, version.id), { lockVersion: version.lockVersion, changes }, { schema: deckVersionSchema }),
    onSuccess: saved,
  });
}

export function useReplaceContent(version: DeckVersion) {
  const saved = useVersionSaved();
  return useMutation({
    mutationFn: (content: unknown) => api.put(`${versionPath(version.deckId, version.id)}/content`, { lockVersion: version.lockVersion, content }, { schema: deckVersionSchema }),
    onSuccess: saved,
  });
}

export function usePublish(version: DeckVersion) {
  const saved = useVersionSaved();
  return useMutation({
    mutationFn: (body: { changeNote: string; makeDefault: boolean }) =>
      api.post(`${versionPath(version.deckId, version.id)}/publish`, { lockVersion: version.lockVersion, ...body }, { schema: deckVersionSchema }),
    onSuccess: saved,
  });
}

export function useDiscardDraft(version: DeckVersion) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: () => api.delete<void>(versionPath(version.deckId, version.id)),
    onSuccess: () => {
      queryClient.removeQueries({ queryKey: versionQuery(version.deckId, version.id).queryKey });
      return queryClient.invalidateQueries({ queryKey: ['decks'] });
    },
  });
}

export function useMakeDefault(deckId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (versionId: string) => api.post(`${versionPath(deckId, versionId)}/default`, {}, { schema: deckDetailSchema }),
    onSuccess: (deck) => {
      queryClient.setQueryData(deckQuery(deck.id).queryKey, deck);
      return queryClient.invalidateQueries({ queryKey: ['decks'] });
    },
  });
}

export function usePreview(version: DeckVersion) {
  return useMutation({
    mutationFn: () => api.post(`${versionPath(version.deckId, version.id)}/preview`, {}, { schema: previewSchema }),
  });
}
