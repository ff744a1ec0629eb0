// /api/blocks: the team's design blocks.

import { Router } from 'express';
import { createBlockBodySchema } from '../../../shared/api/blocks';
import { idParamSchema } from '../../../shared/api/common';
import type { AppContext } from '../../context';
import { blockView, createBlock, getBlock, listBlocks } from '../../services/blocks';
import { parseRequest } from '../http';
import { requirePermission, signedIn, teamIdOf } from '../middleware/auth';

export function blockRoutes(ctx: AppContext): Router {
  const router = Router();

  router.get('/', requirePermission('design.read'), async (req, res) => {
    res.json({ items: await listBlocks(teamIdOf(req)) });
  });

  router.post('/', requirePermission('block.create'), async (req, res) => {
    const { body } = parseRequest(req, { body: createBlockBodySchema });
    const block = await createBlock(ctx, { id: signedIn(req).user.id, teamId: teamIdOf(req) }, body);
    res.status(201).json(block);
  });

  router.get('/:id', requirePermission('design.read'), async (req, res) => {
    const { params } = parseRequest(req, { params: idParamSchema });
    res.json(blockView(await getBlock(teamIdOf(req), params.id)));
  });

  return router;
}
