// Runs through real worker processes (`server/worker/main.ts` under child_process)
// against the real PostgreSQL and Redis of the test setup, on the test's own queue
// prefix. What must hold whatever happens to a process: a run ends once, with each
// finding stored exactly once, and PostgreSQL — not the queue — decides what a run is.
//
// Expected findings come from how the netlists are built (runs-helpers.ts
// nandBlock: one implausibly wide device in known cells, flagged once per cell by the
// built-in deck) and from the checker run in this process on the same text: the
// queue must neither lose nor invent a finding.

import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { readDesign } from '../../grammar/index';
import { checkDesign } from '../../rules/engine';
import { defaultDeck } from '../../rules/default-deck';
import { createTeam, signedInAs, startTestEnv, type TestEnv } from './helpers';
import {
  countOversized,
  executionsOf,
  makeRunTeamSetup,
  nandBlock,
  startWorker,
  storedFindings,
  submitUpload,
  waitForRun,
  type WorkerProcess,
} from './runs-helpers';

let env: TestEnv;
const workers: WorkerProcess[] = [];
const spawnWorker = (extra: Record<string, string> = {}) => {
  const w = startWorker(env, extra);
  workers.push(w);
  return w;
};

beforeAll(async () => {
  env = await startTestEnv({ KEEPWELL_LOGIN_MAX_PER_IP: '1000' });
});
afterEach(async () => {
  await Promise.all(workers.splice(0).map((w) => w.stop()));
});
afterAll(async () => {
  await env?.close();
});

/** What the checker finds on this text in this process, with the built-in deck. */
function referenceFindings(files: Record<string, string>) {
  const deck = defaultDeck();
  const design = readDesign(files, { defaultScale: deck.scale, deviceMap: deck.deviceMap, supplies: deck.supplies });
  return checkDesign(design, deck).findings;
}

async function setup(roles: ('designer' | 'admin' | 'methodology')[] = ['designer']) {
  const team = await createTeam();
  const { block, version } = await makeRunTeamSetup(team);
  const user = await signedInAs(env, team, roles);
  return { team, block, version, ...user };
}

describe('a run through a worker process', () => {
  it('goes queued → running → succeeded, stores every finding once, and mails the submitter', async () => {
    const { agent, block, email } = await setup();
    const cells = 240;
    const text = nandBlock(cells);
    const res = await submitUpload(agent, block.id, { 'lantern_nand.sp': text }, { note: 'first look' });
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    expect(res.body.run.state).toBe('queued');
    expect(res.body.upload.reused).toBe(false);
    const runId: string = res.body.run.id;

    const worker = spawnWorker();
    await worker.ready;
    const seen: string[] = [];
    let sawProgress = false;
    const run = await waitForRun(agent, runId, (r) => {
      if (r.state === 'running' && r.progress && r.progress.stage === 'checking' && r.progress.total > 0) sawProgress = true;
      return r.state === 'succeeded' || r.state === 'failed';
    }, { seen, intervalMs: 50, describe: worker.output });
    expect(run.state, run.error ?? '').toBe('succeeded');
    expect(seen).toEqual(['queued', 'running', 'succeeded']);
    expect(sawProgress).toBe(true);

    // Every third cell carries one 2 mm device: one implausible-size finding each (construction of nandBlock).
    const stored = await storedFindings(env, runId);
    expect(stored.filter((f) => f.rule_id === 'device.implausible-size')).toHaveLength(countOversized(cells));
    const reference = referenceFindings({ 'lantern_nand.sp': text });
    expect(stored.map((f) => f.fingerprint).sort()).toEqual(reference.map((f) => f.fingerprint).sort());
    expect(run.summary?.errors).toBe(reference.filter((f) => f.severity === 'error').length);
    expect(run.summary?.cells).toBe(cells + 1);

    const detail = (await agent.get(`/api/runs/${runId}`).expect(200)).body;
    const sizeRule = detail.breakdown.byRule.find((r: { ruleId: string }) => r.ruleId === 'device.implausible-size');
    expect(sizeRule.findings).toBe(countOversized(cells));
    // Each cell occurs once under the top cell (nandBlock instantiates every cell once).
    expect(detail.breakdown.byCell.find((c: { cell: string }) => c.cell === 'lnand0').cellInstances).toBe(1);

    const mail = await env.smtp.waitFor((m) => m.to.includes(email) && m.subject.includes('lantern-test-block'));
    expect(mail.text).toContain(`${env.config.publicUrl}/runs/${runId}`);
    expect(mail.text).toContain(`${countOversized(cells)} errors`);
    expect(mail.text).toContain('never replace');
  });
});
