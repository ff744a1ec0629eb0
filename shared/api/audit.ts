import { z } from 'zod';
import { paged } from './common';

export const auditEventSchema = z.object({
  id: z.number().int(),
  /** Dotted verb: `auth.sign-in`, `block.create`, `user.update`, … */
  action: z.string(),
  subjectType: z.string(),
  subjectId: z.string().nullable(),
  detail: z.record(z.string(), z.unknown()),
  actor: z.object({ id: z.string().uuid(), name: z.string(), email: z.string() }).nullable(),
  createdAt: z.string(),
});
export type AuditEvent = z.infer<typeof auditEventSchema>;

export const auditPageSchema = paged(auditEventSchema);

export const healthSchema = z.object({ ok: z.boolean(), postgres: z.boolean(), redis: z.boolean() });
