// Who is calling. `authenticate` runs on every /api request and sets `req.auth`
// from the session cookie; `requirePermission` guards every route with the table
// in shared/roles.ts. Routes read the caller with `signedIn(req)` and scope data
// with `teamIdOf(req)`.

import type { Request, RequestHandler, Response } from 'express';
import type { Session } from 'lucia';
import { can, type Permission, type Role } from '../../../shared/roles';
import type { AppContext } from '../../context';
import type { ApiTokenScope } from '../../db/models/tokens';
import { forbidden, HttpError, unauthenticated } from '../../errors';
import { identifyToken } from '../../services/tokens-api';

export interface AuthUser {
  id: string;
  email: string;
  name: string;
  roles: Role[];
  teamId: string | null;
}

export type Auth =
  | { via: 'session'; user: AuthUser; session: Session }
  | { via: 'token'; user: AuthUser; tokenId: string; scope: ApiTokenScope };

declare global {
  namespace Express {
    interface Request {
      auth?: Auth;
    }
  }
}

/** What an API token may do at most, whatever its owner's roles allow beyond that. */
export const TOKEN_SCOPE_PERMISSIONS: Record<ApiTokenScope, readonly Permission[]> = {
  read: ['design.read'],
  submit: ['design.read', 'run.submit'],
};

export function authenticate(ctx: AppContext): RequestHandler {
  return async (req, res, next) => {
    const authorization = req.headers.authorization;
    if (authorization?.toLowerCase().startsWith('bearer ')) {
      // A personal API token (services/tokens-api.ts). A bearer request never falls back to the cookie.
      const identity = await identifyToken(ctx, authorization.slice('bearer '.length).trim());
      if (!identity) return next(new HttpError(401, 'invalid-token', 'The API token is not valid: it may have been revoked, or its owner disabled.'));
      req.auth = { via: 'token', user: identity.user, tokenId: identity.tokenId, scope: identity.scope };
      return next();
    }

    const sessionId = ctx.lucia.readSessionCookie(req.headers.cookie ?? '');
    if (!sessionId) return next();
    const { session, user } = await ctx.lucia.validateSession(sessionId);
    if (!session) {
      clearSessionCookie(ctx, req, res);
      return next();
    }
    if (user.disabled) {
      await ctx.lucia.invalidateUserSessions(user.id);
      clearSessionCookie(ctx, req, res);
      return next();
    }
    // Lucia extends a session used in the second half of its lifetime; send the new expiry.
    if (session.fresh) setSessionCookie(ctx, req, res, session);
    req.auth = {
      via: 'session',
      session,
      user: { id: user.id, email: user.email, name: user.name, roles: user.roles, teamId: user.teamId },
    };
    next();
  };
}

export function signedIn(req: Request): Auth {
  if (!req.auth) throw unauthenticated();
  return req.auth;
}

/** The caller's team; everything a route reads or writes is scoped to it. */
export function teamIdOf(req: Request): string {
  const { user } = signedIn(req);
  if (!user.teamId) throw forbidden('Your account belongs to no team yet.');
  return user.teamId;
}

export function allows(auth: Auth, permission: Permission): boolean {
  if (!can(auth.user.roles, permission)) return false;
  if (auth.via === 'token') return TOKEN_SCOPE_PERMISSIONS[auth.scope].includes(permission);
  return true;
}

/** 401 for nobody, 403 when the caller's roles (and token scope) do not grant `permission`. */
export function requirePermission(permission: Permission): RequestHandler {
  return (req, _res, next) => {
    const auth = signedIn(req);
    if (!allows(auth, permission)) throw forbidden();
    next();
  };
}

function cookieOptions(ctx: AppContext, req: Request) {
  return {
    httpOnly: true,
    sameSite: 'lax' as const,
    // Secure whenever the browser reached us over TLS (directly, or through a trusted proxy) and always in production.
    secure: ctx.config.isProduction || req.secure,
    path: '/',
  };
}

export function setSessionCookie(ctx: AppContext, req: Request, res: Response, session: Session): void {
  res.cookie(ctx.lucia.sessionCookieName, session.id, { ...cookieOptions(ctx, req), expires: session.expiresAt });
}

export function clearSessionCookie(ctx: AppContext, req: Request, res: Response): void {
  res.clearCookie(ctx.lucia.sessionCookieName, cookieOptions(ctx, req));
}

