// Personal API tokens: shown once, stored only as an HMAC (RFC 2104, SHA-256 — checked
// here with node:crypto, independently of the service), scoped to read or submit and
// capped by the owner's roles, revocable, never mixed with the session cookie, and
// sent as `Authorization: Bearer` (RFC 6750 §2.1).

import crypto from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { QueryTypes } from 'sequelize';
import request from 'supertest';
import { ROLES } from '../../shared/roles';
import { TOKEN_PREFIX } from '../../shared/api/tokens';
import { User } from '../../server/db/models';
import { createTeam, signedInAs, startTestEnv, type TestEnv } from './helpers';
import { submitUpload } from './runs-helpers';
import { heronBlock, heronColumn, sizeOnlyTeamDeck } from './waivers-fixtures';

let env: TestEnv;

beforeAll(async () => {
  env = await startTestEnv({ KEEPWELL_LOGIN_MAX_PER_IP: '1000' });
});
afterAll(async () => {
  await env?.close();
});

const bearer = (token: string) => ({ Authorization: `Bearer ${token}` });

describe('personal API tokens', () => {
  it('are shown once and stored only as an HMAC of the token', async () => {
    const team = await createTeam();
    const me = await signedInAs(env, team, ['designer']);
    const created = await me.agent.post('/api/tokens').send({ name: 'ci heron nightly', scope: 'submit' }).expect(201);
    expect(created.headers['cache-control']).toBe('no-store');
    const token: string = created.body.token;
    expect(token.startsWith(TOKEN_PREFIX)).toBe(true);
    // 256 random bits in base64url are 43 characters (RFC 4648 §5, no padding).
    expect(token.length).toBe(TOKEN_PREFIX.length + 43);
    expect(created.body.hint).toBe(token.slice(0, TOKEN_PREFIX.length + 4));

    const listed = (await me.agent.get('/api/tokens').expect(200)).body.items;
    expect(listed).toHaveLength(1);
    expect(JSON.stringify(listed)).not.toContain(token);
    expect(listed[0]).toMatchObject({ name: 'ci heron nightly', scope: 'submit', lastUsedAt: null, revokedAt: null });

    const [row] = await env.ctx.sequelize.query<Record<string, unknown>>('select * from api_tokens where id = :id', {
      replacements: { id: created.body.id },
      type: QueryTypes.SELECT,
    });
    expect(row.token_hash).toBe(crypto.createHmac('sha256', env.config.secret).update(token).digest('hex'));
    expect(JSON.stringify(row)).not.toContain(token.slice(TOKEN_PREFIX.length + 4));

    await env.agent().get('/api/runs').set(bearer(token)).expect(200);
    const [used] = await env.ctx.sequelize.query<{ last_used_at: Date | null }>('select last_used_at from api_tokens where id = :id', {
      replacements: { id: created.body.id },
      type: QueryTypes.SELECT,
    });
    expect(used.last_used_at).not.toBeNull();
  });

  it('read tokens read, submit tokens also submit, neither manages tokens, and the owner’s roles cap both', async () => {
    const team = await createTeam();
    await sizeOnlyTeamDeck(team);
    const block = await heronBlock(team);
    const designer = await signedInAs(env, team, ['designer']);
    const reviewer = await signedInAs(env, team, ['reviewer']);
    const read = (await designer.agent.post('/api/tokens').send({ name: 'dashboard', scope: 'read' }).expect(201)).body.token;
    const submit = (await designer.agent.post('/api/tokens').send({ name: 'ci', scope: 'submit' }).expect(201)).body.token;
    const reviewerSubmit = (await reviewer.agent.post('/api/tokens').send({ name: 'ci', scope: 'submit' }).expect(201)).body.token;

    // A CI client: no browser Origin, no cookies.
    const client = () => request.agent(env.server);
    await client().get(`/api/blocks/${block.id}`).set(bearer(read)).expect(200);
    const refused = await submitUpload(client().set(bearer(read)) as never, block.id, { 'heron.sp': heronColumn() });
    expect(refused.status).toBe(403);
    const accepted = await submitUpload(client().set(bearer(submit)) as never, block.id, { 'heron.sp': heronColumn() });
    expect(accepted.status).toBe(201);
    expect(accepted.body.run.submitter.id).toBe(designer.user.id);
    // A reviewer may not submit runs, so neither may the reviewer's submit token.
    expect((await submitUpload(client().set(bearer(reviewerSubmit)) as never, block.id, { 'heron.sp': heronColumn() })).status).toBe(403);
    // A design.read-only scope never reaches a waiver decision, whatever the owner's roles.
    const reviewerRead = (await reviewer.agent.post('/api/tokens').send({ name: 'read', scope: 'read' }).expect(201)).body.token;
    expect((await client().post('/api/waivers/direct').set(bearer(reviewerRead)).send({})).status).toBe(403);

    for (const token of [read, submit]) {
      expect((await client().get('/api/tokens').set(bearer(token))).status).toBe(403);
      expect((await client().post('/api/tokens').set(bearer(token)).send({ name: 'more', scope: 'submit' })).status).toBe(403);
    }
  });

  it('revoked tokens, tokens of disabled users and unknown tokens authenticate nobody, even beside a valid cookie', async () => {
    const team = await createTeam();
    const me = await signedInAs(env, team, ['designer']);
    const other = await signedInAs(env, team, ['designer']);
    const created = (await me.agent.post('/api/tokens').send({ name: 'laptop', scope: 'read' }).expect(201)).body;
    await other.agent.post(`/api/tokens/${created.id}/revoke`).expect(404);
    await env.agent().get('/api/runs').set(bearer(created.token)).expect(200);

    // The cookie is never a fallback for a bad bearer token.
    const bad = await me.agent.get('/api/runs').set(bearer(`${TOKEN_PREFIX}${'A'.repeat(43)}`)).expect(401);
    expect(bad.body.error.code).toBe('invalid-token');

    const revoked = (await me.agent.post(`/api/tokens/${created.id}/revoke`).expect(200)).body;
    expect(revoked.revokedAt).not.toBeNull();
    await me.agent.post(`/api/tokens/${created.id}/revoke`).expect(409);
    expect((await env.agent().get('/api/runs').set(bearer(created.token)).expect(401)).body.error.code).toBe('invalid-token');
    // Still listed: revoked, not deleted.
    expect((await me.agent.get('/api/tokens').expect(200)).body.items.map((t: { id: string; revokedAt: string | null }) => [t.id, t.revokedAt !== null])).toEqual([[created.id, true]]);

    const live = (await other.agent.post('/api/tokens').send({ name: 'desk', scope: 'read' }).expect(201)).body.token;
    await env.agent().get('/api/runs').set(bearer(live)).expect(200);
    await User.update({ disabled: true }, { where: { id: other.user.id } });
    await env.agent().get('/api/runs').set(bearer(live)).expect(401);
  });

  it('every role manages its own tokens; nobody signed in cannot revoke', async () => {
    const team = await createTeam();
    for (const role of ROLES) {
      const u = await signedInAs(env, team, [role]);
      const t = (await u.agent.post('/api/tokens').send({ name: `${role} token`, scope: 'read' }).expect(201)).body;
      expect((await env.agent().post(`/api/tokens/${t.id}/revoke`)).status).toBe(401);
      await u.agent.post(`/api/tokens/${t.id}/revoke`).expect(200);
    }
  });
});
