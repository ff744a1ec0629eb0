import { z } from 'zod';

/** Every API error has this body, whatever the status. */
export const apiErrorSchema = z.object({
  error: z.object({
    /** Machine-readable: `validation`, `unauthenticated`, `invalid-credentials`, `invalid-token`, `forbidden`, `not-found`, `conflict`, `rate-limited`, `payload-too-large`, `unavailable`, `internal`. */
    code: z.string(),
    message: z.string(),
    /** For validation errors: one entry per offending field, `path` dotted (`rules.stage.noise-margin.params.minFraction`). */
    details: z.array(z.object({ path: z.string(), message: z.string() })).optional(),
  }),
});
export type ApiError = z.infer<typeof apiErrorSchema>;

export const pageQuerySchema = z.object({
  page: z.coerce.number().int().min(1).default(1),
  pageSize: z.coerce.number().int().min(1).max(500).default(50),
});

export const idParamSchema = z.object({ id: z.string().uuid() });

export function paged<T extends z.ZodTypeAny>(item: T) {
  return z.object({ items: z.array(item), total: z.number().int(), page: z.number().int(), pageSize: z.number().int() });
}
