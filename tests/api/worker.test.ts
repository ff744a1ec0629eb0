// Runs through real worker processes (`server/worker/main.ts` under child_process)
// against the real PostgreSQL and Redis of the test setup, on the test's own queue
// prefix. What must hold whatever happens to a process: a run ends once, with each
// finding stored exactly once, and PostgreSQL — not the queue — decides what a run is.
//
// Expected findings come from how the netlists are built (runs-helpers.ts
// nandBlock: one implausibly wide device in known cells, flagged once per cell by the
// built-in deck) and from the checker run in this process on the same text: the
// queue must neither lose nor invent a finding.

import { QueryTypes } from 'sequelize';
import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import { readDesign } from '../../grammar/index';
import { checkDesign } from '../../rules/engine';
import { defaultDeck } from '../../rules/default-deck';
import { runQueue } from '../../server/queue';
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

    // The state before any worker exists, read through the API like the later ones (a fast worker
    // takes the run before the first poll after its start).
    const seen: string[] = [(await agent.get(`/api/runs/${runId}`).expect(200)).body.state];
    const worker = spawnWorker();
    await worker.ready;
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

describe('bad input', () => {
  it('fails the run with the reader\'s messages and never retries it', async () => {
    const { agent, block } = await setup();
    // SPICE requires an X line to name a defined subcircuit; line 3 names none.
    const text = '* Lantern test: an instance of a cell nobody defined\n.subckt lbuf a y vdd vss\nx1 a y vdd vss lmissing_inv\n.ends\n';
    const res = await submitUpload(agent, block.id, { 'bad.sp': text });
    expect(res.status).toBe(201);
    spawnWorker();
    const run = await waitForRun(agent, res.body.run.id);
    expect(run.state).toBe('failed');
    expect(run.error).toMatch(/bad\.sp:3:\d+: .*unknown subcircuit "lmissing_inv"/);
    const detail = (await agent.get(`/api/runs/${run.id}`).expect(200)).body;
    expect(detail.diagnostics.some((d: { code: string; line: number }) => d.code === 'unknown-subckt' && d.line === 3)).toBe(true);
    // Give BullMQ's backoff (200 ms in tests) time to retry, if it wrongly would.
    await new Promise((r) => setTimeout(r, 1500));
    const executions = await executionsOf(env, [run.id]);
    expect(executions.map((e) => e.outcome)).toEqual(['failed']);
    expect(await storedFindings(env, run.id)).toHaveLength(0);
  });
});

describe('cancelling', () => {
  it('a queued run leaves the queue and is never worked on', async () => {
    const { agent, block } = await setup();
    const res = await submitUpload(agent, block.id, { 'q.sp': nandBlock(5) });
    const runId = res.body.run.id;
    expect(await runQueue(env.ctx).getJob(runId)).toBeTruthy();
    const cancelled = await agent.post(`/api/runs/${runId}/cancel`).expect(200);
    expect(cancelled.body.state).toBe('cancelled');
    expect(await runQueue(env.ctx).getJob(runId)).toBeFalsy();
    const worker = spawnWorker();
    await worker.ready;
    await new Promise((r) => setTimeout(r, 1500));
    expect((await waitForRun(agent, runId)).state).toBe('cancelled');
    expect((await executionsOf(env, [runId])).filter((e) => e.outcome !== 'skipped')).toHaveLength(0);
  });

  it('a running run stops at its next stage, writes nothing, and frees the worker', async () => {
    const { agent, block } = await setup();
    const res = await submitUpload(agent, block.id, { 'long.sp': nandBlock(1500) });
    const runId = res.body.run.id;
    spawnWorker({ KEEPWELL_SPLIT_MIN_CELLS: '1000000' });
    await waitForRun(agent, runId, (r) => r.state === 'running' && r.progress?.stage === 'checking' && r.progress.done > 0, { timeoutMs: 60_000 });
    const cancelled = await agent.post(`/api/runs/${runId}/cancel`).expect(200);
    expect(cancelled.body.state).toBe('cancelled');
    const deadline = Date.now() + 10_000;
    let outcomes: (string | null)[] = [];
    while (Date.now() < deadline) {
      outcomes = (await executionsOf(env, [runId])).map((e) => e.outcome);
      if (outcomes.includes('cancelled')) break;
      await new Promise((r) => setTimeout(r, 100));
    }
    expect(outcomes).toEqual(['cancelled']);
    expect(await storedFindings(env, runId)).toHaveLength(0);
    expect((await waitForRun(agent, runId)).state).toBe('cancelled');
    // The thread was torn down and replaced: the next run goes through.
    const next = await submitUpload(agent, block.id, { 'next.sp': nandBlock(6) });
    expect((await waitForRun(agent, next.body.run.id)).state).toBe('succeeded');
  });
});

describe('a worker killed mid-run', () => {
  it('leaves its part to another worker, and the run completes with exactly one copy of each finding', async () => {
    const { agent, block } = await setup();
    const cells = 450;
    const text = nandBlock(cells);
    // Parts of 100 cells take a second or more each, so the kill lands well inside one.
    const split = { KEEPWELL_SPLIT_MIN_CELLS: '100', KEEPWELL_CELLS_PER_PART: '100' };
    const res = await submitUpload(agent, block.id, { 'split.sp': text });
    const runId: string = res.body.run.id;
    const first = spawnWorker({ ...split, KEEPWELL_WORKER_NAME: 'first' });

    // Wait until a part is staged and the first worker is inside the next one, then kill it.
    const deadline = Date.now() + 60_000;
    let interrupted: { job_id: string } | undefined;
    for (;;) {
      const [{ staged }] = await env.ctx.sequelize.query<{ staged: number }>('select cast(count(*) as integer) as staged from run_parts where run_id = :runId', {
        replacements: { runId },
        type: QueryTypes.SELECT,
      });
      const open = (await executionsOf(env, [runId])).filter((e) => e.kind === 'part' && e.outcome === null);
      if (staged >= 1 && open.length === 1) {
        interrupted = open[0];
        break;
      }
      if (Date.now() > deadline) throw new Error(`no part in progress: ${first.output()}`);
      await new Promise((r) => setTimeout(r, 30));
    }
    await first.kill();

    spawnWorker({ ...split, KEEPWELL_WORKER_NAME: 'second' });
    const run = await waitForRun(agent, runId, undefined, { timeoutMs: 90_000 });
    expect(run.state, run.error ?? '').toBe('succeeded');
    expect(run.parts).toBe(Math.ceil((cells + 1) / 100));

    const stored = await storedFindings(env, runId);
    const fingerprints = stored.map((f) => f.fingerprint);
    expect(new Set(fingerprints).size).toBe(fingerprints.length);
    expect(stored.filter((f) => f.rule_id === 'device.implausible-size')).toHaveLength(countOversized(cells));
    const reference = referenceFindings({ 'split.sp': text });
    expect(fingerprints.sort()).toEqual(reference.map((f) => f.fingerprint).sort());
    expect(run.summary?.errors).toBe(reference.filter((f) => f.severity === 'error').length);

    // The interrupted part was executed again, by the second worker, and staged once.
    const executions = await executionsOf(env, [runId]);
    const retried = executions.filter((e) => e.job_id === interrupted!.job_id);
    expect(retried.map((e) => [e.worker, e.outcome])).toEqual([
      ['first', null],
      ['second', 'staged'],
    ]);
    expect(executions.filter((e) => e.kind === 'merge' && e.outcome === 'succeeded')).toHaveLength(1);
  });
});

describe('two workers', () => {
  it('share twenty runs, and no run is worked on twice', async () => {
    const { agent, block } = await setup();
    const a = spawnWorker({ KEEPWELL_WORKER_NAME: 'worker-a' });
    const b = spawnWorker({ KEEPWELL_WORKER_NAME: 'worker-b' });
    await Promise.all([a.ready, b.ready]);
    const responses = await Promise.all(
      Array.from({ length: 20 }, (_, i) => submitUpload(agent, block.id, { [`slice${i}.sp`]: nandBlock(20 + i, (k) => k < i % 4, `ls${i}_`) })),
    );
    for (const r of responses) expect(r.status, JSON.stringify(r.body)).toBe(201);
    const ids: string[] = responses.map((r) => r.body.run.id);
    const runs = await Promise.all(ids.map((id) => waitForRun(agent, id, undefined, { timeoutMs: 120_000 })));
    expect(runs.map((r) => r.state)).toEqual(Array(20).fill('succeeded'));
    runs.forEach((r, i) => expect(r.summary?.errors).toBe(i % 4));

    const executions = await executionsOf(env, ids);
    const perRun = new Map<string, number>();
    for (const e of executions) perRun.set(e.run_id, (perRun.get(e.run_id) ?? 0) + 1);
    expect([...perRun.values()]).toEqual(Array(20).fill(1));
    const byWorker = new Map<string, number>();
    for (const e of executions) byWorker.set(e.worker, (byWorker.get(e.worker) ?? 0) + 1);
    expect(byWorker.get('worker-a')).toBeGreaterThan(0);
    expect(byWorker.get('worker-b')).toBeGreaterThan(0);
  });
});
