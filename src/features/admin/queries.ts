import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { adminUserListSchema, adminUserResponseSchema, outboxMessageSchema, outboxPageSchema } from '../../../shared/api/admin';
import type { Role } from '../../../shared/roles';
import { api } from '../../lib/api';

export const OUTBOX_PAGE_SIZE = 25;

export const adminUsersQuery = queryOptions({
  queryKey: ['admin', 'users'],
  queryFn: ({ signal }) => api.get('/api/admin/users', { signal, schema: adminUserListSchema }).then((r) => r.items),
});

export function outboxQuery(page: number) {
  return queryOptions({
    queryKey: ['admin', 'outbox', page],
    queryFn: ({ signal }) => api.get('/api/admin/outbox', { signal, query: { page, pageSize: OUTBOX_PAGE_SIZE }, schema: outboxPageSchema }),
    placeholderData: (previous) => previous,
  });
}

export function outboxMessageQuery(id: string) {
  return queryOptions({
    queryKey: ['admin', 'outbox', 'message', id],
    queryFn: ({ signal }) => api.get(`/api/admin/outbox/${encodeURIComponent(id)}`, { signal, schema: outboxMessageSchema }),
  });
}

export function useInvite() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: { email: string; name: string; roles: Role[] }) => api.post<unknown>('/api/admin/invitations', body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: ['admin'] }),
  });
}

export function useUpdateUser() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, ...body }: { id: string; roles?: Role[]; disabled?: boolean }) =>
      api.patch(`/api/admin/users/${encodeURIComponent(id)}`, body, { schema: adminUserResponseSchema }),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: adminUsersQuery.queryKey }),
  });
}
