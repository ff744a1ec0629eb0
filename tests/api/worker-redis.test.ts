// Redis restarting while runs are queued loses none of them. The worst case is
// tested: a Redis of this test's own (the same redis-server binary the project
// runs, on a free port, without persistence, so the shared one other tests use is
// never disturbed) is killed with SIGKILL and comes back empty, so every job is
// gone; one more run is submitted while it is down. PostgreSQL still holds the runs
// as queued, and the worker's reconciler puts their jobs back.

import { Redis } from 'ioredis';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runQueue } from '../../server/queue';
import { createTeam, signedInAs, startTestEnv, type TestEnv } from './helpers';
import { freePort, PrivateRedis } from './private-redis';
import { executionsOf, makeRunTeamSetup, nandBlock, startWorker, submitUpload, waitForRun, type WorkerProcess } from './runs-helpers';

let redis: PrivateRedis;
let env: TestEnv;
let worker: WorkerProcess | undefined;

beforeAll(async () => {
  redis = new PrivateRedis(await freePort());
  await redis.start();
  env = await startTestEnv({ REDIS_URL: `redis://127.0.0.1:${redis.port}/0` });
});
afterAll(async () => {
  await worker?.stop();
  await env?.close();
  await redis?.dispose();
});

describe('a Redis restart during queued runs', () => {
  it('loses none: the reconciler re-enqueues what PostgreSQL holds as queued', async () => {
    const team = await createTeam();
    const { block } = await makeRunTeamSetup(team);
    const { agent } = await signedInAs(env, team, ['designer']);

    const ids: string[] = [];
    for (let i = 0; i < 4; i++) {
      const res = await submitUpload(agent, block.id, { [`q${i}.sp`]: nandBlock(8 + i, (k) => k <= i, `lq${i}_`) });
      expect(res.status).toBe(201);
      ids.push(res.body.run.id);
    }
    const counts = await runQueue(env.ctx).getJobCounts('wait');
    expect(counts.wait).toBe(4);

    await redis.kill();
    // Submitted while Redis is down: stored as queued all the same.
    const during = await submitUpload(agent, block.id, { 'q4.sp': nandBlock(12, (k) => k <= 4, 'lq4_') });
    expect(during.status, JSON.stringify(during.body)).toBe(201);
    expect(during.body.run.state).toBe('queued');
    ids.push(during.body.run.id);

    await redis.start();
    const probe = new Redis({ port: redis.port, host: '127.0.0.1' });
    expect(await probe.dbsize()).toBe(0);
    probe.disconnect();

    worker = startWorker(env);
    const runs = await Promise.all(ids.map((id) => waitForRun(agent, id, undefined, { timeoutMs: 90_000, describe: worker!.output })));
    expect(runs.map((r) => r.state)).toEqual(Array(5).fill('succeeded'));
    // Run i has cells 0..i oversized: i + 1 implausible-size errors (nandBlock's construction).
    runs.forEach((r, i) => expect(r.summary?.errors).toBe(i + 1));
    expect(worker.output()).toMatch(/reconciler: re-enqueued \d+ run/);
    const executions = await executionsOf(env, ids);
    expect(executions.map((e) => e.outcome)).toEqual(Array(5).fill('succeeded'));
  });
});
