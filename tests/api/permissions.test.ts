// Every route × every role, and nobody: the server enforces shared/roles.ts on
// each route (the brief: "every API route checks its permission … on the server").
// The expected outcome of each pair is read from the PERMISSIONS table itself,
// which is the product's specification of who may do what; 401/403 semantics
// follow RFC 9110 §15.5.2 and §15.5.4.

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type request from 'supertest';
import { can, ROLES, type Role } from '../../shared/roles';
import { Block } from '../../server/db/models';
import { createTeam, signedInAs, startTestEnv, type TestEnv } from './helpers';
import { makeRouteFixture, ROUTES, type RouteCase, type RouteFixture } from './route-table';

let env: TestEnv;
let fixture: RouteFixture;
const agents = new Map<Role, request.Agent>();

beforeAll(async () => {
  env = await startTestEnv({ KEEPWELL_LOGIN_MAX_PER_IP: '1000' });
  const team = await createTeam();
  const block = await Block.create({ teamId: team.id, name: 'permission-table-block', createdBy: null });
  fixture = await makeRouteFixture(env, team, block.id);
  for (const role of ROLES) agents.set(role, (await signedInAs(env, team, [role])).agent);
});
afterAll(async () => {
  await env?.close();
});

async function attempt(route: RouteCase, agent: request.Agent) {
  const path = typeof route.path === 'function' ? await route.path(fixture) : route.path;
  const req = agent[route.method](path);
  return route.body ? req.send(await route.body(fixture)) : req;
}

const label = (r: RouteCase) => `${r.method.toUpperCase()} ${typeof r.path === 'string' ? r.path : r.path.toString().replace(/^.*`(.*)`.*$/s, '$1')}`;

describe.each(ROUTES.map((route) => ({ route, name: label(route) })))('$name', ({ route }) => {

  if (route.permission !== 'public') {
    it('nobody signed in → 401 unauthenticated', async () => {
      const res = await attempt(route, env.agent());
      expect(res.status).toBe(401);
      expect(res.body.error.code).toBe('unauthenticated');
    });
  }

  it.each(ROLES.map((role) => ({ role })))('as $role', async ({ role }) => {
    const allowed = route.permission === 'public' || route.permission === 'signed-in' || can([role], route.permission);
    const res = await attempt(route, agents.get(role)!);
    if (allowed) {
      expect(res.status, JSON.stringify(res.body)).toBeLessThan(400);
    } else {
      expect(res.status).toBe(403);
      expect(res.body.error.code).toBe('forbidden');
    }
  });
});

describe('team boundaries', () => {
  it("another team's block, member and message are not found, whatever the role", async () => {
    const otherTeam = await createTeam();
    const otherBlock = await Block.create({ teamId: otherTeam.id, name: 'other-team-block', createdBy: null });
    const otherFixture = await makeRouteFixture(env, otherTeam, otherBlock.id);
    const admin = agents.get('admin')!;
    await admin.get(`/api/blocks/${otherBlock.id}`).expect(404);
    await admin.patch(`/api/admin/users/${otherFixture.member.user.id}`).send({ disabled: true }).expect(404);
    await admin.get(`/api/admin/outbox/${otherFixture.messageId}`).expect(404);
    const blocks = await admin.get('/api/blocks').expect(200);
    expect(blocks.body.items.map((b: { id: string }) => b.id)).not.toContain(otherBlock.id);
    const users = await admin.get('/api/admin/users').expect(200);
    expect(users.body.items.map((u: { id: string }) => u.id)).not.toContain(otherFixture.member.user.id);
  });
});
