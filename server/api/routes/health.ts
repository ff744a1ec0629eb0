// /api/health: whether PostgreSQL and Redis answer. No sign-in needed; says nothing else.

import { Router } from 'express';
import type { AppContext } from '../../context';

function within<T>(promise: Promise<T>, ms: number): Promise<T> {
  return Promise.race([promise, new Promise<T>((_, reject) => setTimeout(() => reject(new Error('timeout')), ms).unref())]);
}

export async function checkHealth(ctx: AppContext): Promise<{ ok: boolean; postgres: boolean; redis: boolean }> {
  const [postgres, redis] = await Promise.all([
    within(ctx.sequelize.query('select 1'), 2000).then(
      () => true,
      () => false,
    ),
    within(ctx.redis.ping(), 2000).then(
      (r) => r === 'PONG',
      () => false,
    ),
  ]);
  return { ok: postgres && redis, postgres, redis };
}

export function healthRoutes(ctx: AppContext): Router {
  const router = Router();
  router.get('/', async (_req, res) => {
    const health = await checkHealth(ctx);
    res.status(health.ok ? 200 : 503).json(health);
  });
  return router;
}
