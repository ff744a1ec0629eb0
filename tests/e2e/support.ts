// What every browser journey needs: a Keepwell of its own (the project's PostgreSQL and Redis,
// a fresh database with the demo seed, the client build, the web server and the worker on free
// ports, and optionally a mail catcher in this process so a journey can read what was sent),
// checks that are printed as they pass or fail, and signing in through the page.
//
// tests/run.ts builds the client once and sets KEEPWELL_E2E_CLIENT_BUILT=1, so that journeys
// started by `npm test` do not each build it again.

import { spawn, type ChildProcess } from 'node:child_process';
import crypto from 'node:crypto';
import net from 'node:net';
import path from 'node:path';
import pg from 'pg';
import { Queue } from 'bullmq';
import { Redis } from 'ioredis';
import type { Locator, Page } from 'playwright-core';
import { build } from 'vite';
import { loadConfig, repoRoot } from '../../server/config';
import { runMigrations } from '../../server/db/migrate';
import { initModels } from '../../server/db/models';
import { queuePrefix, RUN_QUEUE } from '../../server/queue';
import { createSequelize } from '../../server/db/sequelize';
import { startServices } from '../../server/dev/services';
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fake-smtp';
import { seedDemo } from '../../server/seed/demo';
import type { GuardedPage } from '../support/browser';

// ------------------------------------------------------------------ checks

/** Checks of one journey: each is printed as it is made; `finish` exits non-zero if any failed. */
export class Checks {
  readonly problems: string[] = [];
  constructor(private readonly name: string) {}

  check(ok: boolean, what: string): boolean {
    console.log(`${ok ? '  ok  ' : '  FAIL'} ${what}`);
    if (!ok) this.problems.push(what);
    return ok;
  }

  say(line: string): void {
    console.log(`${this.name}: ${line}`);
  }

  /** No page errors but the expected 401s of a signed-out session probe, and nothing fetched from outside the machine. */
  clean(g: GuardedPage, step: string): void {
    const errors = g.errors.filter((e) => !(/status of 401/.test(e.text) && /\/api\/auth\/(me|login)$/.test(e.url)));
    this.check(errors.length === 0, `${step}: no page errors${errors.length ? ` (${errors.map((e) => `${e.text} [${e.url}]`).join(' | ')})` : ''}`);
    this.check(g.remoteRequests.length === 0, `${step}: nothing fetched from outside the machine${g.remoteRequests.length ? ` (${g.remoteRequests.join(', ')})` : ''}`);
  }

  finish(): never {
    console.log(this.problems.length ? `\n${this.problems.length} ${this.name} check(s) failed` : `\nAll ${this.name} checks passed`);
    process.exit(this.problems.length ? 1 : 0);
  }
}

// ------------------------------------------------------------------ a Keepwell of its own

export function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const server = net.createServer();
    server.once('error', reject);
    server.listen(0, '127.0.0.1', () => {
      const { port } = server.address() as net.AddressInfo;
      server.close(() => resolve(port));
    });
  });
}

async function waitForHealth(url: string, children: ChildProcess[], timeoutMs = 90_000) {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    const dead = children.find((c) => c.exitCode !== null);
    if (dead) throw new Error(`a Keepwell process exited (code ${dead.exitCode})`);
    try {
      if ((await fetch(`${url}/api/health`)).ok) return;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`no answer from ${url}/api/health within ${timeoutMs / 1000} s`);
}

export interface OwnKeepwell {
  base: string;
  /** The mail catcher the server and worker send to, when asked for. */
  smtp: FakeSmtp | null;
  /**
   * Hold the run queue (BullMQ's global pause: workers take no new job) until the returned
   * function resumes it, so a journey can watch a run that has not started yet on a machine
   * fast enough to finish it before the page shows.
   */
  holdQueue(): Promise<() => Promise<void>>;
  stop(): Promise<void>;
}

/**
 * Start a Keepwell for one journey on a fresh database `keepwell_e2e_<random>` seeded with the demo,
 * and Redis database 2 under a prefix of its own (neither a developer's server, database 0, nor
 * the API tests, database 1, see its keys). `stop` removes the database and the keys.
 */
export async function startKeepwell(label: string, options: { captureMail?: boolean; log?: (line: string) => void } = {}): Promise<OwnKeepwell> {
  const say = options.log ?? ((line: string) => console.log(`${label}: ${line}`));
  const config = loadConfig({ ...process.env, NODE_ENV: 'development' });
  say('starting PostgreSQL and Redis');
  await startServices(config);

  const tag = crypto.randomBytes(4).toString('hex');
  const database = `keepwell_e2e_${tag}`;
  const admin = new pg.Client({ connectionString: config.databaseUrl });
  await admin.connect();
  await admin.query(`create database ${database}`);
  await admin.end();
  const databaseUrl = Object.assign(new URL(config.databaseUrl), { pathname: `/${database}` }).toString();
  const sequelize = createSequelize({ databaseUrl, dbPoolMax: 2 });
  initModels(sequelize);
  try {
    await runMigrations(sequelize, databaseUrl);
    await seedDemo(sequelize);
  } finally {
    await sequelize.close();
  }
  say(`database ${database} migrated and seeded`);

  if (process.env.KEEPWELL_E2E_CLIENT_BUILT !== '1') {
    say('building the client');
    await build({ configFile: path.join(repoRoot, 'vite.config.ts'), logLevel: 'warn' });
  }

  const smtp = options.captureMail ? await startFakeSmtp({ log: true }) : null;
  const port = await freePort();
  const base = `http://127.0.0.1:${port}`;
  const redisUrl = `redis://127.0.0.1:${config.redisPort}/2`;
  const redisPrefix = `keepwell-e2e-${tag}:`;
  const env = {
    ...process.env,
    NODE_ENV: 'development',
    DATABASE_URL: databaseUrl,
    REDIS_URL: redisUrl,
    KEEPWELL_REDIS_PREFIX: redisPrefix,
    KEEPWELL_PORT: String(port),
    PUBLIC_URL: base,
    ...(smtp ? { KEEPWELL_FAKE_SMTP: 'false', SMTP_HOST: smtp.host, SMTP_PORT: String(smtp.port), KEEPWELL_MAIL_RETRY_SECONDS: '0.5' } : { SMTP_PORT: String(await freePort()) }),
    KEEPWELL_DATA_DIR: path.join(repoRoot, 'test-artifacts', label, 'data'),
    KEEPWELL_LOG_REQUESTS: 'false',
    // The seeded runs are queued in PostgreSQL only: the worker's reconciler enqueues them, soon.
    KEEPWELL_RECONCILE_SECONDS: '2',
    KEEPWELL_RECONCILE_GRACE_SECONDS: '1',
    KEEPWELL_PROGRESS_MS: '150',
  };
  const tsx = path.join(repoRoot, 'node_modules', '.bin', 'tsx');
  const children = ['server/main.ts', 'server/worker/main.ts'].map((entry) => spawn(tsx, [entry], { cwd: repoRoot, env, stdio: ['ignore', 'inherit', 'inherit'] }));
  await waitForHealth(base, children);
  say(`Keepwell at ${base}`);

  return {
    base,
    smtp,
    holdQueue: async () => {
      const connection = new Redis(redisUrl, { maxRetriesPerRequest: null });
      const queue = new Queue(RUN_QUEUE, { connection, prefix: queuePrefix({ redisPrefix }) });
      await queue.pause();
      return async () => {
        await queue.resume();
        await queue.close();
        connection.disconnect();
      };
    },
    stop: async () => {
      for (const child of children) if (child.exitCode === null) child.kill('SIGTERM');
      await Promise.all(children.map((c) => (c.exitCode !== null ? null : new Promise((r) => c.once('exit', r)))));
      await smtp?.close();
      const client = new pg.Client({ connectionString: config.databaseUrl });
      await client.connect();
      await client.query(`drop database if exists ${database} with (force)`);
      await client.end();
      const redis = new Redis(redisUrl, { maxRetriesPerRequest: 1 });
      let cursor = '0';
      do {
        const [next, keys] = await redis.scan(cursor, 'MATCH', `${redisPrefix}*`, 'COUNT', 500);
        if (keys.length) await redis.del(...keys);
        cursor = next;
      } while (cursor !== '0');
      redis.disconnect();
    },
  };
}

// ------------------------------------------------------------------ the page

/** Sign in through the sign-in page and wait to leave it. */
export async function signIn(page: Page, user: { email: string; password: string }): Promise<void> {
  const here = page.url();
  if (!here.startsWith('http') || !new URL(here).pathname.startsWith('/sign-in')) await page.goto('/sign-in');
  await page.getByLabel('E-mail address').fill(user.email);
  await page.getByLabel('Password').fill(user.password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'));
}

/** GET through the signed-in page's cookies. */
export async function apiGet<T>(page: Page, url: string): Promise<T> {
  const res = await page.request.get(url);
  if (!res.ok()) throw new Error(`GET ${url}: ${res.status()} ${await res.text()}`);
  return (await res.json()) as T;
}

/** Poll `read` until `done` holds or `timeoutMs` passes; returns the last value read. */
export async function until<T>(read: () => Promise<T>, done: (value: T) => boolean, timeoutMs: number, what: string): Promise<T> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const value = await read();
    if (done(value)) return value;
    if (Date.now() > deadline) throw new Error(`${what}: not within ${timeoutMs / 1000} s`);
    await new Promise((r) => setTimeout(r, 300));
  }
}

/**
 * Line numbers of the rendered lines carrying a decoration class, matched by vertical position
 * to the gutter's numbers. (No helper functions inside: tsx would wrap them in a `__name` the
 * page does not have.)
 */
export async function decoratedLines(editor: Locator, className: string): Promise<number[]> {
  return editor.evaluate((root, cls) => {
    const numbers = new Map<string, number>();
    for (const n of root.querySelectorAll('.margin-view-overlays .line-numbers')) {
      numbers.set((n.closest('.margin-view-overlays > div') as HTMLElement | null)?.style.top ?? '', Number(n.textContent));
    }
    const lines: number[] = [];
    for (const d of root.querySelectorAll(`.view-overlays .${cls}`)) {
      lines.push(numbers.get((d.closest('.view-overlays > div') as HTMLElement | null)?.style.top ?? '') ?? NaN);
    }
    return lines;
  }, className);
}
