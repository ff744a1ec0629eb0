// The mail outbox: rows written in the request, delivery in the background with
// retries, and the admin's view of it. The SMTP peer here is a real smtp-server
// that can answer as RFC 5321 §4.2 allows: 4yz (try again later) or hold a
// message until the test lets it through.

import type { AddressInfo } from 'node:net';
import { SMTPServer } from 'smtp-server';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { outboxMessageSchema, outboxPageSchema } from '../../shared/api/admin';
import { MailMessage } from '../../server/db/models';
import { createTeam, createUser, setCookie, signedInAs, startTestEnv, type TestEnv } from './helpers';

interface Peer {
  port: number;
  received: { to: string; body: string }[];
  /** Answer 451 to the first n attempts for addresses containing `key`. */
  refuse: Map<string, number>;
  /** Hold messages for addresses containing `key` until the promise settles. */
  hold: Map<string, Promise<void>>;
  close(): Promise<void>;
}

async function startPeer(): Promise<Peer> {
  const received: Peer['received'] = [];
  const refuse = new Map<string, number>();
  const hold = new Map<string, Promise<void>>();
  const server = new SMTPServer({
    authOptional: true,
    disabledCommands: ['STARTTLS', 'AUTH'],
    logger: false,
    onData(stream, session, callback) {
      const to = session.envelope.rcptTo.map((r) => r.address).join(',');
      let body = '';
      stream.on('data', (c: Buffer) => (body += c.toString()));
      stream.on('end', async () => {
        for (const [key, left] of refuse) {
          if (to.includes(key) && left > 0) {
            refuse.set(key, left - 1);
            const err = new Error('mailbox busy, try again later') as Error & { responseCode: number };
            err.responseCode = 451;
            return callback(err);
          }
        }
        for (const [key, gate] of hold) if (to.includes(key)) await gate;
        received.push({ to, body });
        callback();
      });
    },
  });
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  return {
    port: (server.server.address() as AddressInfo).port,
    received,
    refuse,
    hold,
    close: () => new Promise<void>((r) => server.close(() => r())),
  };
}

let env: TestEnv;
let peer: Peer;

beforeAll(async () => {
  peer = await startPeer();
  env = await startTestEnv({ SMTP_PORT: String(peer.port), KEEPWELL_MAIL_MAX_ATTEMPTS: '3', KEEPWELL_MAIL_RETRY_SECONDS: '0.1' });
});
afterAll(async () => {
  await env?.close();
  await peer?.close();
});

async function waitForStatus(id: string, status: string, timeoutMs = 10_000): Promise<MailMessage> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const row = await MailMessage.findByPk(id);
    if (row?.status === status) return row;
    if (Date.now() > deadline) throw new Error(`message ${id} is ${row?.status}, not ${status}`);
    await new Promise((r) => setTimeout(r, 50));
  }
}

describe('outbox delivery', () => {
  it('answers the request before SMTP has accepted the message, then delivers it', async () => {
    const team = await createTeam();
    const { email } = await createUser({ team, roles: ['designer'], email: `held.${Date.now()}@keepwell.test` });
    let release!: () => void;
    peer.hold.set('held.', new Promise<void>((r) => (release = r)));

    await env.agent().post('/api/auth/password-reset').send({ email }).expect(202);
    const row = await MailMessage.findOne({ where: { to: email } });
    expect(row, 'the outbox row is written in the request').not.toBeNull();
    expect(row!.status).toBe('queued');
    expect(peer.received.some((m) => m.to === email)).toBe(false);

    release();
    const sent = await waitForStatus(row!.id, 'sent');
    expect(sent.attempts).toBe(1);
    expect(peer.received.find((m) => m.to === email)?.body).toContain('/reset-password?token=');
  });

  it('retries after a temporary SMTP refusal (451) and then delivers', async () => {
    const team = await createTeam();
    const { email } = await createUser({ team, roles: ['designer'], email: `busy.${Date.now()}@keepwell.test` });
    peer.refuse.set('busy.', 2);
    await env.agent().post('/api/auth/password-reset').send({ email }).expect(202);
    const row = await MailMessage.findOne({ where: { to: email } });
    const sent = await waitForStatus(row!.id, 'sent');
    expect(sent.attempts).toBe(3);
    expect(sent.error).toBeNull();
  });

  it('gives up after the configured number of attempts and records the error', async () => {
    const team = await createTeam();
    const { email } = await createUser({ team, roles: ['designer'], email: `gone.${Date.now()}@keepwell.test` });
    peer.refuse.set('gone.', 100);
    await env.agent().post('/api/auth/password-reset').send({ email }).expect(202);
    const row = await MailMessage.findOne({ where: { to: email } });
    const failed = await waitForStatus(row!.id, 'failed');
    expect(failed.attempts).toBe(env.config.mailMaxAttempts);
    expect(failed.error).toMatch(/451/);
  });
});

describe('admin outbox', () => {
  it("pages the team's messages newest first and shows one message whole", async () => {
    const team = await createTeam();
    const admin = await signedInAs(env, team, ['admin']);
    const subjects = ['first', 'second', 'third'];
    for (const subject of subjects) {
      await env.ctx.outbox.enqueue({ to: 'someone@keepwell.test', subject, text: `body of ${subject}`, teamId: team.id });
      await new Promise((r) => setTimeout(r, 5));
    }
    await env.ctx.outbox.whenIdle();

    const page1 = outboxPageSchema.parse((await admin.agent.get('/api/admin/outbox?page=1&pageSize=2').expect(200)).body);
    expect(page1.total).toBe(3);
    expect(page1.items.map((m) => m.subject)).toEqual(['third', 'second']);
    const page2 = outboxPageSchema.parse((await admin.agent.get('/api/admin/outbox?page=2&pageSize=2').expect(200)).body);
    expect(page2.items.map((m) => m.subject)).toEqual(['first']);
    expect(page2.items[0].status).toBe('sent');

    const one = outboxMessageSchema.parse((await admin.agent.get(`/api/admin/outbox/${page2.items[0].id}`).expect(200)).body);
    expect(one.text).toBe('body of first');

    const bad = await admin.agent.get('/api/admin/outbox?pageSize=100000').expect(400);
    expect(bad.body.error.details[0].path).toBe('query.pageSize');
    await admin.agent.get('/api/admin/outbox/not-a-uuid').expect(400);
  });

  it('hides the one-time token of reset links from the production outbox, and shows it in development', async () => {
    const team = await createTeam();
    const { email } = await createUser({ team, roles: ['designer'], email: `hidden.${Date.now()}@keepwell.test` });
    const productionServer = await env.serverWith({ NODE_ENV: 'production' });
    const admin = await signedInAs(env, team, ['admin']);
    await env.agent().post('/api/auth/password-reset').send({ email }).expect(202);
    const row = await MailMessage.findOne({ where: { to: email } });
    expect(row!.text).toMatch(/reset-password\?token=[A-Za-z0-9_-]{43}/);

    const dev = await admin.agent.get(`/api/admin/outbox/${row!.id}`).expect(200);
    expect(dev.body.text).toContain(row!.text.match(/token=([A-Za-z0-9_-]+)/)![1]);

    // Production cookies are Secure, which a cookie jar keeps off plain HTTP (RFC 6265 §5.4): pass it by hand.
    const login = await env.agent(productionServer).post('/api/auth/login').send({ email: admin.email, password: admin.password }).expect(200);
    const cookie = setCookie(login, 'keepwell_session')!.split(';')[0];
    const prod = await env.agent(productionServer).set('Cookie', cookie).get(`/api/admin/outbox/${row!.id}`).expect(200);
    expect(prod.body.text).toContain('/reset-password?token=(hidden)');
    expect(prod.body.html).toContain('token=(hidden)');
    expect(prod.body.text).not.toMatch(/token=[A-Za-z0-9_-]{43}/);
  });
});
