import { queryOptions, useMutation, useQueryClient } from '@tanstack/react-query';
import { z } from 'zod';
import { blockListSchema, blockSchema, type Block } from '../../../shared/api/blocks';
import { api } from '../../lib/api';

export const blocksQuery = queryOptions({
  queryKey: ['blocks'],
  queryFn: ({ signal }) => api.get('/api/blocks', { signal, schema: blockListSchema }).then((r) => r.items),
});

export function blockQuery(blockId: string) {
  return queryOptions({
    queryKey: ['blocks', blockId],
    queryFn: ({ signal }) => api.get(`/api/blocks/${encodeURIComponent(blockId)}`, { signal, schema: blockResponseSchema }).then(unwrapBlock),
  });
}

// The server answers a single block either bare or as `{ block }`; both are accepted.
const blockResponseSchema = z.union([blockSchema, z.object({ block: blockSchema })]);
function unwrapBlock(body: z.infer<typeof blockResponseSchema>): Block {
  return 'block' in body ? body.block : body;
}

export function useCreateBlock() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: { name: string; description: string }) => api.post('/api/blocks', body, { schema: blockResponseSchema }).then(unwrapBlock),
    onSuccess: (block) => {
      queryClient.setQueryData(blockQuery(block.id).queryKey, block);
      return queryClient.invalidateQueries({ queryKey: blocksQuery.queryKey });
    },
  });
}
