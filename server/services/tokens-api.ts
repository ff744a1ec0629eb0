// Personal API tokens: create (the token is returned once, only its HMAC is kept),
// list, revoke (the row stays, with its revocation time), and the lookup the
// bearer branch of api/middleware/auth.ts makes on every token request.

import { QueryTypes } from 'sequelize';
import { TOKEN_PREFIX, type TokenCreated, type TokenScope, type TokenView } from '../../shared/api/tokens';
import type { Role } from '../../shared/roles';
import type { AppContext } from '../context';
import { ApiToken } from '../db/models';
import { conflict, notFound } from '../errors';
import { recordAudit } from './audit';
import { hashToken, newToken } from './tokens';

type Ctx = Pick<AppContext, 'sequelize' | 'config'>;

/** Characters of the token kept visible in its owner's list. */
const HINT_LENGTH = TOKEN_PREFIX.length + 4;

function tokenView(t: ApiToken): TokenView {
  return {
    id: t.id,
    name: t.name,
    scope: t.scope,
    hint: t.tokenHint,
    createdAt: t.createdAt.toISOString(),
    lastUsedAt: t.lastUsedAt ? t.lastUsedAt.toISOString() : null,
    revokedAt: t.revokedAt ? t.revokedAt.toISOString() : null,
  };
}

export async function createApiToken(ctx: Ctx, actor: { id: string; teamId: string | null }, input: { name: string; scope: TokenScope }): Promise<TokenCreated> {
  const token = `${TOKEN_PREFIX}${newToken()}`;
  const row = await ctx.sequelize.transaction(async (transaction) => {
    const created = await ApiToken.create(
      { userId: actor.id, name: input.name, scope: input.scope, tokenHash: hashToken(ctx.config.secret, token), tokenHint: token.slice(0, HINT_LENGTH), lastUsedAt: null, revokedAt: null },
      { transaction },
    );
    await recordAudit({ teamId: actor.teamId, actorId: actor.id, action: 'token.create', subjectType: 'api-token', subjectId: created.id, detail: { name: input.name, scope: input.scope } }, transaction);
    return created;
  });
  return { ...tokenView(row), token };
}

export async function listApiTokens(userId: string): Promise<{ items: TokenView[] }> {
  const rows = await ApiToken.findAll({ where: { userId }, order: [['createdAt', 'DESC'], ['id', 'ASC']] });
  return { items: rows.map(tokenView) };
}

/** Only the owner revokes a token; another user's token is not found. */
export async function revokeApiToken(ctx: Ctx, actor: { id: string; teamId: string | null }, id: string): Promise<TokenView> {
  return ctx.sequelize.transaction(async (transaction) => {
    const row = await ApiToken.findOne({ where: { id, userId: actor.id }, transaction, lock: transaction.LOCK.UPDATE });
    if (!row) throw notFound('Token');
    if (row.revokedAt) throw conflict('The token is already revoked.');
    row.revokedAt = new Date();
    await row.save({ transaction });
    await recordAudit({ teamId: actor.teamId, actorId: actor.id, action: 'token.revoke', subjectType: 'api-token', subjectId: id, detail: { name: row.name } }, transaction);
    return tokenView(row);
  });
}

export interface TokenIdentity {
  tokenId: string;
  scope: TokenScope;
  user: { id: string; email: string; name: string; roles: Role[]; teamId: string | null };
}

/** The live token's owner (not disabled), or null; stamps when it was used. */
export async function identifyToken(ctx: Ctx, token: string): Promise<TokenIdentity | null> {
  if (!token.startsWith(TOKEN_PREFIX) || token.length > 200) return null;
  const rows = await ctx.sequelize.query<{ id: string; scope: TokenScope; user_id: string; email: string; name: string; roles: Role[]; team_id: string | null }>(
    `update api_tokens t set last_used_at = now()
     from users u
     where t.token_hash = :hash and t.revoked_at is null and u.id = t.user_id and not u.disabled
     returning t.id, t.scope, u.id as user_id, u.email, u.name, u.roles, u.team_id`,
    { replacements: { hash: hashToken(ctx.config.secret, token) }, type: QueryTypes.SELECT },
  );
  const r = rows[0];
  if (!r) return null;
  return { tokenId: r.id, scope: r.scope, user: { id: r.user_id, email: r.email, name: r.name, roles: r.roles, teamId: r.team_id } };
}
