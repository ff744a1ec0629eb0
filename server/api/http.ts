// The small toolkit every route uses: typed input parsing through zod, one error
// type that becomes the one JSON error shape (shared/api/common.ts), and the
// handlers for unknown routes and thrown errors.

import type { ErrorRequestHandler, Request, RequestHandler } from 'express';
import { z } from 'zod';
import type { ApiError } from '../../shared/api/common';
import { HttpError } from '../errors';

export { conflict, forbidden, HttpError, notFound, unauthenticated } from '../errors';

interface Schemas {
  body?: z.ZodType;
  query?: z.ZodType;
  params?: z.ZodType;
}

type Parsed<S extends Schemas> = {
  [K in keyof S]: S[K] extends z.ZodType ? z.output<S[K]> : never;
};

/**
 * Validate a request's body, query and route parameters. Every route reads its
 * input through this and nothing else; a failure is a 400 `validation` error with
 * one detail per offending field.
 */
export function parseRequest<S extends Schemas>(req: Request, schemas: S): Parsed<S> {
  const out: Record<string, unknown> = {};
  const details: { path: string; message: string }[] = [];
  for (const part of ['params', 'query', 'body'] as const) {
    const schema = schemas[part];
    if (!schema) continue;
    const input = part === 'body' ? (req.body ?? {}) : req[part];
    const result = schema.safeParse(input);
    if (result.success) out[part] = result.data;
    else {
      for (const issue of result.error.issues) {
        details.push({ path: [part, ...issue.path.map(String)].join('.'), message: issue.message });
      }
    }
  }
  if (details.length) throw new HttpError(400, 'validation', 'The request is not valid.', details);
  return out as Parsed<S>;
}

export function errorBody(code: string, message: string, details?: { path: string; message: string }[]): ApiError {
  return { error: details ? { code, message, details } : { code, message } };
}

export const apiNotFound: RequestHandler = (req, res) => {
  res.status(404).json(errorBody('not-found', `No API route ${req.method} ${req.baseUrl}${req.path}.`));
};

/** Turns anything thrown into the JSON error shape. Never sends a stack trace or an internal message. */
export const errorHandler: ErrorRequestHandler = (err, req, res, next) => {
  if (res.headersSent) return next(err);
  if (err instanceof HttpError) {
    res.status(err.status).json(errorBody(err.code, err.message, err.details));
    return;
  }
  const e = err as { type?: string; status?: number; expose?: boolean };
  if (e.type === 'entity.parse.failed') {
    res.status(400).json(errorBody('validation', 'The request body is not valid JSON.'));
    return;
  }
  if (e.type === 'entity.too.large' || e.status === 413) {
    res.status(413).json(errorBody('payload-too-large', 'The request body is too large.'));
    return;
  }
  if (typeof e.status === 'number' && e.status >= 400 && e.status < 500) {
    const code = e.status === 404 ? 'not-found' : e.status === 415 ? 'unsupported-media-type' : 'bad-request';
    res.status(e.status).json(errorBody(code, e.status === 404 ? 'Not found.' : 'The request could not be read.'));
    return;
  }
  if (isUnavailable(err)) {
    res.status(503).json(errorBody('unavailable', 'A service Keepwell depends on is not answering. Try again shortly.'));
    return;
  }
  console.error(`error: ${req.method} ${req.originalUrl.split('?')[0]}:`, err);
  res.status(500).json(errorBody('internal', 'Something went wrong on the server.'));
};

function isUnavailable(err: unknown): boolean {
  const name = (err as { name?: string })?.name ?? '';
  const code = (err as { code?: string; original?: { code?: string } })?.code ?? (err as { original?: { code?: string } })?.original?.code;
  return (
    name === 'SequelizeConnectionError' ||
    name === 'SequelizeConnectionRefusedError' ||
    name === 'SequelizeConnectionAcquireTimeoutError' ||
    name === 'MaxRetriesPerRequestError' ||
    code === 'ECONNREFUSED' ||
    code === '57P01' // admin_shutdown: the server is restarting
  );
}
