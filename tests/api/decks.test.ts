// Rule decks over the API: versions, immutability of published ones, optimistic
// locking of drafts, import validation, the team default and the audit trail.
// Status meanings follow RFC 9110 (§15.3.2 201, §15.5.5 404, §15.5.10 409) and
// RFC 4918 §11.2 (422: well-formed but semantically invalid content); edits are
// RFC 6902 JSON Patch documents over RFC 6901 pointers.

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { auditPageSchema } from '../../shared/api/audit';
import { deckDetailSchema, deckListSchema, deckVersionSchema, type DeckVersion } from '../../shared/api/decks';
import { defaultDeck } from '../../rules/default-deck';
import { validateDeck } from '../../rules/validate-deck';
import { Block, RuleDeck, RuleDeckVersion, Team } from '../../server/db/models';
import { seedDemo, DEMO_TEAM } from '../../server/seed/demo';
import { versionForRun } from '../../server/services/decks';
import { createQueuedRun } from '../../server/services/runs';
import { loadRunInputs } from '../../server/services/runs-store';
import { createTeam, signedInAs, startTestEnv, type TestEnv } from './helpers';
import { INVERTER_NETLIST, makeDeck, makeNetlist } from './decks-fixtures';
import type request from 'supertest';

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv({ KEEPWELL_LOGIN_MAX_PER_IP: '1000' });
});
afterAll(async () => {
  await env?.close();
});

const versionPath = (v: { deckId: string; id: string }) => `/api/decks/${v.deckId}/versions/${v.id}`;

async function newDeck(agent: request.Agent, name = `deck-${Math.random().toString(36).slice(2, 8)}`) {
  const res = await agent.post('/api/decks').send({ name, description: 'test deck' }).expect(201);
  const detail = deckDetailSchema.parse(res.body);
  const draft = deckVersionSchema.parse((await agent.get(versionPath({ deckId: detail.id, id: detail.versions[0].id })).expect(200)).body);
  return { detail, draft };
}

async function publish(agent: request.Agent, v: DeckVersion, changeNote = 'test publish') {
  return deckVersionSchema.parse((await agent.post(`${versionPath(v)}/publish`).send({ lockVersion: v.lockVersion, changeNote }).expect(200)).body);
}

async function patch(agent: request.Agent, v: DeckVersion, changes: object[]) {
  return deckVersionSchema.parse((await agent.patch(versionPath(v)).send({ lockVersion: v.lockVersion, changes }).expect(200)).body);
}

describe('decks and versions', () => {
  it('a new deck starts as draft 1 of the built-in deck; publishing makes it the default, and the list shows it', async () => {
    const team = await createTeam();
    const owner = await signedInAs(env, team, ['methodology']);
    const { detail, draft } = await newDeck(owner.agent, 'alder-review');
    expect(detail).toMatchObject({ name: 'alder-review', teamDefault: true, defaultVersion: null, latestPublished: null, versionCount: 1 });
    expect(draft).toMatchObject({ version: 1, state: 'draft', lockVersion: 0, parentVersionId: null, createdBy: { id: owner.user.id } });
    expect(draft.content).toEqual({ ...defaultDeck(), name: 'alder-review' });

    const v1 = await publish(owner.agent, draft, 'First team deck.');
    expect(v1).toMatchObject({ state: 'published', changeNote: 'First team deck.', isDeckDefault: true, publishedBy: { id: owner.user.id } });

    const designer = await signedInAs(env, team, ['designer']);
    const list = deckListSchema.parse((await designer.agent.get('/api/decks').expect(200)).body);
    expect(list.items).toEqual([expect.objectContaining({ id: detail.id, defaultVersion: { id: v1.id, version: 1 }, latestPublished: { id: v1.id, version: 1 }, draft: null })]);
    // Designers read decks but do not change them (shared/roles.ts deck.edit).
    await designer.agent.post(`/api/decks/${detail.id}/drafts`).send({}).expect(403);
  });

  it('a published version cannot be altered, through the API or in the database', async () => {
    const team = await createTeam();
    const owner = await signedInAs(env, team, ['methodology']);
    const { draft } = await newDeck(owner.agent);
    const v1 = await publish(owner.agent, draft);

    const patched = await owner.agent.patch(versionPath(v1)).send({ lockVersion: v1.lockVersion, changes: [{ op: 'replace', path: '/scale', value: 1e-6 }] }).expect(409);
    expect(patched.body.error).toMatchObject({ code: 'version-published', message: expect.stringContaining('Start a new draft') });
    const replaced = await owner.agent.put(`${versionPath(v1)}/content`).send({ lockVersion: v1.lockVersion, content: defaultDeck() }).expect(409);
    expect(replaced.body.error.code).toBe('version-published');
    expect((await owner.agent.post(`${versionPath(v1)}/publish`).send({ lockVersion: v1.lockVersion, changeNote: 'again' }).expect(409)).body.error.code).toBe('version-published');
    expect((await owner.agent.delete(versionPath(v1)).expect(409)).body.error.code).toBe('version-published');

    // The trigger from migration 20261202-10 refuses the change whatever the code path.
    await expect(
      env.ctx.sequelize.query(`update rule_deck_versions set content = jsonb_set(content, '{scale}', '0.5') where id = :id`, { replacements: { id: v1.id } }),
    ).rejects.toThrow(/published and cannot change/);
    await expect(RuleDeckVersion.update({ state: 'draft' }, { where: { id: v1.id } })).rejects.toThrow(/published and cannot change/);
    const again = deckVersionSchema.parse((await owner.agent.get(versionPath(v1)).expect(200)).body);
    expect(again.content).toEqual(v1.content);
  });

  it("a published version reads back byte for byte the same after later drafts are edited and published", async () => {
    const team = await createTeam();
    const owner = await signedInAs(env, team, ['methodology']);
    const { draft } = await newDeck(owner.agent);
    const v1 = await publish(owner.agent, draft);
    const exported = (await owner.agent.get(`${versionPath(v1)}/export`).expect(200)).text;
    const read = (await owner.agent.get(versionPath(v1)).expect(200)).text;

    const d2 = deckVersionSchema.parse((await owner.agent.post(`/api/decks/${v1.deckId}/drafts`).send({}).expect(201)).body);
    expect(d2).toMatchObject({ version: 2, parentVersionId: v1.id, parentVersion: 1 });
    const d2b = await patch(owner.agent, d2, [
      { op: 'replace', path: '/rules/stage.noise-margin/params/minFraction', value: 0.2 },
      { op: 'replace', path: '/corners/0/vdd', value: 2.4 },
    ]);
    const v2 = await publish(owner.agent, d2b);
    const d3 = deckVersionSchema.parse((await owner.agent.post(`/api/decks/${v1.deckId}/drafts`).send({ fromVersionId: v1.id }).expect(201)).body);
    await patch(owner.agent, d3, [{ op: 'replace', path: '/slowestClockPeriod', value: 1e-6 }]);

    expect((await owner.agent.get(`${versionPath(v1)}/export`).expect(200)).text).toBe(exported);
    const reread = (await owner.agent.get(versionPath(v1)).expect(200)).text;
    // Only the deck-default flag may differ in the envelope (v2 is the default now); the content is byte-identical.
    expect(JSON.stringify(JSON.parse(reread).content)).toBe(JSON.stringify(JSON.parse(read).content));
    expect(JSON.parse(reread).isDeckDefault).toBe(false);
    expect(v2.isDeckDefault).toBe(true);
    expect(v2.content.rules['stage.noise-margin'].params.minFraction).toBe(0.2);
  });

  it('keeps one open draft per deck: a second one is a conflict that names the open draft', async () => {
    const team = await createTeam();
    const owner = await signedInAs(env, team, ['methodology']);
    const { published, draft } = await makeDeck(team.id, { draft: true });
    const res = await owner.agent.post(`/api/decks/${published.deckId}/drafts`).send({}).expect(409);
    expect(res.body.error).toMatchObject({ code: 'draft-exists', details: [{ path: 'draftId', message: draft!.id }] });
    // Discarding it makes room for a new one.
    await owner.agent.delete(`/api/decks/${published.deckId}/versions/${draft!.id}`).expect(204);
    const fresh = await owner.agent.post(`/api/decks/${published.deckId}/drafts`).send({}).expect(201);
    expect(fresh.body).toMatchObject({ version: 2, state: 'draft', parentVersionId: published.id });
  });

  it('concurrent edits of one draft never lose an update: one wins, the other gets 409 and its retry keeps both', async () => {
    const team = await createTeam();
    const a = await signedInAs(env, team, ['methodology']);
    const b = await signedInAs(env, team, ['admin']);
    const { draft } = await newDeck(a.agent);
    const lockVersion = draft.lockVersion;

    const changeA = [{ op: 'replace', path: '/rules/device.implausible-size/params/maxWidth', value: 5e-4 }];
    const changeB = [{ op: 'replace', path: '/rules/stage.noise-margin/severity', value: 'error' }];
    const [ra, rb] = await Promise.all([
      a.agent.patch(versionPath(draft)).send({ lockVersion, changes: changeA }),
      b.agent.patch(versionPath(draft)).send({ lockVersion, changes: changeB }),
    ]);
    expect([ra.status, rb.status].sort()).toEqual([200, 409]);
    const loser = ra.status === 409 ? { res: ra, agent: a.agent, changes: changeA } : { res: rb, agent: b.agent, changes: changeB };
    expect(loser.res.body.error.code).toBe('stale-version');

    const fresh = deckVersionSchema.parse((await loser.agent.get(versionPath(draft)).expect(200)).body);
    expect(fresh.lockVersion).toBe(lockVersion + 1);
    const final = await patch(loser.agent, fresh, loser.changes);
    expect(final.lockVersion).toBe(lockVersion + 2);
    expect(final.content.rules['device.implausible-size'].params.maxWidth).toBe(5e-4);
    expect(final.content.rules['stage.noise-margin'].severity).toBe('error');
  });

  it('refuses patches that point nowhere or leave an invalid deck, naming the field', async () => {
    const team = await createTeam();
    const owner = await signedInAs(env, team, ['methodology']);
    const { draft } = await newDeck(owner.agent);
    const nowhere = await owner.agent
      .patch(versionPath(draft))
      .send({ lockVersion: 0, changes: [{ op: 'replace', path: '/corners/7/vdd', value: 1 }] })
      .expect(422);
    expect(nowhere.body.error).toMatchObject({ code: 'invalid-patch', details: [{ path: '/corners/7/vdd' }] });
    const outOfRange = await owner.agent
      .patch(versionPath(draft))
      .send({ lockVersion: 0, changes: [{ op: 'replace', path: '/rules/stage.noise-margin/params/minFraction', value: 0.9 }] })
      .expect(422);
    expect(outOfRange.body.error.code).toBe('invalid-deck');
    expect(outOfRange.body.error.details).toEqual([{ path: 'rules.stage.noise-margin.params.minFraction', message: expect.stringContaining('0.5') }]);
    const lastCorner = await owner.agent
      .patch(versionPath(draft))
      .send({ lockVersion: 0, changes: [{ op: 'remove', path: '/corners/0' }, { op: 'remove', path: '/corners/0' }, { op: 'remove', path: '/corners/0' }] })
      .expect(422);
    expect(lastCorner.body.error.details[0].path).toBe('corners');
    // Nothing was applied: the draft is as it was.
    const unchanged = deckVersionSchema.parse((await owner.agent.get(versionPath(draft)).expect(200)).body);
    expect(unchanged.lockVersion).toBe(0);
    expect(unchanged.content.corners).toHaveLength(3);
  });
});

describe('import and export', () => {
  it('rejects a deck with an out-of-range threshold, pointing at the field by its path', async () => {
    const team = await createTeam();
    const owner = await signedInAs(env, team, ['methodology']);
    const deck = defaultDeck();
    deck.rules['stage.noise-margin'].params.minFraction = 0.75; // the rule's schema allows at most 0.5
    deck.corners[1].vdd = 40; // the corner schema allows at most 20 V
    const res = await owner.agent.post('/api/decks').send({ name: 'too-strict', content: deck }).expect(422);
    expect(res.body.error.code).toBe('invalid-deck');
    const paths = res.body.error.details.map((d: { path: string }) => d.path);
    expect(paths).toEqual(['corners.1.vdd']);
    // The deck schema fails first; with the corner fixed, the rule's own schema speaks.
    deck.corners[1].vdd = 2.25;
    const second = await owner.agent.post('/api/decks').send({ name: 'too-strict', content: deck }).expect(422);
    expect(second.body.error.details).toEqual([{ path: 'rules.stage.noise-margin.params.minFraction', message: expect.stringMatching(/0\.5/) }]);
    expect(await RuleDeck.count({ where: { teamId: team.id } })).toBe(0);
  });

  it('an exported version imports as a new deck with the same content, and into a draft', async () => {
    const team = await createTeam();
    const owner = await signedInAs(env, team, ['methodology']);
    const { published } = await makeDeck(team.id, { name: 'exported-deck' });
    const res = await owner.agent.get(`/api/decks/${published.deckId}/versions/${published.id}/export`).expect(200);
    expect(res.headers['content-type']).toMatch(/^application\/json/);
    // RFC 6266 §4.1: the file name as a token or a quoted string.
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="?exported-deck-v1\.json"?$/);
    const file = JSON.parse(res.text);
    expect(validateDeck(file).ok).toBe(true);

    const imported = deckDetailSchema.parse((await owner.agent.post('/api/decks').send({ name: 'imported-deck', content: file }).expect(201)).body);
    const draft = deckVersionSchema.parse((await owner.agent.get(`/api/decks/${imported.id}/versions/${imported.versions[0].id}`).expect(200)).body);
    expect(draft.content).toEqual(file);

    const changed = { ...file, slowestClockPeriod: 250e-9 };
    const replaced = deckVersionSchema.parse((await owner.agent.put(`${versionPath(draft)}/content`).send({ lockVersion: draft.lockVersion, content: changed }).expect(200)).body);
    expect(replaced.content.slowestClockPeriod).toBe(250e-9);
    expect(replaced.lockVersion).toBe(draft.lockVersion + 1);
  });
});

describe('team default', () => {
  it('marks one published version the team default; runs that name none get it, drafts cannot be it', async () => {
    const team = await createTeam();
    const owner = await signedInAs(env, team, ['methodology']);
    const first = await makeDeck(team.id, { draft: true });
    await RuleDeck.update({ teamDefault: true }, { where: { id: first.deck.id } });
    const second = await makeDeck(team.id);
    expect((await versionForRun(team.id))?.id).toBe(first.published.id);

    const res = deckDetailSchema.parse((await owner.agent.post(`/api/decks/${second.deck.id}/versions/${second.published.id}/default`).expect(200)).body);
    expect(res.teamDefault).toBe(true);
    expect((await RuleDeck.findByPk(first.deck.id))!.teamDefault).toBe(false);
    expect((await versionForRun(team.id))?.id).toBe(second.published.id);
    expect((await versionForRun(team.id, first.published.id))?.id).toBe(first.published.id);
    await expect(versionForRun(team.id, first.draft!.id)).rejects.toMatchObject({ code: 'version-not-published' });

    const draftDefault = await owner.agent.post(`/api/decks/${first.deck.id}/versions/${first.draft!.id}/default`).expect(409);
    expect(draftDefault.body.error.code).toBe('version-not-published');
  });

  it("another team's decks and versions are not found", async () => {
    const mine = await createTeam();
    const theirs = await createTeam();
    const owner = await signedInAs(env, mine, ['admin']);
    const other = await makeDeck(theirs.id, { draft: true });
    await owner.agent.get(`/api/decks/${other.deck.id}`).expect(404);
    await owner.agent.get(`/api/decks/${other.deck.id}/versions/${other.published.id}`).expect(404);
    await owner.agent.get(`/api/decks/diff?from=${other.published.id}&to=${other.draft!.id}`).expect(404);
    await owner.agent.patch(`/api/decks/${other.deck.id}/versions/${other.draft!.id}`).send({ lockVersion: 0, changes: [{ op: 'replace', path: '/scale', value: 1e-6 }] }).expect(404);
    await owner.agent.post(`/api/decks/${other.deck.id}/versions/${other.published.id}/default`).expect(404);
    expect(deckListSchema.parse((await owner.agent.get('/api/decks').expect(200)).body).items).toEqual([]);
  });
});

describe('audit trail of decks', () => {
  it('records one event per edit with the changed paths, and one per publish', async () => {
    const team = await createTeam();
    const owner = await signedInAs(env, team, ['methodology']);
    const { draft } = await newDeck(owner.agent);
    const edited = await patch(owner.agent, draft, [
      { op: 'replace', path: '/rules/stage.non-regenerative/enabled', value: false },
      { op: 'replace', path: '/corners/2/nmos/vt0', value: 0.35 },
    ]);
    // Setting a value to what it already is changes nothing and records nothing.
    const same = await patch(owner.agent, edited, [{ op: 'replace', path: '/corners/2/nmos/vt0', value: 0.35 }]);
    expect(same.lockVersion).toBe(edited.lockVersion);
    await publish(owner.agent, edited, 'Tighter ff-hot threshold.');

    const page = auditPageSchema.parse((await owner.agent.get('/api/audit?pageSize=10').expect(200)).body);
    const deckEvents = page.items.filter((e) => e.action.startsWith('deck.'));
    expect(deckEvents.map((e) => e.action)).toEqual(['deck.publish', 'deck.edit', 'deck.create']);
    const [published, edit] = deckEvents;
    expect(edit).toMatchObject({ subjectType: 'rule-deck-version', subjectId: draft.id, actor: { id: owner.user.id } });
    expect(edit.detail).toMatchObject({
      version: 1,
      paths: ['rules.stage.non-regenerative.enabled', 'corners.ff-hot.nmos.vt0'],
      changes: ['replace /rules/stage.non-regenerative/enabled', 'replace /corners/2/nmos/vt0'],
    });
    expect(published.detail).toMatchObject({ version: 1, changeNote: 'Tighter ff-hot threshold.', deckDefault: true });
  });
});

describe('runs and deck versions', () => {
  it('a run records the version it used, and re-reading that version later gives the same settings', async () => {
    const team = await createTeam();
    const owner = await signedInAs(env, team, ['methodology']);
    const { deck, published } = await makeDeck(team.id);
    await RuleDeck.update({ teamDefault: true }, { where: { id: deck.id } });
    const block = await Block.create({ teamId: team.id, name: 'run-deck-block', createdBy: null });
    const netlist = await makeNetlist(team.id, block.id, { 'cells.sp': INVERTER_NETLIST });

    const runId = await createQueuedRun(env.ctx, { id: owner.user.id, teamId: team.id }, { netlistId: netlist.id, note: '' });
    const run = (await owner.agent.get(`/api/runs/${runId}`).expect(200)).body;
    expect(run.deck).toMatchObject({ versionId: published.id, version: 1 });
    const before = JSON.stringify((await loadRunInputs(env.ctx, { netlistId: netlist.id, deckVersionId: published.id })).deck);

    // The methodology owner moves on: a new draft, edited, published and made the default.
    const d2 = deckVersionSchema.parse((await owner.agent.post(`/api/decks/${deck.id}/drafts`).send({}).expect(201)).body);
    const e2 = await patch(owner.agent, d2, [{ op: 'replace', path: '/rules/stage.noise-margin/params/minFraction', value: 0.3 }]);
    await publish(owner.agent, e2);

    const again = (await owner.agent.get(`/api/runs/${runId}`).expect(200)).body;
    expect(again.deck.versionId).toBe(published.id);
    const after = (await loadRunInputs(env.ctx, { netlistId: netlist.id, deckVersionId: again.deck.versionId })).deck;
    expect(JSON.stringify(after)).toBe(before);
    expect(after.rules['stage.noise-margin'].params.minFraction).toBe(0.1);
    // A run submitted now, naming no version, gets the new default.
    const next = await createQueuedRun(env.ctx, { id: owner.user.id, teamId: team.id }, { netlistId: netlist.id, note: '' });
    expect((await owner.agent.get(`/api/runs/${next}`).expect(200)).body.deck).toMatchObject({ versionId: e2.id, version: 2 });
  });
});

describe('demo seed', () => {
  it("installs the team's deck from the built-in deck as published version 1 with a change note, the team default", async () => {
    await seedDemo(env.ctx.sequelize);
    await seedDemo(env.ctx.sequelize); // idempotent
    const team = (await Team.findOne({ where: { name: DEMO_TEAM } }))!;
    const decks = await RuleDeck.findAll({ where: { teamId: team.id }, include: [{ model: RuleDeckVersion, as: 'versions' }] });
    expect(decks).toHaveLength(1);
    const [deck] = decks;
    expect(deck.teamDefault).toBe(true);
    expect(deck.versions).toHaveLength(1);
    const [v1] = deck.versions!;
    expect(v1).toMatchObject({ version: 1, state: 'published', id: deck.defaultVersionId });
    expect(v1.changeNote.length).toBeGreaterThan(0);
    expect(v1.content).toEqual({ ...defaultDeck(), name: deck.name });
    expect((await versionForRun(team.id))?.id).toBe(v1.id);
  });
});
