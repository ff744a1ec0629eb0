// Sign-in, sessions and the request-level defences, against the real PostgreSQL
// and Redis. The expectations come from the API contract in the brief (status
// codes and error codes), RFC 6265 (cookie attributes), RFC 9110 (status codes),
// RFC 6585 §4 (429 Too Many Requests) and the OWASP Session Management and CSRF
// Prevention cheat sheets (rotate the session id at sign-in; verify Origin).

import { afterAll, beforeAll, describe, expect, inject, it } from 'vitest';
import { apiErrorSchema } from '../../shared/api/common';
import { meResponseSchema } from '../../shared/api/auth';
import { UserSession } from '../../server/db/models';
import { createTeam, createUser, PUBLIC_URL, setCookie, signIn, startTestEnv, type TestEnv } from './helpers';

let env: TestEnv;
const COOKIE = 'keepwell_session';

beforeAll(async () => {
  env = await startTestEnv();
});
afterAll(async () => {
  await env?.close();
});

describe('sign-in and sign-out', () => {
  it('signs in with the right password, returns the user and a session cookie, and /me answers', async () => {
    const team = await createTeam('Ferrow Test Team');
    const { user, email, password } = await createUser({ team, roles: ['designer', 'reviewer'], name: 'Ada Test' });
    const agent = env.agent();
    const res = await agent.post('/api/auth/login').send({ email: email.toUpperCase(), password }).expect(200);
    // Contract: 200 {user} with the shared/api/auth.ts user shape; e-mail matched case-insensitively.
    const body = meResponseSchema.parse(res.body);
    expect(body.user).toEqual({ id: user.id, email, name: 'Ada Test', roles: ['designer', 'reviewer'], teamId: team.id, teamName: 'Ferrow Test Team' });
    expect(setCookie(res, COOKIE)).toBeDefined();

    const me = await agent.get('/api/auth/me').expect(200);
    expect(meResponseSchema.parse(me.body).user.id).toBe(user.id);
  });

  it('answers 401 unauthenticated on /me without a session', async () => {
    const res = await env.agent().get('/api/auth/me').expect(401);
    expect(apiErrorSchema.parse(res.body).error.code).toBe('unauthenticated');
  });

  it('refuses a wrong password, an unknown address and a disabled account alike with 401 invalid-credentials', async () => {
    const team = await createTeam();
    const { email } = await createUser({ team, roles: ['designer'] });
    const disabled = await createUser({ team, roles: ['designer'], disabled: true });
    const attempts = [
      { email, password: 'not-the-password' },
      { email: 'nobody-here@keepwell.test', password: 'whatever-password' },
      { email: disabled.email, password: disabled.password },
    ];
    const messages = new Set<string>();
    for (const attempt of attempts) {
      const res = await env.agent().post('/api/auth/login').send(attempt).expect(401);
      const { error } = apiErrorSchema.parse(res.body);
      expect(error.code).toBe('invalid-credentials');
      messages.add(error.message);
      expect(setCookie(res, COOKIE)).toBeUndefined();
    }
    // OWASP Authentication cheat sheet: one generic answer, so responses do not reveal which accounts exist.
    expect(messages.size).toBe(1);
  });

  it('signs out with 204, deletes the session row and ends access', async () => {
    const team = await createTeam();
    const { user, email, password } = await createUser({ team, roles: ['designer'] });
    const agent = await signIn(env, email, password);
    expect(await UserSession.count({ where: { userId: user.id } })).toBe(1);
    const res = await agent.post('/api/auth/logout').expect(204);
    // RFC 6265 §3.1: a server removes a cookie by sending it again with an expiry in the past.
    const cleared = setCookie(res, COOKIE)!;
    expect(cleared).toMatch(/Expires=Thu, 01 Jan 1970/);
    expect(await UserSession.count({ where: { userId: user.id } })).toBe(0);
    await agent.get('/api/auth/me').expect(401);
  });

  it('rejects a session whose expiry has passed, deletes it and clears the cookie', async () => {
    const team = await createTeam();
    const { user, email, password } = await createUser({ team, roles: ['designer'] });
    const agent = await signIn(env, email, password);
    await agent.get('/api/auth/me').expect(200);
    await UserSession.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { userId: user.id } });
    const res = await agent.get('/api/auth/me').expect(401);
    expect(setCookie(res, COOKIE)).toMatch(/Expires=Thu, 01 Jan 1970/);
    expect(await UserSession.count({ where: { userId: user.id } })).toBe(0);
  });

  it('gives a session the configured lifetime and extends it when used in its second half', async () => {
    const team = await createTeam();
    const { user, email, password } = await createUser({ team, roles: ['designer'] });
    const before = Date.now();
    const agent = await signIn(env, email, password);
    const [session] = await UserSession.findAll({ where: { userId: user.id } });
    const ttlMs = env.config.sessionTtlSeconds * 1000;
    expect(session.expiresAt.getTime()).toBeGreaterThanOrEqual(before + ttlMs - 1000);
    expect(session.expiresAt.getTime()).toBeLessThanOrEqual(Date.now() + ttlMs + 1000);

    // lucia 3 (Session.fresh): a session validated with less than half its lifetime left is extended to a full lifetime.
    await UserSession.update({ expiresAt: new Date(Date.now() + ttlMs / 2 - 60_000) }, { where: { id: session.id } });
    const res = await agent.get('/api/auth/me').expect(200);
    expect(setCookie(res, COOKIE)).toContain(session.id);
    const extended = await UserSession.findByPk(session.id);
    expect(extended!.expiresAt.getTime()).toBeGreaterThan(Date.now() + ttlMs - 5000);
  });

  it('issues a new session id at every sign-in and ends the one the browser brought (no fixation)', async () => {
    const team = await createTeam();
    const { user, email, password } = await createUser({ team, roles: ['designer'] });
    const agent = await signIn(env, email, password);
    const [first] = await UserSession.findAll({ where: { userId: user.id } });

    const res = await agent.post('/api/auth/login').send({ email, password }).expect(200);
    const second = setCookie(res, COOKIE)!.split(';')[0].split('=')[1];
    expect(second).not.toBe(first.id);
    expect(await UserSession.findByPk(first.id)).toBeNull();
    expect(await UserSession.findByPk(second)).not.toBeNull();

    // A session id planted before sign-in (an attacker's) is not adopted.
    const planted = 'planted0session0id0000000000000000000000';
    const fresh = env.agent();
    const signedIn = await fresh.post('/api/auth/login').set('Cookie', `${COOKIE}=${planted}`).send({ email, password }).expect(200);
    expect(setCookie(signedIn, COOKIE)).not.toContain(planted);
  });

  it('a disabled account loses its sessions', async () => {
    const team = await createTeam();
    const { user, email, password } = await createUser({ team, roles: ['designer'] });
    const agent = await signIn(env, email, password);
    await user.update({ disabled: true });
    await agent.get('/api/auth/me').expect(401);
    expect(await UserSession.count({ where: { userId: user.id } })).toBe(0);
  });
});

describe('cookie flags', () => {
  async function loginOn(server: Parameters<TestEnv['agent']>[0], headers: Record<string, string> = {}) {
    const team = await createTeam();
    const { email, password } = await createUser({ team, roles: ['designer'] });
    const res = await env.agent(server).post('/api/auth/login').set(headers).send({ email, password }).expect(200);
    return setCookie(res, COOKIE)!;
  }

  it('is HttpOnly, SameSite=Lax, Path=/ and not Secure over plain HTTP in development', async () => {
    const cookie = await loginOn(env.server);
    // RFC 6265 §4.1.2.5–6 and draft-ietf-httpbis-rfc6265bis §4.1.2.7 attribute spellings.
    expect(cookie).toMatch(/; HttpOnly/);
    expect(cookie).toMatch(/; SameSite=Lax/);
    expect(cookie).toMatch(/; Path=\//);
    expect(cookie).toMatch(/; Expires=/);
    expect(cookie).not.toMatch(/; Secure/);
  });

  it('is Secure when the request came over TLS through a trusted proxy', async () => {
    const proxied = await env.serverWith({ KEEPWELL_TRUST_PROXY: 'loopback' });
    expect(await loginOn(proxied, { 'X-Forwarded-Proto': 'https' })).toMatch(/; Secure/);
    // The same header from an untrusted hop is ignored.
    expect(await loginOn(env.server, { 'X-Forwarded-Proto': 'https' })).not.toMatch(/; Secure/);
  });

  it('is always Secure in production', async () => {
    const production = await env.serverWith({ NODE_ENV: 'production' });
    expect(await loginOn(production)).toMatch(/; Secure/);
  });
});

describe('cross-site request refusal', () => {
  it('refuses a state-changing request whose Origin is another site, or that has none', async () => {
    const team = await createTeam();
    const { email, password } = await createUser({ team, roles: ['designer'] });
    const agent = await signIn(env, email, password);

    const foreign = await agent.post('/api/blocks').set('Origin', 'https://attacker.example').send({ name: 'csrf-block' }).expect(403);
    expect(apiErrorSchema.parse(foreign.body).error.code).toBe('forbidden');
    // A look-alike host that merely starts with ours is another origin (RFC 6454 §5: scheme, host and port compared whole).
    await agent.post('/api/blocks').set('Origin', `${PUBLIC_URL}.attacker.example`).send({ name: 'csrf-block' }).expect(403);
    const bare = await env.agent().post('/api/auth/login').unset('Origin').send({ email, password });
    expect(bare.status).toBe(403);
    // Sign-in is protected too (login CSRF), while reads need no Origin.
    await env.agent().get('/api/health').unset('Origin').expect(200);
    await agent.post('/api/blocks').send({ name: 'same-origin-block' }).expect(201);
  });

  it('accepts the Referer origin when a browser sends no Origin', async () => {
    const team = await createTeam();
    const { email, password } = await createUser({ team, roles: ['designer'] });
    await env.agent().post('/api/auth/login').unset('Origin').set('Referer', `${PUBLIC_URL}/sign-in`).send({ email, password }).expect(200);
  });
});

describe('sign-in rate limit', () => {
  it('answers 429 rate-limited after too many failures for one address, even with the right password', async () => {
    const limited = await env.serverWith({ KEEPWELL_LOGIN_MAX_PER_EMAIL: '3', KEEPWELL_LOGIN_MAX_PER_IP: '50' });
    const team = await createTeam();
    const { email, password } = await createUser({ team, roles: ['designer'] });
    const other = await createUser({ team, roles: ['designer'] });
    const agent = env.agent(limited);
    for (let i = 0; i < 3; i++) await agent.post('/api/auth/login').send({ email, password: 'wrong-password' }).expect(401);
    const res = await agent.post('/api/auth/login').send({ email, password }).expect(429);
    expect(apiErrorSchema.parse(res.body).error.code).toBe('rate-limited');
    // RFC 6585 §4 and the IETF RateLimit header draft: the answer says when to come back.
    expect(res.headers['ratelimit']).toMatch(/t=\d+/);
    // Keyed by address: another account from the same client still signs in.
    await agent.post('/api/auth/login').send({ email: other.email, password: other.password }).expect(200);
    // The counts live in Redis, under this environment's prefix.
    const keys = await env.ctx.redis.keys(`${inject('redisPrefix')}*rate:login-email:*`);
    expect(keys.length).toBeGreaterThan(0);
  });

  it('limits all attempts per client address', async () => {
    const limited = await env.serverWith({ KEEPWELL_LOGIN_MAX_PER_EMAIL: '50', KEEPWELL_LOGIN_MAX_PER_IP: '4' });
    const agent = env.agent(limited);
    for (let i = 0; i < 4; i++) {
      await agent.post('/api/auth/login').send({ email: `spray${i}@keepwell.test`, password: 'guess-guess' }).expect(401);
    }
    const res = await agent.post('/api/auth/login').send({ email: 'spray9@keepwell.test', password: 'guess-guess' }).expect(429);
    expect(res.body.error.code).toBe('rate-limited');
  });
});

describe('errors', () => {
  it('validates bodies with one detail per field', async () => {
    const res = await env.agent().post('/api/auth/login').send({ email: 'not-an-address', password: '' }).expect(400);
    const { error } = apiErrorSchema.parse(res.body);
    expect(error.code).toBe('validation');
    expect(error.details?.map((d) => d.path).sort()).toEqual(['body.email', 'body.password']);
  });

  it('answers unknown /api routes with a JSON 404', async () => {
    const res = await env.agent().get('/api/no-such-thing').expect(404);
    expect(res.headers['content-type']).toMatch(/application\/json/);
    expect(apiErrorSchema.parse(res.body).error.code).toBe('not-found');
  });

  it('answers malformed JSON with a 400 and no stack trace', async () => {
    const res = await env.agent().post('/api/auth/login').set('Content-Type', 'application/json').send('{"email": ').expect(400);
    expect(apiErrorSchema.parse(res.body).error.code).toBe('validation');
    expect(JSON.stringify(res.body)).not.toMatch(/at .*\.(ts|js):\d+/);
  });

  it('answers an oversized body with 413 payload-too-large', async () => {
    const res = await env
      .agent()
      .post('/api/auth/login')
      .send({ email: 'a@keepwell.test', password: 'x'.repeat(3 * 1024 * 1024) })
      .expect(413);
    expect(res.body.error.code).toBe('payload-too-large');
  });
});
