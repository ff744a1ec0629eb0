// The base schema as later capabilities will use it: a finding round-trips every
// field of shared/findings.ts Finding (with the SQL reserved words `column` and
// `limit` as column names, SQL:2016 reserved-word list), netlist files keep their
// bytes and SHA-256 (FIPS 180-4 test vector "abc"), deck versions refuse a stale
// save (optimistic locking), and the table constraints hold.

import crypto from 'node:crypto';
import { DatabaseError, OptimisticLockError } from 'sequelize';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { findingSchema, type Finding } from '../../shared/findings';
import { defaultDeck } from '../../rules/default-deck';
import { Block, FindingRow, Netlist, NetlistFile, RuleDeck, RuleDeckVersion, Run, User } from '../../server/db/models';
import { createTeam, createUser, startTestEnv, type TestEnv } from './helpers';

let env: TestEnv;
beforeAll(async () => {
  env = await startTestEnv();
});
afterAll(async () => {
  await env?.close();
});

async function scenario() {
  const team = await createTeam();
  const { user } = await createUser({ team, roles: ['designer'] });
  const block = await Block.create({ teamId: team.id, name: 'model-test-block', createdBy: user.id });
  const netlist = await Netlist.create({ teamId: team.id, blockId: block.id, uploadedBy: user.id });
  const content = Buffer.from('abc');
  const file = await NetlistFile.create({
    netlistId: netlist.id,
    path: 'cells/abc.sp',
    sha256: crypto.createHash('sha256').update(content).digest('hex'),
    size: content.length,
    content,
  });
  const deck = await RuleDeck.create({ teamId: team.id, name: 'model-test-deck', defaultVersionId: null });
  const version = await RuleDeckVersion.create({
    deckId: deck.id,
    version: 1,
    content: defaultDeck(),
    createdBy: user.id,
    publishedBy: null,
    publishedAt: null,
    parentVersionId: null,
  });
  const run = await Run.create({
    teamId: team.id,
    blockId: block.id,
    netlistId: netlist.id,
    deckVersionId: version.id,
    submittedBy: user.id,
    progress: null,
    error: null,
    summary: null,
    startedAt: null,
    finishedAt: null,
  });
  return { team, user, block, netlist, file, deck, version, run };
}

describe('base schema', () => {
  it('stores and reads back every field of a finding', async () => {
    const { run } = await scenario();
    const finding: Finding = findingSchema.parse({
      ruleId: 'dynamic.keeper-missing',
      severity: 'error',
      message: 'dynamic node has no keeper',
      file: 'cells/abc.sp',
      line: 12,
      column: 1,
      cell: 'dom_and2',
      nets: ['dyn', 'out'],
      devices: ['MP1'],
      instances: 2 ** 60,
      measured: { value: 0.42, unit: 'V' },
      limit: { value: 0.25, unit: 'V' },
      fingerprint: '00abcdef012345',
      corner: 'ff-hot',
      plot: { kind: 'budget', bars: [{ label: 'drop', measured: { value: 0.42, unit: 'V' }, limit: { value: 0.25, unit: 'V' }, sense: 'max' }] },
    });
    const row = await FindingRow.create({ runId: run.id, ...finding, corner: finding.corner ?? null, plot: finding.plot ?? null });
    const back = await FindingRow.findByPk(row.id, { raw: true });
    const { id, runId, ...fields } = back as unknown as FindingRow;
    expect(typeof id).toBe('number');
    expect(runId).toBe(run.id);
    expect(findingSchema.parse(fields)).toEqual(finding);
  });

  it('keeps netlist bytes and their SHA-256, and leaves the bytes out unless asked', async () => {
    const { file } = await scenario();
    // FIPS 180-4 / NIST example: SHA-256("abc").
    expect(file.sha256).toBe('ba7816bf8f01cfea414140de5dae2223b00361a396177a9cb410ff61f20015ad');
    const listed = await NetlistFile.findByPk(file.id);
    expect(listed!.get('content')).toBeUndefined();
    const whole = await NetlistFile.unscoped().findByPk(file.id);
    expect(whole!.content.toString()).toBe('abc');
    await expect(NetlistFile.create({ netlistId: file.netlistId, path: 'x.sp', sha256: 'not-hex', size: 0, content: Buffer.alloc(0) })).rejects.toBeInstanceOf(DatabaseError);
  });

  it('refuses a stale save of a deck version (optimistic locking)', async () => {
    const { version } = await scenario();
    const first = (await RuleDeckVersion.findByPk(version.id))!;
    const second = (await RuleDeckVersion.findByPk(version.id))!;
    first.changeNote = 'edited in one tab';
    await first.save();
    expect(first.lockVersion).toBe(version.lockVersion + 1);
    second.changeNote = 'edited in another tab';
    await expect(second.save()).rejects.toBeInstanceOf(OptimisticLockError);
  });

  it('enforces states, roles and lower-case e-mail in the database itself', async () => {
    const { run, team } = await scenario();
    await expect(Run.update({ state: 'exploded' as never }, { where: { id: run.id } })).rejects.toBeInstanceOf(DatabaseError);
    await expect(
      env.ctx.sequelize.query(`insert into users (email, name, roles) values ('Upper@Keepwell.test', 'x', '{designer}')`),
    ).rejects.toThrow(/check constraint/);
    await expect(
      env.ctx.sequelize.query(`insert into users (email, name, roles) values ('ok@keepwell.test', 'x', '{owner}')`),
    ).rejects.toThrow(/check constraint/);
    // The model lower-cases for you.
    const user = await User.create({ email: 'Mixed.Case@Keepwell.TEST', name: 'm', roles: ['designer'], teamId: team.id, passwordHash: null, lastSignInAt: null });
    expect(user.email).toBe('mixed.case@keepwell.test');
  });
});
