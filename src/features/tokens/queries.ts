import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { tokenCreatedSchema, tokenListSchema, tokenSchema, type TokenScope } from '../../../shared/api/tokens';
import { api } from '../../lib/api';

export const tokensQuery = queryOptions({
  queryKey: ['tokens'],
  queryFn: ({ signal }) => api.get('/api/tokens', { signal, schema: tokenListSchema }),
});

export function useCreateToken() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (body: { name: string; scope: TokenScope }) => api.post('/api/tokens', body, { schema: tokenCreatedSchema }),
    onSuccess: () => client.invalidateQueries({ queryKey: ['tokens'] }),
  });
}

export function useRevokeToken() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api.post(`/api/tokens/${encodeURIComponent(id)}/revoke`, undefined, { schema: tokenSchema }),
    onSuccess: () => client.invalidateQueries({ queryKey: ['tokens'] }),
  });
}
