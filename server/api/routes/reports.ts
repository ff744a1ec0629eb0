// A finished run's hand-off, under /api/runs/:id: the review report (JSON for the
// printable page, PDF), the CSV of its findings and its SARIF 2.1.0 log. Mounted
// beside the runs router; every route reads, so design.read guards them all (a
// read-scoped API token reaches them too).

import { Router, type Response } from 'express';
import { idParamSchema } from '../../../shared/api/common';
import type { AppContext } from '../../context';
import { findingsCsv, reviewReport, runSarif } from '../../services/reports';
import { reviewReportPdf } from '../../services/reports-pdf';
import { parseRequest } from '../http';
import { requirePermission, teamIdOf } from '../middleware/auth';

function download(res: Response, type: string, name: string, body: string | Buffer) {
  res.setHeader('Content-Type', type);
  res.setHeader('Content-Disposition', `attachment; filename="${name}"`);
  res.setHeader('X-Content-Type-Options', 'nosniff');
  res.send(body);
}

const safeName = (s: string) => s.replace(/[^A-Za-z0-9._-]+/g, '_').slice(0, 80) || 'run';

export function runReportRoutes(ctx: AppContext): Router {
  const router = Router();

  router.get('/:id/report', requirePermission('design.read'), async (req, res) => {
    const { params } = parseRequest(req, { params: idParamSchema });
    res.json(await reviewReport(ctx, teamIdOf(req), params.id));
  });

  router.get('/:id/report.pdf', requirePermission('design.read'), async (req, res) => {
    const { params } = parseRequest(req, { params: idParamSchema });
    const report = await reviewReport(ctx, teamIdOf(req), params.id);
    download(res, 'application/pdf', `keepwell-review-${safeName(report.run.block.name)}-${params.id.slice(0, 8)}.pdf`, await reviewReportPdf(report));
  });

  router.get('/:id/findings.csv', requirePermission('design.read'), async (req, res) => {
    const { params } = parseRequest(req, { params: idParamSchema });
    // RFC 4180 §3: text/csv with the optional header parameter.
    download(res, 'text/csv; charset=utf-8; header=present', `keepwell-findings-${params.id.slice(0, 8)}.csv`, await findingsCsv(ctx, teamIdOf(req), params.id));
  });

  router.get('/:id/sarif', requirePermission('design.read'), async (req, res) => {
    const { params } = parseRequest(req, { params: idParamSchema });
    download(res, 'application/sarif+json', `keepwell-${params.id.slice(0, 8)}.sarif`, JSON.stringify(await runSarif(ctx, teamIdOf(req), params.id), null, 2));
  });

  return router;
}
