import { z } from 'zod';
import { paged } from './common';
import { userSchema } from './auth';

/** A team member as the admin screens show them. `invited`: has not accepted the invitation yet. */
export const adminUserSchema = userSchema.extend({
  disabled: z.boolean(),
  status: z.enum(['active', 'invited', 'disabled']),
  createdAt: z.string(),
  lastSignInAt: z.string().nullable(),
});
export type AdminUser = z.infer<typeof adminUserSchema>;

export const adminUserListSchema = z.object({ items: z.array(adminUserSchema) });
export const adminUserResponseSchema = z.object({ user: adminUserSchema });

export const mailStatusSchema = z.enum(['queued', 'sent', 'failed']);

export const outboxMessageSummarySchema = z.object({
  id: z.string().uuid(),
  to: z.string(),
  subject: z.string(),
  status: mailStatusSchema,
  error: z.string().nullable(),
  attempts: z.number().int(),
  createdAt: z.string(),
  sentAt: z.string().nullable(),
});
export const outboxMessageSchema = outboxMessageSummarySchema.extend({ text: z.string(), html: z.string().nullable() });
export type OutboxMessage = z.infer<typeof outboxMessageSchema>;

export const outboxPageSchema = paged(outboxMessageSummarySchema);
