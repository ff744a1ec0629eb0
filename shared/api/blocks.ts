import { z } from 'zod';

export const blockSchema = z.object({
  id: z.string().uuid(),
  name: z.string(),
  description: z.string(),
  createdAt: z.string(),
});
export type Block = z.infer<typeof blockSchema>;

export const blockListSchema = z.object({ items: z.array(blockSchema) });

export const createBlockBodySchema = z.object({
  name: z
    .string()
    .trim()
    .min(1)
    .max(80)
    .regex(/^[A-Za-z0-9][A-Za-z0-9_.-]*$/, 'letters, digits, dot, dash and underscore; starting with a letter or digit'),
  description: z.string().trim().max(2000).default(''),
});
