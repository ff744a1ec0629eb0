// /api/admin: team members, invitations, and the mail outbox.

import { Router } from 'express';
import { inviteBodySchema, updateUserBodySchema } from '../../../shared/api/auth';
import { idParamSchema, pageQuerySchema } from '../../../shared/api/common';
import type { AppContext } from '../../context';
import { inviteUser } from '../../services/auth';
import { getOutboxMessage, listOutbox } from '../../services/outbox';
import { listTeamUsers, updateTeamUser } from '../../services/users';
import { parseRequest } from '../http';
import { requirePermission, signedIn, teamIdOf } from '../middleware/auth';

export function adminRoutes(ctx: AppContext): Router {
  const router = Router();

  router.get('/users', requirePermission('user.manage'), async (req, res) => {
    res.json({ items: await listTeamUsers(teamIdOf(req)) });
  });

  router.post('/invitations', requirePermission('user.manage'), async (req, res) => {
    const { body } = parseRequest(req, { body: inviteBodySchema });
    const { user } = signedIn(req);
    const invited = await inviteUser(ctx, { id: user.id, name: user.name, teamId: teamIdOf(req) }, body);
    res.status(201).json({ user: invited });
  });

  router.patch('/users/:id', requirePermission('user.manage'), async (req, res) => {
    const { params, body } = parseRequest(req, { params: idParamSchema, body: updateUserBodySchema });
    const { user } = signedIn(req);
    res.json({ user: await updateTeamUser(ctx, { id: user.id, teamId: teamIdOf(req) }, params.id, body) });
  });

  router.get('/outbox', requirePermission('outbox.read'), async (req, res) => {
    const { query } = parseRequest(req, { query: pageQuerySchema });
    res.json(await listOutbox(teamIdOf(req), query.page, query.pageSize));
  });

  router.get('/outbox/:id', requirePermission('outbox.read'), async (req, res) => {
    const { params } = parseRequest(req, { params: idParamSchema });
    res.json(await getOutboxMessage(teamIdOf(req), params.id, { hideTokens: ctx.config.isProduction }));
  });

  return router;
}
