// Personal API tokens: a user's own credentials for scripts and CI, sent as
// `Authorization: Bearer <token>`. Only a hash is stored; the token is shown once,
// when it is created. `read` may read what its owner can read; `submit` may also
// upload netlists and queue runs (server/api/middleware/auth.ts TOKEN_SCOPE_PERMISSIONS).

import { z } from 'zod';

export const TOKEN_SCOPES = ['read', 'submit'] as const;
export const tokenScopeSchema = z.enum(TOKEN_SCOPES);
export type TokenScope = z.infer<typeof tokenScopeSchema>;

export const TOKEN_SCOPE_LABELS: Record<TokenScope, { label: string; description: string }> = {
  read: { label: 'Read', description: 'Read blocks, runs, findings, waivers and reports.' },
  submit: { label: 'Read and submit', description: 'Also upload netlists and queue runs, as a CI job does.' },
};

/** Every token starts with this, so a leaked one is easy to recognise and search for. */
export const TOKEN_PREFIX = 'kwt_';

export const createTokenBodySchema = z.object({
  name: z.string().trim().min(1, 'name the token after where it will be used').max(100),
  scope: tokenScopeSchema,
});

export const tokenSchema = z.object({
  id: z.string().uuid(),
  name: z.string(),
  scope: tokenScopeSchema,
  /** The token's first characters, to tell tokens apart. */
  hint: z.string(),
  createdAt: z.string(),
  lastUsedAt: z.string().nullable(),
  revokedAt: z.string().nullable(),
});
export type TokenView = z.infer<typeof tokenSchema>;

/** The answer to creating a token: the only time the token itself is shown. */
export const tokenCreatedSchema = tokenSchema.extend({ token: z.string() });
export type TokenCreated = z.infer<typeof tokenCreatedSchema>;

export const tokenListSchema = z.object({ items: z.array(tokenSchema) });
