// /api/auth: sign in and out, who am I, password reset, accepting an invitation.

import { Router, type Request, type Response } from 'express';
import type { Session } from 'lucia';
import {
  acceptInviteBodySchema,
  loginBodySchema,
  resetConfirmBodySchema,
  resetRequestBodySchema,
} from '../../../shared/api/auth';
import type { AppContext } from '../../context';
import type { User } from '../../db/models';
import { acceptInvitation, checkCredentials, confirmPasswordReset, endSession, requestPasswordReset, startSession } from '../../services/auth';
import { findUserView, userView } from '../../services/users';
import { parseRequest, unauthenticated } from '../http';
import { clearSessionCookie, setSessionCookie, signedIn } from '../middleware/auth';
import { loginRateLimit, resetRateLimit } from '../middleware/rate-limit';

export function authRoutes(ctx: AppContext): Router {
  const router = Router();

  router.post('/login', ...loginRateLimit(ctx), async (req, res) => {
    const { body } = parseRequest(req, { body: loginBodySchema });
    const user = await checkCredentials(body.email, body.password);
    const previous = ctx.lucia.readSessionCookie(req.headers.cookie ?? '');
    const session = await startSession(ctx, user, previous);
    signInResponse(req, res, session, user);
  });

  router.post('/logout', async (req, res) => {
    if (req.auth?.via === 'session') await endSession(ctx, req.auth.session, req.auth.user);
    clearSessionCookie(ctx, req, res);
    res.status(204).end();
  });

  router.get('/me', async (req, res) => {
    const { user } = signedIn(req);
    const view = await findUserView(user.id);
    if (!view) throw unauthenticated();
    res.json({ user: view });
  });

  router.post('/password-reset', resetRateLimit(ctx), async (req, res) => {
    const { body } = parseRequest(req, { body: resetRequestBodySchema });
    await requestPasswordReset(ctx, body.email);
    res.status(202).end();
  });

  router.post('/password-reset/confirm', async (req, res) => {
    const { body } = parseRequest(req, { body: resetConfirmBodySchema });
    await confirmPasswordReset(ctx, body.token, body.password);
    res.status(204).end();
  });

  router.post('/invitations/accept', async (req, res) => {
    const { body } = parseRequest(req, { body: acceptInviteBodySchema });
    const user = await acceptInvitation(ctx, body.token, body.password);
    const previous = ctx.lucia.readSessionCookie(req.headers.cookie ?? '');
    const session = await startSession(ctx, user, previous);
    signInResponse(req, res, session, user);
  });

  function signInResponse(req: Request, res: Response, session: Session, user: User): void {
    setSessionCookie(ctx, req, res, session);
    // From here on the request is the user's (the request log names them).
    req.auth = { via: 'session', session, user: { id: user.id, email: user.email, name: user.name, roles: user.roles, teamId: user.teamId ?? null } };
    res.json({ user: userView(user) });
  }

  return router;
}
