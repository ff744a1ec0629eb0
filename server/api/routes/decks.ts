// /api/decks: the team's rule decks, their versions, edits, publishing, diffs,
// export and import, and the preview of a draft. /api/rules: the rule catalogue.

import { Router, type Request } from 'express';
import {
  createDeckBodySchema,
  createDraftBodySchema,
  deckParamsSchema,
  deckVersionParamsSchema,
  diffQuerySchema,
  patchVersionBodySchema,
  previewBodySchema,
  publishBodySchema,
  replaceContentBodySchema,
} from '../../../shared/api/decks';
import type { AppContext } from '../../context';
import {
  createDeck,
  createDraft,
  deckDetail,
  diffVersions,
  discardDraft,
  exportVersion,
  listDecks,
  makeTeamDefault,
  patchDraft,
  publishDraft,
  replaceDraftContent,
  versionDetail,
} from '../../services/decks';
import { ruleCatalogue } from '../../services/decks-catalogue';
import { previewVersion } from '../../services/decks-preview';
import { parseRequest } from '../http';
import { requirePermission, signedIn, teamIdOf } from '../middleware/auth';

const actorOf = (req: Request) => ({ id: signedIn(req).user.id, teamId: teamIdOf(req) });

export function deckRoutes(ctx: AppContext): Router {
  const router = Router();

  router.get('/', requirePermission('design.read'), async (req, res) => {
    res.json({ items: await listDecks(teamIdOf(req)) });
  });

  router.post('/', requirePermission('deck.edit'), async (req, res) => {
    const { body } = parseRequest(req, { body: createDeckBodySchema });
    res.status(201).json(await createDeck(ctx, actorOf(req), body));
  });

  // Before /:deckId, which would otherwise take "diff" for an id.
  router.get('/diff', requirePermission('design.read'), async (req, res) => {
    const { query } = parseRequest(req, { query: diffQuerySchema });
    res.json(await diffVersions(teamIdOf(req), query.from, query.to));
  });

  router.get('/:deckId', requirePermission('design.read'), async (req, res) => {
    const { params } = parseRequest(req, { params: deckParamsSchema });
    res.json(await deckDetail(teamIdOf(req), params.deckId));
  });

  router.post('/:deckId/drafts', requirePermission('deck.edit'), async (req, res) => {
    const { params, body } = parseRequest(req, { params: deckParamsSchema, body: createDraftBodySchema });
    res.status(201).json(await createDraft(ctx, actorOf(req), params.deckId, body.fromVersionId));
  });

  router.get('/:deckId/versions/:versionId', requirePermission('design.read'), async (req, res) => {
    const { params } = parseRequest(req, { params: deckVersionParamsSchema });
    res.json(await versionDetail(teamIdOf(req), params.deckId, params.versionId));
  });

  router.patch('/:deckId/versions/:versionId', requirePermission('deck.edit'), async (req, res) => {
    const { params, body } = parseRequest(req, { params: deckVersionParamsSchema, body: patchVersionBodySchema });
    res.json(await patchDraft(ctx, actorOf(req), params.deckId, params.versionId, body.lockVersion, body.changes));
  });

  router.put('/:deckId/versions/:versionId/content', requirePermission('deck.edit'), async (req, res) => {
    const { params, body } = parseRequest(req, { params: deckVersionParamsSchema, body: replaceContentBodySchema });
    res.json(await replaceDraftContent(ctx, actorOf(req), params.deckId, params.versionId, body.lockVersion, body.content));
  });

  router.delete('/:deckId/versions/:versionId', requirePermission('deck.edit'), async (req, res) => {
    const { params } = parseRequest(req, { params: deckVersionParamsSchema });
    await discardDraft(ctx, actorOf(req), params.deckId, params.versionId);
    res.status(204).end();
  });

  router.post('/:deckId/versions/:versionId/publish', requirePermission('deck.publish'), async (req, res) => {
    const { params, body } = parseRequest(req, { params: deckVersionParamsSchema, body: publishBodySchema });
    res.json(await publishDraft(ctx, actorOf(req), params.deckId, params.versionId, body));
  });

  router.post('/:deckId/versions/:versionId/default', requirePermission('deck.publish'), async (req, res) => {
    const { params } = parseRequest(req, { params: deckVersionParamsSchema });
    res.json(await makeTeamDefault(ctx, actorOf(req), params.deckId, params.versionId));
  });

  router.get('/:deckId/versions/:versionId/export', requirePermission('design.read'), async (req, res) => {
    const { params } = parseRequest(req, { params: deckVersionParamsSchema });
    const { fileName, text } = await exportVersion(teamIdOf(req), params.deckId, params.versionId);
    res.type('application/json').attachment(fileName).send(text);
  });

  router.post('/:deckId/versions/:versionId/preview', requirePermission('deck.edit'), async (req, res) => {
    const { params, body } = parseRequest(req, { params: deckVersionParamsSchema, body: previewBodySchema });
    res.json(await previewVersion(ctx, teamIdOf(req), params.deckId, params.versionId, body));
  });

  return router;
}

export function ruleCatalogueRoutes(): Router {
  const router = Router();
  router.get('/', requirePermission('design.read'), (_req, res) => {
    res.json({ items: ruleCatalogue() });
  });
  return router;
}
