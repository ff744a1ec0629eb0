// /api/tokens: the signed-in user's personal API tokens. A token cannot manage
// tokens (TOKEN_SCOPE_PERMISSIONS grants no token.manage), so only a session can.

import { Router } from 'express';
import { idParamSchema } from '../../../shared/api/common';
import { createTokenBodySchema } from '../../../shared/api/tokens';
import type { AppContext } from '../../context';
import { createApiToken, listApiTokens, revokeApiToken } from '../../services/tokens-api';
import { parseRequest } from '../http';
import { requirePermission, signedIn } from '../middleware/auth';

export function tokenRoutes(ctx: AppContext): Router {
  const router = Router();

  router.get('/', requirePermission('token.manage'), async (req, res) => {
    res.json(await listApiTokens(signedIn(req).user.id));
  });

  router.post('/', requirePermission('token.manage'), async (req, res) => {
    const { body } = parseRequest(req, { body: createTokenBodySchema });
    const { user } = signedIn(req);
    res.setHeader('Cache-Control', 'no-store');
    res.status(201).json(await createApiToken(ctx, { id: user.id, teamId: user.teamId }, body));
  });

  router.post('/:id/revoke', requirePermission('token.manage'), async (req, res) => {
    const { params } = parseRequest(req, { params: idParamSchema });
    const { user } = signedIn(req);
    res.json(await revokeApiToken(ctx, { id: user.id, teamId: user.teamId }, params.id));
  });

  return router;
}
