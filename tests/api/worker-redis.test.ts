// Redis restarting while runs are queued loses none of them. The worst case is
// tested: a Redis of this test's own (the same redis-server binary the project
// runs, on a free port, without persistence, so the shared one other tests use is
// never disturbed) is killed with SIGKILL and comes back empty, so every job is
// gone; one more run is submitted while it is down. PostgreSQL still holds the runs
// as queued, and the worker's reconciler puts their jobs back.

import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import net from 'node:net';
import os from 'node:os';
import path from 'node:path';
import { Redis } from 'ioredis';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { runQueue } from '../../server/queue';
import { createTeam, signedInAs, startTestEnv, type TestEnv } from './helpers';
import { executionsOf, makeRunTeamSetup, nandBlock, startWorker, submitUpload, waitForRun, type WorkerProcess } from './runs-helpers';

function redisBinary(): string {
  for (const candidate of ['/usr/bin/redis-server', '/usr/local/bin/redis-server']) if (fs.existsSync(candidate)) return candidate;
  const found = spawnSync('sh', ['-c', 'command -v redis-server'], { encoding: 'utf8' }).stdout.trim();
  if (!found) throw new Error('redis-server is not installed (server/dev/services.ts installs it on npm start and npm test)');
  return found;
}

async function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const server = net.createServer().listen(0, '127.0.0.1', () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

class PrivateRedis {
  private child?: ChildProcess;
  readonly dir = fs.mkdtempSync(path.join(os.tmpdir(), 'keepwell-redis-'));
  constructor(readonly port: number) {}

  async start(): Promise<void> {
    this.child = spawn(redisBinary(), ['--port', String(this.port), '--bind', '127.0.0.1', '--save', '', '--appendonly', 'no', '--dir', this.dir], { stdio: 'ignore' });
    const deadline = Date.now() + 10_000;
    for (;;) {
      const client = new Redis({ port: this.port, host: '127.0.0.1', lazyConnect: true, maxRetriesPerRequest: 0, retryStrategy: () => null });
      client.on('error', () => {});
      try {
        await client.connect();
        if ((await client.ping()) === 'PONG') return;
      } catch {
        if (Date.now() > deadline) throw new Error(`private Redis on ${this.port} did not start`);
        await new Promise((r) => setTimeout(r, 100));
      } finally {
        client.disconnect();
      }
    }
  }

  async kill(): Promise<void> {
    const child = this.child;
    if (!child || child.exitCode !== null || child.signalCode !== null) return;
    const gone = new Promise((r) => child.once('exit', r));
    child.kill('SIGKILL');
    await gone;
  }

  async dispose(): Promise<void> {
    await this.kill();
    fs.rmSync(this.dir, { recursive: true, force: true });
  }
}

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
