import { z } from 'zod';
import { ROLES } from '../roles';

export const roleSchema = z.enum(ROLES);

export const userSchema = z.object({
  id: z.string().uuid(),
  email: z.string().email(),
  name: z.string(),
  roles: z.array(roleSchema),
  teamId: z.string().uuid().nullable(),
  teamName: z.string().nullable(),
});
export type User = z.infer<typeof userSchema>;

export const loginBodySchema = z.object({
  email: z.string().trim().toLowerCase().email().max(254),
  password: z.string().min(1).max(200),
});

export const passwordSchema = z.string().min(10, 'at least 10 characters').max(200);

export const resetRequestBodySchema = z.object({ email: z.string().trim().toLowerCase().email().max(254) });
export const resetConfirmBodySchema = z.object({ token: z.string().min(20).max(200), password: passwordSchema });

export const inviteBodySchema = z.object({
  email: z.string().trim().toLowerCase().email().max(254),
  name: z.string().trim().min(1).max(120),
  roles: z.array(roleSchema).min(1),
});
export const acceptInviteBodySchema = z.object({ token: z.string().min(20).max(200), password: passwordSchema });

export const updateUserBodySchema = z.object({
  roles: z.array(roleSchema).min(1).optional(),
  disabled: z.boolean().optional(),
});

export const meResponseSchema = z.object({ user: userSchema });
