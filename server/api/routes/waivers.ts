// /api/waivers: the team's waivers (list, one with its history, those of one
// finding), requests by designers and their withdrawal, direct waivers and
// decisions by reviewers, and revocation. Matching against findings happens where findings are read
// (server/services/waivers-status.ts).

import { Router } from 'express';
import { z } from 'zod';
import { idParamSchema } from '../../../shared/api/common';
import {
  createWaiverBodySchema,
  decideWaiverBodySchema,
  rejectWaiverBodySchema,
  revokeWaiverBodySchema,
  waiverListQuerySchema,
} from '../../../shared/api/waivers';
import type { AppContext } from '../../context';
import { createWaiver, decideWaiver, getWaiver, listWaivers, revokeWaiver, waiversOfFinding, withdrawWaiverRequest } from '../../services/waivers';
import { parseRequest } from '../http';
import { allows, requirePermission, signedIn, teamIdOf } from '../middleware/auth';

const findingRefSchema = z.object({ runId: z.string().uuid(), findingId: z.coerce.number().int().min(1) });

export function waiverRoutes(ctx: AppContext): Router {
  const router = Router();
  const actorOf = (req: Parameters<typeof teamIdOf>[0]) => ({ id: signedIn(req).user.id, teamId: teamIdOf(req) });

  router.get('/', requirePermission('design.read'), async (req, res) => {
    const { query } = parseRequest(req, { query: waiverListQuerySchema });
    res.json(await listWaivers(ctx, teamIdOf(req), signedIn(req).user.id, query));
  });

  router.get('/for-finding', requirePermission('design.read'), async (req, res) => {
    const { query } = parseRequest(req, { query: findingRefSchema });
    res.json(await waiversOfFinding(ctx, teamIdOf(req), query.runId, query.findingId));
  });

  router.get('/:id', requirePermission('design.read'), async (req, res) => {
    const { params } = parseRequest(req, { params: idParamSchema });
    res.json(await getWaiver(ctx, teamIdOf(req), params.id));
  });

  router.post('/', requirePermission('waiver.request'), async (req, res) => {
    const { body } = parseRequest(req, { body: createWaiverBodySchema });
    res.status(201).json(await createWaiver(ctx, actorOf(req), body, false));
  });

  router.post('/direct', requirePermission('waiver.decide'), async (req, res) => {
    const { body } = parseRequest(req, { body: createWaiverBodySchema });
    res.status(201).json(await createWaiver(ctx, actorOf(req), body, true));
  });

  router.post('/:id/approve', requirePermission('waiver.decide'), async (req, res) => {
    const { params, body } = parseRequest(req, { params: idParamSchema, body: decideWaiverBodySchema });
    res.json(await decideWaiver(ctx, actorOf(req), params.id, 'approved', body.comment));
  });

  router.post('/:id/reject', requirePermission('waiver.decide'), async (req, res) => {
    const { params, body } = parseRequest(req, { params: idParamSchema, body: rejectWaiverBodySchema });
    res.json(await decideWaiver(ctx, actorOf(req), params.id, 'rejected', body.comment));
  });

  router.post('/:id/revoke', requirePermission('waiver.revoke'), async (req, res) => {
    const { params, body } = parseRequest(req, { params: idParamSchema, body: revokeWaiverBodySchema });
    res.json(await revokeWaiver(ctx, { ...actorOf(req), mayDecide: allows(signedIn(req), 'waiver.decide') }, params.id, body.reason));
  });

  // The requester's own pending request only (checked in the service).
  router.post('/:id/withdraw', requirePermission('waiver.request'), async (req, res) => {
    const { params, body } = parseRequest(req, { params: idParamSchema, body: revokeWaiverBodySchema });
    res.json(await withdrawWaiverRequest(ctx, actorOf(req), params.id, body.reason));
  });

  return router;
}
