import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import {
  findingWaiversSchema,
  waiverDetailSchema,
  waiverPageSchema,
  waiverSchema,
  type CreateWaiverBody,
  type WaiverStanding,
} from '../../../shared/api/waivers';
import { api } from '../../lib/api';

export function waiverListQuery(filter: { standing: WaiverStanding[]; mine: boolean; page: number }) {
  return queryOptions({
    queryKey: ['waivers', 'list', filter],
    queryFn: ({ signal }) =>
      api.get('/api/waivers', {
        signal,
        query: { standing: filter.standing.join(',') || null, mine: filter.mine ? 'true' : null, page: filter.page, pageSize: 50 },
        schema: waiverPageSchema,
      }),
  });
}

export function waiverQuery(id: string) {
  return queryOptions({
    queryKey: ['waivers', 'one', id],
    queryFn: ({ signal }) => api.get(`/api/waivers/${encodeURIComponent(id)}`, { signal, schema: waiverDetailSchema }),
  });
}

export function findingWaiversQuery(runId: string, findingId: number) {
  return queryOptions({
    queryKey: ['waivers', 'for-finding', runId, findingId],
    queryFn: ({ signal }) => api.get('/api/waivers/for-finding', { signal, query: { runId, findingId }, schema: findingWaiversSchema }),
  });
}

/** Waiver changes move finding statuses: every waiver and findings query is read again. */
function useInvalidate() {
  const client = useQueryClient();
  return () => Promise.all([client.invalidateQueries({ queryKey: ['waivers'] }), client.invalidateQueries({ queryKey: ['runs'] })]);
}

/** A designer's request (`direct: false`) or a reviewer's direct waiver. */
export function useCreateWaiver() {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: ({ direct, ...body }: CreateWaiverBody & { direct: boolean }) => api.post(direct ? '/api/waivers/direct' : '/api/waivers', body, { schema: waiverSchema }),
    onSuccess: invalidate,
  });
}

export function useDecideWaiver() {
  const invalidate = useInvalidate();
  return useMutation({
    mutationFn: ({ id, decision, comment }: { id: string; decision: 'approve' | 'reject'; comment: string }) =>
      api.post(`/api/waivers/${encodeURIComponent(id)}/${decision}`, { comment }, { schema: waiverSchema }),
    onSuccess: invalidate,
  });
}

export function useRevokeWaiver() {
  const invalidate = useInvalidate();
  return useMutation({
    /** `withdraw`: the requester's own pending request; otherwise a reviewer's or admin's revocation. */
    mutationFn: ({ id, reason, withdraw = false }: { id: string; reason: string; withdraw?: boolean }) =>
      api.post(`/api/waivers/${encodeURIComponent(id)}/${withdraw ? 'withdraw' : 'revoke'}`, { reason }, { schema: waiverSchema }),
    onSuccess: invalidate,
  });
}
