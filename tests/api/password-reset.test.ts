// Password reset by mail. Expectations from the API contract in the brief (202
// always, link `${PUBLIC_URL}/reset-password?token=…`, confirm → 204) and the OWASP
// Forgot Password cheat sheet: the same answer for known and unknown addresses,
// a random single-use token that expires, and existing sessions ended afterwards.
// Mail is checked as received by an SMTP server (RFC 5321), parsed per RFC 5322.

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { MailMessage, PasswordResetToken, UserSession } from '../../server/db/models';
import { hashToken } from '../../server/services/tokens';
import { createTeam, createUser, signIn, startTestEnv, tokenFromLink, type TestEnv } from './helpers';

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv();
});
afterAll(async () => {
  await env?.close();
});

describe('password reset', () => {
  it('mails a link that sets a new password once, ends old sessions and retires the old password', async () => {
    const team = await createTeam();
    const { user, email, password } = await createUser({ team, roles: ['designer'], name: 'Rhea Reset' });
    const oldAgent = await signIn(env, email, password);

    await env.agent().post('/api/auth/password-reset').send({ email }).expect(202);
    const mail = await env.smtp.waitFor((m) => m.to.includes(email));
    expect(mail.subject).toMatch(/password/i);
    expect(mail.text).toContain('Rhea Reset');
    expect(mail.from).toBe('keepwell@keepwell.invalid');
    const token = tokenFromLink(mail.text, '/reset-password');
    expect(mail.html).toContain(`/reset-password?token=${token}`);

    // Only a keyed hash of the token is stored (OWASP: store reset tokens as hashes).
    const stored = await PasswordResetToken.findOne({ where: { userId: user.id } });
    expect(stored!.tokenHash).toBe(hashToken(env.config.secret, token));
    expect(stored!.tokenHash).not.toContain(token);

    const newPassword = 'a-brand-new-password';
    await env.agent().post('/api/auth/password-reset/confirm').send({ token, password: newPassword }).expect(204);
    const again = await env.agent().post('/api/auth/password-reset/confirm').send({ token, password: 'yet-another-password' }).expect(400);
    expect(again.body.error.code).toBe('invalid-token');

    await oldAgent.get('/api/auth/me').expect(401);
    expect(await UserSession.count({ where: { userId: user.id } })).toBe(0);
    await env.agent().post('/api/auth/login').send({ email, password }).expect(401);
    await env.agent().post('/api/auth/login').send({ email, password: newPassword }).expect(200);

    // The outbox row records delivery.
    await env.ctx.outbox.whenIdle();
    const row = await MailMessage.findOne({ where: { to: email } });
    expect(row!.status).toBe('sent');
    expect(row!.sentAt).not.toBeNull();
  });

  it('answers 202 for an unknown address and sends nothing', async () => {
    const before = await MailMessage.count();
    const res = await env.agent().post('/api/auth/password-reset').send({ email: 'nobody-at-all@keepwell.test' }).expect(202);
    expect(res.text).toBe('');
    await env.ctx.outbox.whenIdle();
    expect(await MailMessage.count()).toBe(before);
  });

  it('refuses an expired link', async () => {
    const team = await createTeam();
    const { user, email } = await createUser({ team, roles: ['reviewer'] });
    await env.agent().post('/api/auth/password-reset').send({ email }).expect(202);
    const token = tokenFromLink((await env.smtp.waitFor((m) => m.to.includes(email))).text, '/reset-password');
    await PasswordResetToken.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { userId: user.id } });
    const res = await env.agent().post('/api/auth/password-reset/confirm').send({ token, password: 'expired-link-password' }).expect(400);
    expect(res.body.error.code).toBe('invalid-token');
  });

  it('keeps only the newest link valid', async () => {
    const team = await createTeam();
    const { email } = await createUser({ team, roles: ['reviewer'] });
    await env.agent().post('/api/auth/password-reset').send({ email }).expect(202);
    const first = tokenFromLink((await env.smtp.waitFor((m) => m.to.includes(email))).text, '/reset-password');
    await env.agent().post('/api/auth/password-reset').send({ email }).expect(202);
    const second = tokenFromLink(
      (await env.smtp.waitFor((m) => m.to.includes(email) && !m.text.includes(first))).text,
      '/reset-password',
    );
    expect(second).not.toBe(first);
    await env.agent().post('/api/auth/password-reset/confirm').send({ token: first, password: 'first-link-password' }).expect(400);
    await env.agent().post('/api/auth/password-reset/confirm').send({ token: second, password: 'second-link-password' }).expect(204);
  });

  it('rejects a too-short new password with a validation error', async () => {
    const res = await env
      .agent()
      .post('/api/auth/password-reset/confirm')
      .send({ token: 'x'.repeat(43), password: 'short' })
      .expect(400);
    expect(res.body.error.code).toBe('validation');
    expect(res.body.error.details[0].path).toBe('body.password');
  });
});
