// Cross-site request forgery defence: a state-changing request must come from a
// page of ours, as its Origin header (or, failing that, Referer) shows. Browsers
// send Origin on every cross-origin request and on same-origin POST, PUT, PATCH
// and DELETE (Fetch standard, "origin" header serialisation), and pages cannot forge it.

import type { RequestHandler } from 'express';
import type { Config } from '../../config';
import { forbidden } from '../http';

const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

function originOf(value: string | undefined): string | undefined {
  if (!value) return undefined;
  try {
    const url = new URL(value);
    return url.origin === 'null' ? undefined : url.origin;
  } catch {
    return undefined;
  }
}

export function originCheck(config: Pick<Config, 'allowedOrigins' | 'isProduction'>): RequestHandler {
  const allowed = new Set(config.allowedOrigins);
  return (req, _res, next) => {
    if (SAFE_METHODS.has(req.method)) return next();
    // A bearer-token client sends no cookies, so there is nothing to forge.
    if (req.headers.authorization?.toLowerCase().startsWith('bearer ')) return next();
    const origin = originOf(req.headers.origin) ?? originOf(req.headers.referer);
    if (origin && allowed.has(origin)) return next();
    // Outside production, also accept the page's own host (localhost vs 127.0.0.1, other ports).
    if (origin && !config.isProduction && new URL(origin).host === req.headers.host) return next();
    throw forbidden('Cross-site request refused: its Origin does not match this Keepwell server.');
  };
}
