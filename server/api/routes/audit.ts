// /api/audit: the team's audit trail, newest first.

import { Router } from 'express';
import { pageQuerySchema } from '../../../shared/api/common';
import { listAudit } from '../../services/audit';
import { parseRequest } from '../http';
import { requirePermission, teamIdOf } from '../middleware/auth';

export function auditRoutes(): Router {
  const router = Router();
  router.get('/', requirePermission('audit.read'), async (req, res) => {
    const { query } = parseRequest(req, { query: pageQuerySchema });
    res.json(await listAudit(teamIdOf(req), query.page, query.pageSize));
  });
  return router;
}
