// /api/runs: submit (multipart upload, or JSON naming a stored netlist), list, read,
// cancel, page findings, the files for the editor view, and compare two runs.

import { Router } from 'express';
import { idParamSchema } from '../../../shared/api/common';
import {
  compareParamsSchema,
  compareQuerySchema,
  createRunBodySchema,
  createRunFieldsSchema,
  fileQuerySchema,
  findingParamsSchema,
  findingsQuerySchema,
  runListQuerySchema,
} from '../../../shared/api/runs';
import type { AppContext } from '../../context';
import { cancelRun, listRuns, runDetail, runFile, runFiles, submitRun } from '../../services/runs';
import { compareRuns, getFinding, listFindings } from '../../services/runs-findings';
import { storeUpload } from '../../services/uploads';
import { parseRequest } from '../http';
import { requirePermission, signedIn, teamIdOf } from '../middleware/auth';
import { netlistMultipart, uploadedFiles } from './uploads';

export function runRoutes(ctx: AppContext): Router {
  const router = Router();

  router.get('/', requirePermission('design.read'), async (req, res) => {
    const { query } = parseRequest(req, { query: runListQuerySchema });
    res.json(await listRuns(ctx, teamIdOf(req), signedIn(req).user.id, query));
  });

  router.post('/', requirePermission('run.submit'), netlistMultipart(ctx.config), async (req, res) => {
    const actor = { id: signedIn(req).user.id, teamId: teamIdOf(req) };
    if (req.is('multipart/form-data')) {
      const { body } = parseRequest(req, { body: createRunFieldsSchema });
      const { netlistId, ...upload } = await storeUpload(ctx, actor, body.blockId, uploadedFiles(req));
      const run = await submitRun(ctx, actor, { netlistId, deckVersionId: body.deckVersionId, note: body.note, top: body.top });
      res.status(201).json({ run, upload });
      return;
    }
    const { body } = parseRequest(req, { body: createRunBodySchema });
    res.status(201).json({ run: await submitRun(ctx, actor, body) });
  });

  router.get('/:id', requirePermission('design.read'), async (req, res) => {
    const { params } = parseRequest(req, { params: idParamSchema });
    res.json(await runDetail(ctx, teamIdOf(req), params.id));
  });

  router.post('/:id/cancel', requirePermission('run.cancel'), async (req, res) => {
    const { params } = parseRequest(req, { params: idParamSchema });
    const { user } = signedIn(req);
    res.json(await cancelRun(ctx, { id: user.id, teamId: teamIdOf(req), roles: user.roles }, params.id));
  });

  router.get('/:id/findings', requirePermission('design.read'), async (req, res) => {
    const { params, query } = parseRequest(req, { params: idParamSchema, query: findingsQuerySchema });
    res.json(await listFindings(ctx, teamIdOf(req), params.id, query));
  });

  router.get('/:id/findings/:findingId', requirePermission('design.read'), async (req, res) => {
    const { params } = parseRequest(req, { params: findingParamsSchema });
    res.json(await getFinding(ctx, teamIdOf(req), params.id, params.findingId));
  });

  router.get('/:id/files', requirePermission('design.read'), async (req, res) => {
    const { params } = parseRequest(req, { params: idParamSchema });
    res.json(await runFiles(ctx, teamIdOf(req), params.id));
  });

  // One file's text: JSON by default, text/plain when asked for; never HTML (nosniff is set for every response).
  router.get('/:id/file', requirePermission('design.read'), async (req, res) => {
    const { params, query } = parseRequest(req, { params: idParamSchema, query: fileQuerySchema });
    const file = await runFile(ctx, teamIdOf(req), params.id, query.path);
    res.setHeader('X-Content-Type-Options', 'nosniff');
    if (req.accepts(['application/json', 'text/plain']) === 'text/plain') {
      res.type('text/plain; charset=utf-8').send(file.text);
      return;
    }
    res.json(file);
  });

  router.get('/:id/compare/:baseId', requirePermission('design.read'), async (req, res) => {
    const { params, query } = parseRequest(req, { params: compareParamsSchema, query: compareQuerySchema });
    res.json(await compareRuns(ctx, teamIdOf(req), params.id, params.baseId, query));
  });

  return router;
}
