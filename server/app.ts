// The Express application: /api (logging, JSON, origin check, authentication, the
// router registry, JSON 404 and errors) and, when built, the client with SPA fallback.

import fs from 'node:fs';
import path from 'node:path';
import express, { type Express } from 'express';
import type { AppContext } from './context';
import { apiRouter } from './api';
import { apiNotFound, errorHandler } from './api/http';
import { authenticate } from './api/middleware/auth';
import { originCheck } from './api/middleware/origin';
import { requestLog } from './api/middleware/request-log';

export interface AppOptions {
  /** Folder of the built client (dist/client); omitted, only /api is served. */
  clientDir?: string;
  /** Where request-log lines go when KEEPWELL_LOG_REQUESTS is on (stdout by default). */
  logLine?: (line: string) => void;
}

export function createApp(ctx: AppContext, options: AppOptions = {}): Express {
  const { config } = ctx;
  const app = express();
  app.set('trust proxy', config.trustProxy);
  app.disable('x-powered-by');
  app.use((_req, res, next) => {
    res.setHeader('X-Content-Type-Options', 'nosniff');
    res.setHeader('Referrer-Policy', 'same-origin');
    res.setHeader('X-Frame-Options', 'DENY');
    if (config.isProduction) res.setHeader('Strict-Transport-Security', 'max-age=31536000');
    next();
  });

  const api = express.Router();
  if (config.logRequests) api.use(requestLog(options.logLine));
  api.use((_req, res, next) => {
    res.setHeader('Cache-Control', 'no-store');
    next();
  });
  api.use(express.json({ limit: config.jsonLimit }));
  api.use(originCheck(config));
  api.use(authenticate(ctx));
  api.use(apiRouter(ctx));
  api.use(apiNotFound);
  api.use(errorHandler);
  app.use('/api', api);

  if (options.clientDir && fs.existsSync(path.join(options.clientDir, 'index.html'))) serveClient(app, options.clientDir);

  app.use(errorHandler);
  return app;
}

function serveClient(app: Express, dir: string): void {
  const indexHtml = path.join(dir, 'index.html');
  // Vite names bundled assets by content hash: they never change, so cache them for a year.
  app.use(
    '/assets',
    express.static(path.join(dir, 'assets'), { immutable: true, maxAge: '365d', index: false, fallthrough: false }),
  );
  app.use(express.static(dir, { index: false, maxAge: 0, setHeaders: (res) => res.setHeader('Cache-Control', 'no-cache') }));
  // Client-side routes (/blocks/…, /reset-password?token=…) all load the one page.
  app.get(/^(?!\/api(?:\/|$)).*/, (req, res, next) => {
    if (!req.accepts('html')) return next();
    res.setHeader('Cache-Control', 'no-cache');
    res.sendFile(indexHtml);
  });
}
