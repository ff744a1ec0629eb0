// The real services the API runs on. Redis must keep written data across a
// restart (redis.io "Redis persistence": with appendonly yes the append-only file
// is replayed at start), which is what keeps queued jobs; /api/health reports an
// outage and recovers (the brief: GET /api/health → {ok, postgres, redis}).

import { Redis } from 'ioredis';
import { QueryTypes } from 'sequelize';
import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { healthSchema } from '../../shared/api/audit';
import { loadConfig } from '../../server/config';
import { restartRedis, servicesStatus, startPostgres, startServices, stopPostgres, stopRedis, startRedis } from '../../server/dev/services';
import { createTeam, signedInAs, startTestEnv, type TestEnv } from './helpers';

let env: TestEnv;
const serviceConfig = loadConfig({ ...process.env, NODE_ENV: 'test' });

beforeAll(async () => {
  env = await startTestEnv();
});
afterAll(async () => {
  await startPostgres(serviceConfig);
  await startRedis(serviceConfig);
  await env?.close();
});

async function waitUntil(check: () => Promise<boolean>, timeoutMs = 15_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (!(await check())) {
    if (Date.now() > deadline) throw new Error('condition not reached');
    await new Promise((r) => setTimeout(r, 100));
  }
}

describe('local services', () => {
  it('a second start finds both running and listening on loopback only', async () => {
    await startServices(serviceConfig);
    expect(await servicesStatus(serviceConfig)).toEqual({ postgres: true, redis: true });
    const pgSettings = await env.ctx.sequelize.query<{ listen_addresses: string }>('show listen_addresses', { type: QueryTypes.SELECT });
    expect(pgSettings[0].listen_addresses).toBe('127.0.0.1');
    const bind = (await env.ctx.redis.config('GET', 'bind')) as string[];
    expect(bind[1]).toBe('127.0.0.1');
    const aof = (await env.ctx.redis.config('GET', 'appendonly')) as string[];
    expect(aof[1]).toBe('yes');
  });

  it('Redis keeps written keys across a crash (append-only file, not a snapshot)', async () => {
    const key = `${inject('redisPrefix')}durability`;
    const writer = new Redis(inject('redisUrl'));
    await writer.set(key, 'still-here');
    writer.disconnect();
    // appendfsync everysec: the write reaches the disk within about a second. SIGKILL
    // leaves no chance to write a snapshot, so only the append-only file can bring it back.
    await new Promise((r) => setTimeout(r, 1500));
    await restartRedis(serviceConfig, 'kill');
    const reader = new Redis(inject('redisUrl'));
    try {
      expect(await reader.get(key)).toBe('still-here');
    } finally {
      reader.disconnect();
    }
  });

  it('/api/health reports Redis down with 503 and recovers when it is back', async () => {
    const healthy = healthSchema.parse((await env.agent().get('/api/health').expect(200)).body);
    expect(healthy).toEqual({ ok: true, postgres: true, redis: true });
    await stopRedis(serviceConfig);
    try {
      const down = await env.agent().get('/api/health').expect(503);
      expect(down.body).toEqual({ ok: false, postgres: true, redis: false });
    } finally {
      await startRedis(serviceConfig);
    }
    await waitUntil(async () => (await env.agent().get('/api/health')).status === 200);
  });

  it('while PostgreSQL is down the API answers 503 unavailable, and it recovers with the data intact', async () => {
    const team = await createTeam();
    const designer = await signedInAs(env, team, ['designer']);
    await designer.agent.post('/api/blocks').send({ name: 'survives-restart' }).expect(201);
    // "immediate" is PostgreSQL's crash-like stop (pg_ctl docs): no checkpoint, recovery from the WAL at start.
    await stopPostgres(serviceConfig, 'immediate');
    try {
      const health = await env.agent().get('/api/health').expect(503);
      expect(health.body).toEqual({ ok: false, postgres: false, redis: true });
      const res = await designer.agent.get('/api/blocks').expect(503);
      expect(res.body.error.code).toBe('unavailable');
    } finally {
      await startPostgres(serviceConfig);
    }
    await waitUntil(async () => (await designer.agent.get('/api/blocks')).status === 200);
    const list = await designer.agent.get('/api/blocks').expect(200);
    expect(list.body.items.map((b: { name: string }) => b.name)).toEqual(['survives-restart']);
  });
});
