import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { blockListSchema, blockSchema } from '../../../shared/api/blocks';
import { api } from '../../lib/api';

export const blocksQuery = queryOptions({
  queryKey: ['blocks'],
  queryFn: ({ signal }) => api.get('/api/blocks', { signal, schema: blockListSchema }).then((r) => r.items),
});

export function blockQuery(blockId: string) {
  return queryOptions({
    queryKey: ['blocks', blockId],
    queryFn: ({ signal }) => api.get(`/api/blocks/${encodeURIComponent(blockId)}`, { signal, schema: blockSchema }),
  });
}

export function useCreateBlock() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: { name: string; description: string }) => api.post('/api/blocks', body, { schema: blockSchema }),
    onSuccess: (block) => {
      queryClient.setQueryData(blockQuery(block.id).queryKey, block);
      return queryClient.invalidateQueries({ queryKey: blocksQuery.queryKey });
    },
  });
}
