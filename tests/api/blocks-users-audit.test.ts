// Blocks, team membership changes and the audit trail, against the API contract in
// the brief (GET/POST /api/blocks, GET /api/blocks/:id, PATCH /api/admin/users/:id,
// GET /api/audit paged) with 201/404/409 meanings from RFC 9110 §15.3.2, §15.5.5, §15.5.10.

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { auditPageSchema } from '../../shared/api/audit';
import { blockListSchema, blockSchema } from '../../shared/api/blocks';
import { UserSession } from '../../server/db/models';
import { createTeam, createUser, signedInAs, signIn, startTestEnv, type TestEnv } from './helpers';

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv();
});
afterAll(async () => {
  await env?.close();
});

describe('blocks', () => {
  it('creates a block, lists it by name and reads it back; a duplicate name is a conflict', async () => {
    const team = await createTeam();
    const designer = await signedInAs(env, team, ['designer']);
    const created = blockSchema.parse(
      (await designer.agent.post('/api/blocks').send({ name: 'vortel-adder', description: '  Sparse-tree adder  ' }).expect(201)).body,
    );
    expect(created).toMatchObject({ name: 'vortel-adder', description: 'Sparse-tree adder' });
    await designer.agent.post('/api/blocks').send({ name: 'alpha-mux' }).expect(201);

    const list = blockListSchema.parse((await designer.agent.get('/api/blocks').expect(200)).body);
    expect(list.items.map((b) => b.name)).toEqual(['alpha-mux', 'vortel-adder']);
    expect((await designer.agent.get(`/api/blocks/${created.id}`).expect(200)).body).toEqual(created);

    const dup = await designer.agent.post('/api/blocks').send({ name: 'vortel-adder' }).expect(409);
    expect(dup.body.error.code).toBe('conflict');
    await designer.agent.get('/api/blocks/7d0c6a4e-3b1f-4a55-9a8e-0b8f2f0c1d2e').expect(404);
    const bad = await designer.agent.post('/api/blocks').send({ name: '../etc' }).expect(400);
    expect(bad.body.error.details[0].path).toBe('body.name');
  });
});

describe('team membership', () => {
  it('changes roles, which take effect on the next request', async () => {
    const team = await createTeam();
    const admin = await signedInAs(env, team, ['admin']);
    const member = await signedInAs(env, team, ['reviewer']);
    await member.agent.post('/api/blocks').send({ name: 'not-yet' }).expect(403);
    const res = await admin.agent.patch(`/api/admin/users/${member.user.id}`).send({ roles: ['reviewer', 'designer'] }).expect(200);
    expect(res.body.user.roles).toEqual(['reviewer', 'designer']);
    await member.agent.post('/api/blocks').send({ name: 'now-allowed' }).expect(201);
  });

  it('disabling a member ends their sessions; an admin cannot lock themselves out', async () => {
    const team = await createTeam();
    const admin = await signedInAs(env, team, ['admin']);
    const { user, email, password } = await createUser({ team, roles: ['designer'] });
    const memberAgent = await signIn(env, email, password);
    const res = await admin.agent.patch(`/api/admin/users/${user.id}`).send({ disabled: true }).expect(200);
    expect(res.body.user.status).toBe('disabled');
    expect(await UserSession.count({ where: { userId: user.id } })).toBe(0);
    await memberAgent.get('/api/auth/me').expect(401);
    await env.agent().post('/api/auth/login').send({ email, password }).expect(401);

    await admin.agent.patch(`/api/admin/users/${admin.user.id}`).send({ disabled: true }).expect(409);
    await admin.agent.patch(`/api/admin/users/${admin.user.id}`).send({ roles: ['designer'] }).expect(409);
  });
});

describe('audit trail', () => {
  it("records sign-ins, block creation and role changes for the team, newest first, paged", async () => {
    const team = await createTeam();
    const admin = await signedInAs(env, team, ['admin']);
    const designer = await signedInAs(env, team, ['designer']);
    const block = (await designer.agent.post('/api/blocks').send({ name: 'audited-block' }).expect(201)).body;
    await admin.agent.patch(`/api/admin/users/${designer.user.id}`).send({ roles: ['designer', 'reviewer'] }).expect(200);

    const page = auditPageSchema.parse((await admin.agent.get('/api/audit?pageSize=10').expect(200)).body);
    expect(page.items.map((e) => e.action)).toEqual(['user.update', 'block.create', 'auth.sign-in', 'auth.sign-in']);
    expect(page.total).toBe(4);
    const [update, create] = page.items;
    expect(update).toMatchObject({ subjectType: 'user', subjectId: designer.user.id, actor: { id: admin.user.id } });
    expect(update.detail).toEqual({ before: { roles: ['designer'], disabled: false }, after: { roles: ['designer', 'reviewer'], disabled: false } });
    expect(create).toMatchObject({ subjectType: 'block', subjectId: block.id, actor: { id: designer.user.id }, detail: { name: 'audited-block' } });

    const second = auditPageSchema.parse((await admin.agent.get('/api/audit?page=2&pageSize=3').expect(200)).body);
    expect(second.items.map((e) => e.action)).toEqual(['auth.sign-in']);

    // Another team's trail is separate.
    const other = await createTeam();
    const otherAdmin = await signedInAs(env, other, ['admin']);
    const theirs = auditPageSchema.parse((await otherAdmin.agent.get('/api/audit').expect(200)).body);
    expect(theirs.items.map((e) => e.action)).toEqual(['auth.sign-in']);
  });
});
