// Helpers of the run and worker tests: real worker processes (child_process, the
// same entry as `npm run worker`) pointed at the test database and the test's own
// queue prefix, netlists made in code for an invented block, and waiting on runs.

import { spawn, type ChildProcess } from 'node:child_process';
import path from 'node:path';
import type request from 'supertest';
import { QueryTypes } from 'sequelize';
import { repoRoot, type Config } from '../../server/config';
import { Block, RuleDeck, RuleDeckVersion, type Team } from '../../server/db/models';
import { defaultDeck } from '../../rules/default-deck';
import type { RunView } from '../../shared/api/runs';
import type { TestEnv } from './helpers';

export interface WorkerProcess {
  child: ChildProcess;
  /** Everything the process printed so far. */
  output(): string;
  /** Resolves once the worker says it is ready. */
  ready: Promise<void>;
  /** SIGTERM, then SIGKILL after a grace period; resolves when the process is gone. */
  stop(): Promise<void>;
  /** SIGKILL, as a crash or an out-of-memory kill would. */
  kill(): Promise<void>;
  exited: Promise<number | null>;
}

/** Environment a worker needs to share the test's database, Redis, prefix and public URL. */
export function workerEnvironment(env: { config: Config }, extra: Record<string, string> = {}): NodeJS.ProcessEnv {
  const c = env.config;
  return {
    PATH: process.env.PATH,
    HOME: process.env.HOME,
    NODE_ENV: 'test',
    DATABASE_URL: c.databaseUrl,
    REDIS_URL: c.redisUrl,
    KEEPWELL_REDIS_PREFIX: c.redisPrefix,
    PUBLIC_URL: c.publicUrl,
    KEEPWELL_SECRET: c.secret,
    KEEPWELL_FAKE_SMTP: 'false',
    SMTP_HOST: c.smtp.host,
    SMTP_PORT: String(c.smtp.port),
    KEEPWELL_DB_POOL_MAX: '4',
    KEEPWELL_WORKER_CONCURRENCY: '1',
    // Fast takeover of a killed worker's job and fast reconciliation, for tests that wait on them.
    KEEPWELL_JOB_LOCK_MS: '3000',
    KEEPWELL_STALLED_CHECK_MS: '1000',
    KEEPWELL_RUN_BACKOFF_MS: '200',
    KEEPWELL_RECONCILE_SECONDS: '1',
    KEEPWELL_RECONCILE_GRACE_SECONDS: '1',
    KEEPWELL_PROGRESS_MS: '100',
    ...extra,
  };
}

export function startWorker(env: { config: Config }, extra: Record<string, string> = {}): WorkerProcess {
  // node --import tsx, not the tsx wrapper: the pid is the worker's own, so a SIGKILL reaches it.
  const child = spawn(process.execPath, ['--import', 'tsx', path.join(repoRoot, 'server', 'worker', 'main.ts')], {
    cwd: repoRoot,
    env: workerEnvironment(env, extra),
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  let out = '';
  child.stdout!.on('data', (d) => (out += d));
  child.stderr!.on('data', (d) => (out += d));
  const exited = new Promise<number | null>((resolve) => child.once('exit', (code) => resolve(code)));
  const ready = new Promise<void>((resolve, reject) => {
    const timer = setInterval(() => {
      if (out.includes('worker: ready')) {
        clearInterval(timer);
        resolve();
      }
    }, 50);
    void exited.then((code) => {
      clearInterval(timer);
      reject(new Error(`worker exited (${code}) before it was ready:\n${out}`));
    });
  });
  ready.catch(() => {});
  const gone = () => child.exitCode !== null || child.signalCode !== null;
  return {
    child,
    output: () => out,
    ready,
    exited,
    async kill() {
      if (!gone()) child.kill('SIGKILL');
      await exited;
    },
    async stop() {
      if (gone()) return;
      child.kill('SIGTERM');
      const timer = setTimeout(() => child.kill('SIGKILL'), 15_000);
      await exited;
      clearTimeout(timer);
    },
  };
}

/** A team with a published deck version (the built-in deck) as its default, and a block. */
export async function makeRunTeamSetup(team: Team, blockName = 'lantern-test-block') {
  const deck = await RuleDeck.create({ teamId: team.id, name: `Deck of ${team.name}`, description: '', defaultVersionId: null, teamDefault: true });
  const version = await RuleDeckVersion.create({
    deckId: deck.id,
    version: 1,
    state: 'published',
    content: { ...defaultDeck(), name: deck.name },
    changeNote: 'test',
    createdBy: null,
    publishedBy: null,
    publishedAt: new Date(),
    parentVersionId: null,
  });
  deck.defaultVersionId = version.id;
  await deck.save();
  const block = await Block.create({ teamId: team.id, name: blockName, createdBy: null });
  return { deck, version, block };
}

/**
 * An invented block of `cells` distinct two-input NAND cells (sizes vary so no two
 * cells are alike), each instantiated once under a top cell. Every cell whose index
 * is in `oversized` gets one pull-down 2 mm wide: the device.implausible-size rule of
 * the built-in deck flags widths above 1 mm, once per cell (its parameter default,
 * a rule of thumb the rule states). So the design has exactly `oversized.length`
 * such findings, whatever else the deck finds.
 */
export function nandBlock(cells: number, oversized: (i: number) => boolean = (i) => i % 3 === 0, prefix = 'lnand'): string {
  const lines = ['* Lantern test block: NAND cells generated for the run tests'];
  for (let i = 0; i < cells; i++) {
    const wp = (0.5 + (i % 37) * 0.05).toFixed(3);
    const wn = (0.4 + (i % 53) * 0.03).toFixed(3);
    const pulldown = oversized(i) ? '2000' : wn;
    lines.push(
      `.subckt ${prefix}${i} a b y vdd vss`,
      `mp1 y a vdd vdd pch w=${wp}u l=0.25u`,
      `mp2 y b vdd vdd pch w=${wp}u l=0.25u`,
      `mn1 y a n1 vss nch w=${pulldown}u l=0.25u`,
      `mn2 n1 b vss vss nch w=${wn}u l=0.25u`,
      '.ends',
    );
  }
  lines.push(`.subckt ${prefix}_top a b vdd vss`);
  for (let i = 0; i < cells; i++) lines.push(`x${i} a b y${i} vdd vss ${prefix}${i}`);
  lines.push('.ends');
  return lines.join('\n') + '\n';
}

export function countOversized(cells: number, oversized: (i: number) => boolean = (i) => i % 3 === 0): number {
  let n = 0;
  for (let i = 0; i < cells; i++) if (oversized(i)) n++;
  return n;
}

export async function getRun(agent: request.Agent, id: string): Promise<RunView> {
  const res = await agent.get(`/api/runs/${id}`);
  if (res.status !== 200) throw new Error(`GET run ${id}: ${res.status} ${JSON.stringify(res.body)}`);
  return res.body as RunView;
}

/** Poll a run until `done(run)` holds; every state seen, in order, is recorded in `seen`. */
export async function waitForRun(
  agent: request.Agent,
  id: string,
  done: (run: RunView) => boolean = (r) => ['succeeded', 'failed', 'cancelled'].includes(r.state),
  options: { timeoutMs?: number; seen?: string[]; intervalMs?: number; describe?: () => string } = {},
): Promise<RunView> {
  const deadline = Date.now() + (options.timeoutMs ?? 60_000);
  for (;;) {
    const run = await getRun(agent, id);
    if (options.seen && options.seen[options.seen.length - 1] !== run.state) options.seen.push(run.state);
    if (done(run)) return run;
    if (Date.now() > deadline) throw new Error(`run ${id} still ${run.state} (${JSON.stringify(run.progress)})${options.describe ? `\n${options.describe()}` : ''}`);
    await new Promise((r) => setTimeout(r, options.intervalMs ?? 150));
  }
}

/** Submit a run by uploading files (name → text or bytes). */
export function submitUpload(agent: request.Agent, blockId: string, files: Record<string, string | Buffer>, fields: Record<string, string> = {}): request.Test {
  let req = agent.post('/api/runs').field('blockId', blockId);
  for (const [k, v] of Object.entries(fields)) req = req.field(k, v);
  for (const [name, content] of Object.entries(files)) req = req.attach('files', Buffer.isBuffer(content) ? content : Buffer.from(content), name);
  return req;
}

export interface ExecutionRow {
  run_id: string;
  kind: string;
  job_id: string;
  worker: string;
  outcome: string | null;
}

export async function executionsOf(env: TestEnv, runIds: string[]): Promise<ExecutionRow[]> {
  return env.ctx.sequelize.query<ExecutionRow>(
    `select run_id, kind, job_id, worker, outcome from run_attempts where run_id in (:runIds) order by id`,
    { replacements: { runIds }, type: QueryTypes.SELECT },
  );
}

export async function storedFindings(env: TestEnv, runId: string) {
  return env.ctx.sequelize.query<{ fingerprint: string; rule_id: string; cell: string; instances: number }>(
    'select fingerprint, rule_id, cell, instances from findings where run_id = :runId',
    { replacements: { runId }, type: QueryTypes.SELECT },
  );
}
