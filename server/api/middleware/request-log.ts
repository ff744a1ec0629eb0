// One line per API request: time, method, path (no query string, which may carry
// search terms), status, duration and the caller's user id. Never bodies or headers.

import type { RequestHandler } from 'express';

export function requestLog(write: (line: string) => void = (line) => process.stdout.write(line + '\n')): RequestHandler {
  return (req, res, next) => {
    const started = process.hrtime.bigint();
    res.on('finish', () => {
      const ms = Number(process.hrtime.bigint() - started) / 1e6;
      const path = req.originalUrl.split('?')[0];
      write(`${new Date().toISOString()} ${req.method} ${path} ${res.statusCode} ${ms.toFixed(1)}ms user=${req.auth?.user.id ?? '-'}`);
    });
    next();
  };
}
