import { z } from 'zod';
import { acceptInviteBodySchema, loginBodySchema, passwordSchema, resetConfirmBodySchema, resetRequestBodySchema } from '../../../shared/api/auth';

export const signInFormSchema = loginBodySchema;
export const resetRequestFormSchema = resetRequestBodySchema;

/** Choosing a password: the shared rule for a password, typed twice. */
export const newPasswordFormSchema = z
  .object({ password: passwordSchema, repeat: z.string() })
  .refine((v) => v.password === v.repeat, { path: ['repeat'], message: 'The two passwords differ.' });

// The token comes from the link, not from the form, but the body must still satisfy these.
export { acceptInviteBodySchema, resetConfirmBodySchema };
