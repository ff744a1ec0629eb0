// Sign-in throttling on the real Redis (express-rate-limit + rate-limit-redis), so
// every server process shares the counts. Two limits: failed attempts per IP and
// e-mail (guessing one account's password) and all attempts per IP (spraying many).

import type { RequestHandler } from 'express';
import { ipKeyGenerator, rateLimit } from 'express-rate-limit';
import { RedisStore, type RedisReply } from 'rate-limit-redis';
import type { AppContext } from '../../context';
import { errorBody } from '../http';

function store(ctx: AppContext, name: string): RedisStore {
  return new RedisStore({
    prefix: `${ctx.config.redisPrefix}rate:${name}:`,
    sendCommand: (command: string, ...args: string[]) => ctx.redis.call(command, ...args) as Promise<RedisReply>,
  });
}

const limited: RequestHandler = (_req, res) => {
  res.status(429).json(errorBody('rate-limited', 'Too many sign-in attempts. Wait a few minutes and try again.'));
};

export function loginRateLimit(ctx: AppContext): RequestHandler[] {
  const { perEmail, perIp, windowSeconds } = ctx.config.loginRateLimit;
  const ip = (req: Parameters<RequestHandler>[0]) => ipKeyGenerator(req.ip ?? 'unknown');
  return [
    rateLimit({
      windowMs: windowSeconds * 1000,
      limit: perIp,
      standardHeaders: 'draft-8',
      legacyHeaders: false,
      keyGenerator: ip,
      handler: limited,
      store: store(ctx, 'login-ip'),
    }),
    rateLimit({
      windowMs: windowSeconds * 1000,
      limit: perEmail,
      standardHeaders: 'draft-8',
      legacyHeaders: false,
      // Only failures count: a user who signs in often is never locked out by it.
      skipSuccessfulRequests: true,
      keyGenerator: (req) => `${ip(req)}|${String((req.body as { email?: unknown })?.email ?? '').trim().toLowerCase()}`,
      handler: limited,
      store: store(ctx, 'login-email'),
    }),
  ];
}

/** Password-reset requests send mail: limit them per IP and e-mail too. */
export function resetRateLimit(ctx: AppContext): RequestHandler {
  const { perEmail, windowSeconds } = ctx.config.loginRateLimit;
  return rateLimit({
    windowMs: windowSeconds * 1000,
    limit: perEmail,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) =>
      `${ipKeyGenerator(req.ip ?? 'unknown')}|${String((req.body as { email?: unknown })?.email ?? '').trim().toLowerCase()}`,
    handler: (_req, res) => {
      res.status(429).json(errorBody('rate-limited', 'Too many requests for this address. Wait a few minutes and try again.'));
    },
    store: store(ctx, 'reset'),
  });
}
