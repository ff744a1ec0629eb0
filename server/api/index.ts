// The API's router registry: every feature mounts its router here, under /api.
//
// Pattern for a new capability (runs, decks, waivers, …):
//   1. shared/api/<feature>.ts   zod schemas of its bodies, queries and responses;
//   2. server/services/<feature>.ts   the business logic, over server/db/models;
//   3. server/api/routes/<feature>.ts   thin handlers: parseRequest → requirePermission → service → JSON;
//   4. one line below, and its routes appended to tests/api/permissions.test.ts.
// Authentication, the origin check, JSON parsing and error handling are applied
// around this router by server/app.ts; a route only declares its permission.

import { Router } from 'express';
import type { AppContext } from '../context';
import { adminRoutes } from './routes/admin';
import { auditRoutes } from './routes/audit';
import { authRoutes } from './routes/auth';
import { blockRoutes } from './routes/blocks';
import { deckRoutes, ruleCatalogueRoutes } from './routes/decks';
import { healthRoutes } from './routes/health';
import { runReportRoutes } from './routes/reports';
import { runRoutes } from './routes/runs';
import { tokenRoutes } from './routes/tokens';
import { uploadRoutes } from './routes/uploads';
import { waiverRoutes } from './routes/waivers';

export function apiRouter(ctx: AppContext): Router {
  const api = Router();
  api.use('/health', healthRoutes(ctx));
  api.use('/auth', authRoutes(ctx));
  api.use('/admin', adminRoutes(ctx));
  api.use('/blocks', blockRoutes(ctx));
  api.use('/audit', auditRoutes());
  api.use('/decks', deckRoutes(ctx));
  api.use('/rules', ruleCatalogueRoutes());
  api.use('/uploads', uploadRoutes(ctx));
  api.use('/runs', runRoutes(ctx));
  api.use('/runs', runReportRoutes(ctx));
  api.use('/waivers', waiverRoutes(ctx));
  api.use('/tokens', tokenRoutes(ctx));
  return api;
}
