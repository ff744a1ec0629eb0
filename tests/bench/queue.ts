// Queue benchmark, against the project's real PostgreSQL and Redis (a database and a
// key prefix of its own, removed afterwards):
//
//  1. twenty uploads at once, two worker processes: throughput, the slowest run
//     (submitted → finished) and the longest wait for a worker;
//  2. a run holding 100 000 findings, written through the worker's own write path,
//     then paged through the API: median and 95th percentile per request shape,
//     against the 50 ms target.
//
// Run alone with `npx tsx tests/bench/queue.ts`, or from `npm run bench`.

import crypto from 'node:crypto';
import http from 'node:http';
import { pathToFileURL } from 'node:url';
import pg from 'pg';
import { QueryTypes } from 'sequelize';
import request from 'supertest';
import { Redis } from 'ioredis';
import { defaultDeck } from '../../rules/default-deck';
import type { Finding } from '../../shared/findings';
import { createApp } from '../../server/app';
import { loadConfig } from '../../server/config';
import { createContext } from '../../server/context';
import { runMigrations } from '../../server/db/migrate';
import { Block, RuleDeck, RuleDeckVersion, Run, Team, User } from '../../server/db/models';
import { createSequelize } from '../../server/db/sequelize';
import { startServices } from '../../server/dev/services';
import { hashPassword } from '../../server/services/passwords';
import { insertFindings, vacuumFindings } from '../../server/services/runs-store';
import { nandBlock, startWorker, type WorkerProcess } from '../api/runs-helpers';

const RUNS = 20;
const FINDINGS = 100_000;
const TARGET_MS = 50;

function quantile(sorted: number[], q: number): number {
  return sorted[Math.min(sorted.length - 1, Math.floor(q * sorted.length))];
}

/** Findings of an invented register-file block: rules, severities, cells and names spread as a large real run's would be. */
function syntheticFindings(n: number): Finding[] {
  const rules = ['device.implausible-size', 'stage.noise-margin', 'stage.non-regenerative', 'dynamic.keeper', 'dynamic.charge-share', 'net.floating', 'chain.regeneration', 'device.bulk-tie'];
  const severities = ['error', 'warning', 'info'] as const;
  const out: Finding[] = [];
  for (let i = 0; i < n; i++) {
    const cell = `lrf_bit${i % 5000}`;
    const net = `rbl_${i % 997}`;
    out.push({
      ruleId: rules[i % rules.length],
      severity: severities[(i * 7) % 3],
      message: `${net} keeps ${((i % 90) + 5).toFixed(0)} % of its level after the read of word ${i % 64}`,
      file: `lantern_rf/bit${i % 50}.sp`,
      line: 10 + (i % 4000),
      column: 1,
      cell,
      nets: [net, `wl_${i % 64}`],
      devices: [`mn${i % 17}`, `mp${i % 5}`],
      instances: 1 + (i % 384),
      measured: { value: (i % 100) / 100, unit: 'ratio' },
      limit: { value: 0.5, unit: 'ratio' },
      fingerprint: i.toString(16).padStart(14, '0'),
      corner: i % 2 ? 'ss-hot' : 'tt',
      plot: null,
    });
  }
  return out;
}

export async function run(): Promise<void> {
  const base = loadConfig({ ...process.env, NODE_ENV: 'test' });
  await startServices(base);
  const tag = crypto.randomBytes(4).toString('hex');
  const database = `keepwell_bench_${tag}`;
  const admin = new pg.Client({ connectionString: base.databaseUrl });
  await admin.connect();
  await admin.query(`create database ${database}`);
  await admin.end();
  const url = new URL(base.databaseUrl);
  url.pathname = `/${database}`;
  const databaseUrl = url.toString();
  const migrator = createSequelize({ databaseUrl, dbPoolMax: 2 });
  await runMigrations(migrator, databaseUrl);
  await migrator.close();

  const redisPrefix = `keepwell-bench-${tag}:`;
  const config = loadConfig({
    ...process.env,
    NODE_ENV: 'test',
    DATABASE_URL: databaseUrl,
    KEEPWELL_REDIS_PREFIX: redisPrefix,
    KEEPWELL_LOG_REQUESTS: 'false',
    KEEPWELL_FAKE_SMTP: 'false',
    KEEPWELL_DB_POOL_MAX: '10',
    PUBLIC_URL: 'http://keepwell.bench',
  });
  const ctx = createContext(config, { startOutbox: false });
  const server = http.createServer(createApp(ctx));
  await new Promise<void>((r) => server.listen(0, '127.0.0.1', r));
  const workers: WorkerProcess[] = [];
  try {
    const team = await Team.create({ name: `Bench ${tag}` });
    const deck = await RuleDeck.create({ teamId: team.id, name: 'Bench deck', description: '', defaultVersionId: null, teamDefault: true });
    const version = await RuleDeckVersion.create({
      deckId: deck.id, version: 1, state: 'published', content: defaultDeck(), changeNote: 'bench', createdBy: null, publishedBy: null, publishedAt: new Date(), parentVersionId: null,
    });
    deck.defaultVersionId = version.id;
    await deck.save();
    const block = await Block.create({ teamId: team.id, name: 'lantern-bench', createdBy: null });
    const password = crypto.randomBytes(12).toString('base64url');
    const user = await User.create({ email: `bench.${tag}@keepwell.test`, name: 'Bench', roles: ['designer'], teamId: team.id, passwordHash: await hashPassword(password), lastSignInAt: null });
    const agent = request.agent(server).set('Origin', config.publicUrl);
    await agent.post('/api/auth/login').send({ email: user.email, password }).expect(200);

    // ------------------------------------------------ 1. twenty uploads, two workers
    for (const name of ['bench-a', 'bench-b']) workers.push(startWorker({ config }, { KEEPWELL_WORKER_NAME: name, KEEPWELL_RECONCILE_SECONDS: '30', KEEPWELL_RECONCILE_GRACE_SECONDS: '20' }));
    await Promise.all(workers.map((w) => w.ready));
    const started = performance.now();
    const submitted = await Promise.all(
      Array.from({ length: RUNS }, (_, i) =>
        agent.post('/api/runs').field('blockId', block.id).attach('files', Buffer.from(nandBlock(150 + 5 * i, (k) => k % 4 === 0, `lb${i}_`)), `slice${i}.sp`).expect(201),
      ),
    );
    const ids = submitted.map((r) => r.body.run.id as string);
    for (;;) {
      const [{ open }] = await ctx.sequelize.query<{ open: number }>(
        `select cast(count(*) as integer) as open from runs where id in (:ids) and state in ('queued', 'running')`,
        { replacements: { ids }, type: QueryTypes.SELECT },
      );
      if (open === 0) break;
      await new Promise((r) => setTimeout(r, 100));
    }
    const wall = (performance.now() - started) / 1000;
    const timings = await ctx.sequelize.query<{ state: string; total: number; wait: number }>(
      `select state, extract(epoch from finished_at - created_at) * 1000 as total, extract(epoch from started_at - created_at) * 1000 as wait
       from runs where id in (:ids)`,
      { replacements: { ids }, type: QueryTypes.SELECT },
    );
    const failed = timings.filter((t) => t.state !== 'succeeded').length;
    const perWorker = await ctx.sequelize.query<{ worker: string; n: number }>(
      `select worker, cast(count(*) as integer) as n from run_attempts where run_id in (:ids) group by worker order by worker`,
      { replacements: { ids }, type: QueryTypes.SELECT },
    );
    console.log(`queue: ${RUNS} uploads at once (NAND blocks of 150–245 cells), 2 workers × 1 thread`);
    console.log(`  all finished in ${wall.toFixed(1)} s: ${(RUNS / wall).toFixed(2)} runs/s${failed ? `, ${failed} NOT succeeded` : ''}`);
    console.log(`  slowest run ${(Math.max(...timings.map((t) => Number(t.total))) / 1000).toFixed(1)} s submitted → finished; longest wait for a worker ${(Math.max(...timings.map((t) => Number(t.wait))) / 1000).toFixed(1)} s`);
    console.log(`  executions per worker: ${perWorker.map((p) => `${p.worker} ${p.n}`).join(', ')}`);
    await Promise.all(workers.splice(0).map((w) => w.stop()));

    // ------------------------------------------------ 2. paging 100 000 findings
    const big = await Run.create({
      teamId: team.id, blockId: block.id, netlistId: submitted[0].body.run.netlistId, deckVersionId: version.id, submittedBy: user.id,
      state: 'succeeded', progress: null, error: null, summary: null, startedAt: new Date(), finishedAt: new Date(),
    });
    const findings = syntheticFindings(FINDINGS);
    // The summary the worker writes with a run's findings (server/services/runs-store.ts finishRun).
    const count = (sev: string) => findings.filter((f) => f.severity === sev).length;
    big.summary = { cells: 5000, devices: 0, instances: 0, parseErrors: 0, errors: count('error'), warnings: count('warning'), infos: count('info'), elapsedMs: 0 };
    await big.save();
    const writeStart = performance.now();
    await ctx.sequelize.transaction((transaction) => insertFindings(ctx, big.id, findings, transaction));
    const writeMs = performance.now() - writeStart;
    // As the worker does after writing a run (server/worker/jobs.ts), plus the statistics autovacuum would gather.
    await vacuumFindings(ctx);
    await ctx.sequelize.query('analyze findings');
    console.log(`queue: ${FINDINGS.toLocaleString('en')} findings written in one transaction in ${(writeMs / 1000).toFixed(1)} s`);

    const lastPage = Math.ceil(FINDINGS / 50);
    const shapes: [string, Record<string, string | number>][] = [
      ['first page, by severity', {}],
      ['middle page (1000), by severity', { page: 1000 }],
      [`last page (${lastPage}), by severity`, { page: lastPage }],
      ['first page, by location, descending', { sort: 'location', order: 'desc' }],
      ['page 500, by rule', { sort: 'rule', page: 500 }],
      ['page 100, by cell', { sort: 'cell', page: 100 }],
      ['page 10, by instances, descending', { sort: 'instances', order: 'desc', page: 10 }],
      ['severity = error, page 200', { severity: 'error', page: 200 }],
      ['one rule, page 50', { rule: 'dynamic.keeper', page: 50 }],
      ['one cell', { cell: 'lrf_bit417' }],
      ['text search "rbl_417"', { q: 'rbl_417' }],
      ['status = open, page 20', { status: 'open', page: 20 }],
    ];
    console.log(`queue: paging ${FINDINGS.toLocaleString('en')} findings at the API, 50 per page, 20 requests each (target ${TARGET_MS} ms)`);
    for (const [label, query] of shapes) {
      const times: number[] = [];
      let total = 0;
      for (let i = 0; i < 22; i++) {
        const t0 = performance.now();
        const res = await agent.get(`/api/runs/${big.id}/findings`).query({ pageSize: 50, ...query }).expect(200);
        if (i >= 2) times.push(performance.now() - t0); // the first two warm the caches
        total = res.body.total;
      }
      times.sort((a, b) => a - b);
      const p95 = quantile(times, 0.95);
      console.log(`  ${label.padEnd(40)} median ${quantile(times, 0.5).toFixed(1).padStart(5)} ms, p95 ${p95.toFixed(1).padStart(5)} ms  (${total} match)${p95 > TARGET_MS ? '  OVER TARGET' : ''}`);
    }
  } finally {
    await Promise.all(workers.map((w) => w.stop()));
    server.closeAllConnections();
    await new Promise((r) => server.close(r));
    await ctx.close();
    const cleanup = new pg.Client({ connectionString: base.databaseUrl });
    await cleanup.connect();
    await cleanup.query(`drop database if exists ${database} with (force)`);
    await cleanup.end();
    const redis = new Redis(config.redisUrl, { maxRetriesPerRequest: 1 });
    let cursor = '0';
    do {
      const [next, keys] = await redis.scan(cursor, 'MATCH', `${redisPrefix}*`, 'COUNT', 500);
      if (keys.length) await redis.del(...keys);
      cursor = next;
    } while (cursor !== '0');
    redis.disconnect();
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  run().then(
    () => process.exit(0),
    (err) => {
      console.error(err);
      process.exit(1);
    },
  );
}
