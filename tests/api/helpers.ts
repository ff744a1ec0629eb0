// Shared test helpers for the API tests: one test environment per test file (the
// app over the real PostgreSQL and Redis from global-setup.ts, with its own fake
// SMTP server), and quick ways to make teams and users, sign in, and read mail.
//
//   const env = await startTestEnv();             // in beforeAll; env.close() in afterAll
//   const team = await createTeam();
//   const { email, password } = await createUser({ team, roles: ['designer'] });
//   const agent = await signIn(env, email, password);
//   await agent.get('/api/blocks').expect(200);
//   const mail = await env.smtp.waitFor((m) => m.to.includes(email));

import crypto from 'node:crypto';
import http from 'node:http';
import type { AddressInfo } from 'node:net';
import request from 'supertest';
import { inject } from 'vitest';
import type { Role } from '../../shared/roles';
import { createApp } from '../../server/app';
import { loadConfig, type Config } from '../../server/config';
import { createContext, type AppContext } from '../../server/context';
import { Team, User } from '../../server/db/models';
import { startFakeSmtp, type FakeSmtp } from '../../server/mail/fake-smtp';
import { hashPassword } from '../../server/services/passwords';

/** The origin tests browse from; every agent sends it, as a browser would. */
export const PUBLIC_URL = 'http://keepwell.test';

export interface TestEnv {
  ctx: AppContext;
  config: Config;
  smtp: FakeSmtp;
  /** A listening server for the default app. */
  server: http.Server;
  /** A new cookie-keeping client that sends our Origin. */
  agent(server?: http.Server): request.Agent;
  /** The same context served with other settings (cookie flags, limits): `env.serverWith({ NODE_ENV: 'production' })`. */
  serverWith(overrides: Record<string, string>): Promise<http.Server>;
  close(): Promise<void>;
}

function testEnvironment(smtpPort: number, overrides: Record<string, string> = {}): NodeJS.ProcessEnv {
  return {
    NODE_ENV: 'test',
    DATABASE_URL: inject('databaseUrl'),
    REDIS_URL: inject('redisUrl'),
    // Each environment counts its own rate limits.
    KEEPWELL_REDIS_PREFIX: `${inject('redisPrefix')}${crypto.randomBytes(4).toString('hex')}:`,
    PUBLIC_URL,
    KEEPWELL_SECRET: 'test-secret-test-secret-test-secret-0123',
    KEEPWELL_DB_POOL_MAX: '6',
    SMTP_HOST: '127.0.0.1',
    SMTP_PORT: String(smtpPort),
    KEEPWELL_FAKE_SMTP: 'false',
    KEEPWELL_MAIL_RETRY_SECONDS: '0.2',
    KEEPWELL_MAIL_MAX_ATTEMPTS: '3',
    KEEPWELL_SESSION_TTL_SECONDS: '3600',
    KEEPWELL_LOG_REQUESTS: 'false',
    ...overrides,
  };
}

async function listen(app: http.RequestListener): Promise<http.Server> {
  const server = http.createServer(app);
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  return server;
}

export async function startTestEnv(overrides: Record<string, string> = {}): Promise<TestEnv> {
  const smtp = await startFakeSmtp();
  const config = loadConfig(testEnvironment(smtp.port, overrides));
  const ctx = createContext(config, { startOutbox: true });
  const servers: http.Server[] = [];
  const server = await listen(createApp(ctx));
  servers.push(server);
  return {
    ctx,
    config,
    smtp,
    server,
    agent: (s = server) => request.agent(s).set('Origin', PUBLIC_URL),
    async serverWith(more) {
      const other = loadConfig(testEnvironment(smtp.port, { ...overrides, ...more }));
      const s = await listen(createApp({ ...ctx, config: other }));
      servers.push(s);
      return s;
    },
    async close() {
      for (const s of servers) {
        s.closeAllConnections();
        await new Promise((r) => s.close(r));
      }
      await ctx.close();
      await smtp.close();
    },
  };
}

export function serverUrl(server: http.Server): string {
  return `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
}

let counter = 0;
/** An address no other test uses (RFC 2606 reserves .test). */
export function uniqueEmail(label = 'user'): string {
  counter += 1;
  return `${label}.${Date.now().toString(36)}${counter}.${crypto.randomBytes(3).toString('hex')}@keepwell.test`;
}

export async function createTeam(name = `Team ${crypto.randomBytes(4).toString('hex')}`): Promise<Team> {
  return Team.create({ name });
}

export interface CreatedUser {
  user: User;
  email: string;
  password: string;
}

export async function createUser(options: {
  team: Team | null;
  roles: Role[];
  email?: string;
  name?: string;
  password?: string;
  disabled?: boolean;
}): Promise<CreatedUser> {
  const email = options.email ?? uniqueEmail(options.roles.join('-') || 'user');
  const password = options.password ?? `pw-${crypto.randomBytes(9).toString('base64url')}`;
  const user = await User.create({
    email,
    name: options.name ?? `Test ${options.roles.join('/')}`,
    roles: options.roles,
    teamId: options.team?.id ?? null,
    passwordHash: await hashPassword(password),
    disabled: options.disabled ?? false,
    lastSignInAt: null,
  });
  return { user, email, password };
}

/** Sign in through the API and return the agent holding the session cookie. */
export async function signIn(env: TestEnv, email: string, password: string, server?: http.Server): Promise<request.Agent> {
  const agent = env.agent(server);
  const res = await agent.post('/api/auth/login').send({ email, password });
  if (res.status !== 200) throw new Error(`sign-in of ${email} failed: ${res.status} ${JSON.stringify(res.body)}`);
  return agent;
}

/** Create a user with these roles in `team` and sign them in. */
export async function signedInAs(env: TestEnv, team: Team, roles: Role[]) {
  const created = await createUser({ team, roles });
  return { ...created, agent: await signIn(env, created.email, created.password) };
}

/** The value of a Set-Cookie header for `name`, with its attributes, or undefined. */
export function setCookie(res: { headers: Record<string, unknown> }, name: string): string | undefined {
  const raw = res.headers['set-cookie'];
  const list = Array.isArray(raw) ? (raw as string[]) : typeof raw === 'string' ? [raw] : [];
  return list.find((c) => c.startsWith(`${name}=`));
}

/** The `token` query parameter of the first link in `text` that points at `path` under PUBLIC_URL. */
export function tokenFromLink(text: string, path: string): string {
  const match = text.match(new RegExp(`${PUBLIC_URL.replace(/[.]/g, '\\.')}${path}\\?token=([A-Za-z0-9_%-]+)`));
  if (!match) throw new Error(`no ${path} link in:\n${text}`);
  return decodeURIComponent(match[1]);
}
