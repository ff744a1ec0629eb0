// "What would change": a draft previewed on the team's newest netlist against the
// version it started from. The netlist (decks-fixtures.ts) has an inverter with a
// 2 µm pull-up and a 1 µm pull-down, and a lone 2 µm transistor. Expectations come
// from outside the checker:
// - a size limit of 1.5 µm flags exactly the devices wider than that (Mp, Mw): one
//   finding per cell, two cells;
// - noise margins: NMH + NML = (VOH − VOL) − (VIH − VIL) < VDD for any stage with a
//   transition region (definitions in Rabaey et al., Digital Integrated Circuits,
//   2nd ed., §5.3), so the smaller margin is below VDD/2 and a deck asking for half
//   the supply must flag the inverter; the lone transistor has no pull-up and is not a
//   stage with margins.

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { deckVersionSchema, previewSchema, type DeckVersion } from '../../shared/api/decks';
import { Block } from '../../server/db/models';
import { previewVersion } from '../../server/services/decks-preview';
import { createTeam, signedInAs, startTestEnv, type TestEnv } from './helpers';
import { deckWithOnly, INVERTER_NETLIST, makeDeck, makeNetlist } from './decks-fixtures';
import type request from 'supertest';

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv();
});
afterAll(async () => {
  await env?.close();
});

// Only the two rules under test run, whatever else the registry holds.
const strictSizes = () =>
  deckWithOnly(['device.implausible-size', 'stage.noise-margin'], (deck) => {
    deck.rules['device.implausible-size'].params.maxWidth = 1.5e-6;
  });

async function scenario() {
  const team = await createTeam();
  const owner = await signedInAs(env, team, ['methodology']);
  const block = await Block.create({ teamId: team.id, name: 'preview-block', createdBy: null });
  // An older upload with nothing to find, then the one the preview must use.
  await makeNetlist(team.id, block.id, { 'empty.sp': '* nothing here\n.end\n' });
  await new Promise((r) => setTimeout(r, 10));
  const netlist = await makeNetlist(team.id, block.id, { 'lib/cells.sp': INVERTER_NETLIST });
  const { published } = await makeDeck(team.id, { content: strictSizes() });
  const draft = deckVersionSchema.parse((await owner.agent.post(`/api/decks/${published.deckId}/drafts`).send({}).expect(201)).body);
  return { team, owner, block, netlist, published, draft };
}

async function edit(agent: request.Agent, v: DeckVersion, changes: object[]) {
  return deckVersionSchema.parse((await agent.patch(`/api/decks/${v.deckId}/versions/${v.id}`).send({ lockVersion: v.lockVersion, changes }).expect(200)).body);
}

async function preview(agent: request.Agent, v: DeckVersion, body: object = {}) {
  return previewSchema.parse((await agent.post(`/api/decks/${v.deckId}/versions/${v.id}/preview`).send(body).expect(200)).body);
}

describe('preview of a draft', () => {
  it('shows findings disappearing when their rule is disabled, appearing when a threshold is tightened, and re-graded ones as changed', async () => {
    const { owner, block, netlist, published, draft } = await scenario();

    const same = await preview(owner.agent, draft);
    expect(same.netlist).toMatchObject({ id: netlist.id, blockId: block.id, blockName: 'preview-block', files: 1 });
    expect(same.base).toEqual({ versionId: published.id, version: 1, label: 'version 1' });
    expect(same.counts).toEqual({ base: 2, draft: 2, added: 0, removed: 0, changed: 0 });

    const disabled = await edit(owner.agent, draft, [{ op: 'replace', path: '/rules/device.implausible-size/enabled', value: false }]);
    const gone = await preview(owner.agent, disabled);
    expect(gone.added).toEqual([]);
    expect(gone.removed.map((f) => [f.ruleId, f.cell, f.devices]).sort()).toEqual([
      ['device.implausible-size', 'tinv', ['Mp']],
      ['device.implausible-size', 'wide', ['Mw']],
    ]);
    expect(gone.removed.every((f) => f.file === 'lib/cells.sp')).toBe(true);

    const tightened = await edit(owner.agent, disabled, [
      { op: 'replace', path: '/rules/device.implausible-size/enabled', value: true },
      { op: 'replace', path: '/rules/stage.noise-margin/params/minFraction', value: 0.5 },
    ]);
    const appeared = await preview(owner.agent, tightened);
    expect(appeared.removed).toEqual([]);
    expect(appeared.added).toHaveLength(1);
    const [margin] = appeared.added;
    expect(margin).toMatchObject({ ruleId: 'stage.noise-margin', cell: 'tinv', severity: 'warning' });
    // The measured margin is below its limit, and the limit is half of the corner's supply.
    expect(margin.measured!.value).toBeLessThan(margin.limit!.value);
    const corner = tightened.content.corners.find((c) => c.name === margin.corner)!;
    expect(margin.limit!.value).toBeCloseTo(corner.vdd / 2, 12);

    const regraded = await edit(owner.agent, tightened, [
      { op: 'replace', path: '/rules/stage.noise-margin/params/minFraction', value: 0.1 },
      { op: 'replace', path: '/rules/device.implausible-size/severity', value: 'warning' },
    ]);
    const changed = await preview(owner.agent, regraded);
    expect(changed.counts).toMatchObject({ added: 0, removed: 0, changed: 2 });
    expect(changed.changed.map((c) => [c.before.severity, c.after.severity])).toEqual([
      ['error', 'warning'],
      ['error', 'warning'],
    ]);
  });

  it('previews a chosen netlist, says so when the team has none, and stops at its time limit', async () => {
    const team = await createTeam();
    const owner = await signedInAs(env, team, ['methodology']);
    const { deck, draft } = await makeDeck(team.id, { draft: true, content: strictSizes() });
    const none = await owner.agent.post(`/api/decks/${deck.id}/versions/${draft!.id}/preview`).send({}).expect(409);
    expect(none.body.error.code).toBe('no-netlist');

    const block = await Block.create({ teamId: team.id, name: 'chosen-block', createdBy: null });
    const chosen = await makeNetlist(team.id, block.id, { 'cells.sp': INVERTER_NETLIST });
    await makeNetlist(team.id, block.id, { 'later.sp': '* a later upload\n.end\n' });
    const res = previewSchema.parse((await owner.agent.post(`/api/decks/${deck.id}/versions/${draft!.id}/preview`).send({ netlistId: chosen.id }).expect(200)).body);
    expect(res.netlist.id).toBe(chosen.id);
    expect(res.counts).toMatchObject({ base: 2, draft: 2 });

    // Four hundred distinct inverters take a few hundred milliseconds to check twice; a 20 ms limit stops the
    // thread, and the next preview gets a fresh one.
    const many = Array.from({ length: 400 }, (_, i) => `.subckt inv${i} a y vdd vss\nMp y a vdd vdd pmos w=${(1 + i / 100).toFixed(2)}e-6 l=0.25e-6\nMn y a vss vss nmos w=1e-6 l=0.25e-6\n.ends inv${i}\nX${i} in o${i} vdd vss inv${i}\n`);
    const slow = await makeNetlist(team.id, block.id, { 'many.sp': many.join('') + '.end\n' });
    await expect(previewVersion(env.ctx, team.id, deck.id, draft!.id, { netlistId: slow.id }, { timeMs: 20 })).rejects.toMatchObject({ status: 504, code: 'preview-timeout' });
    const after = await previewVersion(env.ctx, team.id, deck.id, draft!.id, { netlistId: chosen.id });
    expect(after.counts).toMatchObject({ base: 2, draft: 2 });
  });
});
