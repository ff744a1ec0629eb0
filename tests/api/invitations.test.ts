// Inviting a new team member. Expectations from the API contract in the brief
// (POST /api/admin/invitations → 201 and a mail with `${PUBLIC_URL}/accept-invite?token=…`;
// accepting sets the password and signs in) and the OWASP Forgot Password cheat
// sheet's rules for one-time links (random, single use, expiring).

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { adminUserResponseSchema, adminUserListSchema } from '../../shared/api/admin';
import { meResponseSchema } from '../../shared/api/auth';
import { Invitation } from '../../server/db/models';
import { createTeam, createUser, setCookie, signedInAs, startTestEnv, tokenFromLink, uniqueEmail, type TestEnv } from './helpers';

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv();
});
afterAll(async () => {
  await env?.close();
});

describe('invitations', () => {
  it('invites by mail; accepting sets the password, signs in, and works once', async () => {
    const team = await createTeam('Invite Test Team');
    const admin = await signedInAs(env, team, ['admin']);
    const email = uniqueEmail('newcomer');

    const res = await admin.agent.post('/api/admin/invitations').send({ email, name: 'Nell Newcomer', roles: ['designer', 'reviewer'] }).expect(201);
    const invited = adminUserResponseSchema.parse(res.body).user;
    expect(invited).toMatchObject({ email, name: 'Nell Newcomer', roles: ['designer', 'reviewer'], teamId: team.id, status: 'invited' });

    const mail = await env.smtp.waitFor((m) => m.to.includes(email));
    expect(mail.subject).toContain('Invite Test Team');
    const token = tokenFromLink(mail.text, '/accept-invite');

    // Not signed in before accepting: an invited account has no password.
    await env.agent().post('/api/auth/login').send({ email, password: 'anything-at-all' }).expect(401);

    const newcomer = env.agent();
    const accepted = await newcomer.post('/api/auth/invitations/accept').send({ token, password: 'my-chosen-password' }).expect(200);
    expect(meResponseSchema.parse(accepted.body).user).toMatchObject({ id: invited.id, roles: ['designer', 'reviewer'], teamName: 'Invite Test Team' });
    expect(setCookie(accepted, 'keepwell_session')).toMatch(/HttpOnly/);
    const me = await newcomer.get('/api/auth/me').expect(200);
    expect(me.body.user.email).toBe(email);

    const reuse = await env.agent().post('/api/auth/invitations/accept').send({ token, password: 'another-password' }).expect(400);
    expect(reuse.body.error.code).toBe('invalid-token');
    await env.agent().post('/api/auth/login').send({ email, password: 'my-chosen-password' }).expect(200);

    const list = adminUserListSchema.parse((await admin.agent.get('/api/admin/users').expect(200)).body);
    expect(list.items.find((u) => u.id === invited.id)?.status).toBe('active');
  });

  it('refuses an expired invitation', async () => {
    const team = await createTeam();
    const admin = await signedInAs(env, team, ['admin']);
    const email = uniqueEmail('late');
    const res = await admin.agent.post('/api/admin/invitations').send({ email, name: 'Lou Late', roles: ['designer'] }).expect(201);
    const token = tokenFromLink((await env.smtp.waitFor((m) => m.to.includes(email))).text, '/accept-invite');
    await Invitation.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { userId: res.body.user.id } });
    const late = await env.agent().post('/api/auth/invitations/accept').send({ token, password: 'too-late-password' }).expect(400);
    expect(late.body.error.code).toBe('invalid-token');
  });

  it('inviting the same person again replaces the earlier link', async () => {
    const team = await createTeam();
    const admin = await signedInAs(env, team, ['admin']);
    const email = uniqueEmail('twice');
    await admin.agent.post('/api/admin/invitations').send({ email, name: 'Tam Twice', roles: ['designer'] }).expect(201);
    const first = tokenFromLink((await env.smtp.waitFor((m) => m.to.includes(email))).text, '/accept-invite');
    await admin.agent.post('/api/admin/invitations').send({ email, name: 'Tam Twice', roles: ['reviewer'] }).expect(201);
    const second = tokenFromLink((await env.smtp.waitFor((m) => m.to.includes(email) && !m.text.includes(first))).text, '/accept-invite');
    await env.agent().post('/api/auth/invitations/accept').send({ token: first, password: 'first-link-password' }).expect(400);
    const ok = await env.agent().post('/api/auth/invitations/accept').send({ token: second, password: 'second-link-password' }).expect(200);
    expect(ok.body.user.roles).toEqual(['reviewer']);
  });

  it('refuses to invite an address that already has an account (409 conflict)', async () => {
    const team = await createTeam();
    const other = await createTeam();
    const admin = await signedInAs(env, team, ['admin']);
    const existing = await createUser({ team: other, roles: ['designer'] });
    const res = await admin.agent.post('/api/admin/invitations').send({ email: existing.email, name: 'Someone', roles: ['designer'] }).expect(409);
    expect(res.body.error.code).toBe('conflict');
  });

  it('requires at least one known role', async () => {
    const team = await createTeam();
    const admin = await signedInAs(env, team, ['admin']);
    const none = await admin.agent.post('/api/admin/invitations').send({ email: uniqueEmail(), name: 'No Role', roles: [] }).expect(400);
    expect(none.body.error.details[0].path).toBe('body.roles');
    await admin.agent.post('/api/admin/invitations').send({ email: uniqueEmail(), name: 'Bad Role', roles: ['owner'] }).expect(400);
  });
});
