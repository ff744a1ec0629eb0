// Waivers over the API, end to end with a real worker: a designer's request mailed to
// the team's reviewers, a reviewer's approval mailed back, the waiver carried to a
// re-run of the same netlist, lapsed when the cell's devices change, when the measured
// value passes the bound and after the expiry date (the service clock moved), the
// one expiry warning, revocation, rejection, direct waivers of the wider scopes in
// another block, and an audit event with actor and time for every change.
//
// Expected measurements come from the netlist text: w=2000u is 2 mm in SPICE's
// scale-factor suffixes (u = 1e-6, ngspice manual §2.3 "Conventions"), against the
// size rule's largest plausible width of 1 mm (its default, a rule of thumb it states).

import { afterAll, afterEach, beforeAll, describe, expect, it } from 'vitest';
import type request from 'supertest';
import type { StoredFinding } from '../../shared/api/runs';
import type { WaiverDetail, WaiverView } from '../../shared/api/waivers';
import { sweepExpiringWaivers, waiverClock } from '../../server/services/waivers';
import { createTeam, PUBLIC_URL, signedInAs, startTestEnv, type TestEnv } from './helpers';
import { startWorker, submitUpload, waitForRun, type WorkerProcess } from './runs-helpers';
import { heronBlock, heronColumn, SIZE_RULE, sizeOnlyTeamDeck } from './waivers-fixtures';

let env: TestEnv;
let worker: WorkerProcess;
const realNow = waiverClock.now;

beforeAll(async () => {
  env = await startTestEnv({ KEEPWELL_LOGIN_MAX_PER_IP: '1000' });
  worker = startWorker(env);
  await worker.ready;
});
afterEach(() => {
  waiverClock.now = realNow;
});
afterAll(async () => {
  waiverClock.now = realNow;
  await worker?.stop();
  await env?.close();
});

const DAY = 24 * 3600 * 1000;

async function findings(agent: request.Agent, runId: string, query: Record<string, string> = {}): Promise<StoredFinding[]> {
  const res = await agent.get(`/api/runs/${runId}/findings`).query({ pageSize: 500, ...query }).expect(200);
  return res.body.items;
}

async function finishedRun(agent: request.Agent, blockId: string, text: string): Promise<string> {
  const run = (await submitUpload(agent, blockId, { 'heron.sp': text }).expect(201)).body.run;
  expect((await waitForRun(agent, run.id)).state).toBe('succeeded');
  return run.id;
}

const inCell = (list: StoredFinding[], cell: string) => {
  const f = list.find((x) => x.cell === cell);
  if (!f) throw new Error(`no finding in ${cell}: ${JSON.stringify(list.map((x) => x.cell))}`);
  return f;
};

describe('waivers', () => {
  let team: Awaited<ReturnType<typeof createTeam>>;
  let designer: Awaited<ReturnType<typeof signedInAs>>;
  let reviewer: Awaited<ReturnType<typeof signedInAs>>;
  let reviewer2: Awaited<ReturnType<typeof signedInAs>>;
  let admin: Awaited<ReturnType<typeof signedInAs>>;
  let blockId: string;
  let run1: string;
  let waiver: WaiverView;
  const createdAt = Date.now();

  beforeAll(async () => {
    team = await createTeam();
    await sizeOnlyTeamDeck(team);
    blockId = (await heronBlock(team)).id;
    designer = await signedInAs(env, team, ['designer']);
    reviewer = await signedInAs(env, team, ['reviewer']);
    reviewer2 = await signedInAs(env, team, ['reviewer']);
    admin = await signedInAs(env, team, ['admin']);
    run1 = await finishedRun(designer.agent, blockId, heronColumn());
  });

  it('a request is mailed to every reviewer of the team, with a link to the waiver', async () => {
    const list = await findings(designer.agent, run1);
    // Two cells carry an oversized device (construction of heronColumn): both open.
    expect(list.map((f) => [f.cell, f.status]).sort()).toEqual([
      ['hcol_drv', 'open'],
      ['hcol_pre', 'open'],
    ]);
    const pre = inCell(list, 'hcol_pre');
    expect(pre.measured).toEqual({ value: 2e-3, unit: 'm' });

    const expiresOn = new Date(createdAt + 30 * DAY).toISOString().slice(0, 10);
    const body = {
      runId: run1,
      findingId: pre.id,
      scope: 'finding',
      justification: 'The pull-downs are drawn as a 2 mm discharge strap on purpose; the column reads within its evaluation window.',
      expiresAt: expiresOn,
      boundValue: 2.5e-3,
    };
    // Reviewers decide; they do not ask (shared/roles.ts: waiver.request is the designer's).
    await reviewer.agent.post('/api/waivers').send(body).expect(403);
    // A bound the measurement already passes makes no sense: 2 mm is beyond 1.5 mm on the "bigger is worse" side.
    const tooTight = await designer.agent.post('/api/waivers').send({ ...body, boundValue: 1.5e-3 }).expect(400);
    expect(tooTight.body.error.details[0].path).toBe('body.boundValue');
    await designer.agent.post('/api/waivers').send({ ...body, expiresAt: '2001-01-01' }).expect(400);

    const res = await designer.agent.post('/api/waivers').send(body).expect(201);
    waiver = res.body;
    expect(waiver).toMatchObject({ state: 'requested', standing: 'pending', scope: 'finding', ruleId: SIZE_RULE, cell: 'hcol_pre', devices: ['mn1', 'mn2'] });
    // The sense follows the rule: measured 2 mm above the 1 mm limit, so bigger is worse.
    expect(waiver.bound).toEqual({ value: 2.5e-3, unit: 'm', sense: 'max' });
    // Through the expiry day, UTC: it ends at the following midnight.
    expect(waiver.expiresAt).toBe(new Date(Date.parse(`${expiresOn}T00:00:00Z`) + DAY).toISOString());
    await designer.agent.post('/api/waivers').send(body).expect(409);

    for (const r of [reviewer, reviewer2]) {
      const mail = await env.smtp.waitFor((m) => m.to.includes(r.email) && m.subject.includes('waiver requested'));
      expect(mail.text).toContain(`${PUBLIC_URL}/waivers/${waiver.id}`);
      expect(mail.text).toContain(body.justification);
    }
    expect(env.smtp.messages.some((m) => m.to.includes(designer.email) && m.subject.includes('waiver requested'))).toBe(false);

    const after = await findings(designer.agent, run1);
    expect(inCell(after, 'hcol_pre')).toMatchObject({ status: 'waiver-requested', waiver: { id: waiver.id, state: 'requested', lapse: null } });
    expect(inCell(after, 'hcol_drv').status).toBe('open');
  });

  it('designers cannot decide; a reviewer approves and the requester is told', async () => {
    await designer.agent.post(`/api/waivers/${waiver.id}/approve`).send({ comment: 'self-approval' }).expect(403);
    const approved = (await reviewer.agent.post(`/api/waivers/${waiver.id}/approve`).send({ comment: 'Checked against the column timing.' }).expect(200)).body;
    expect(approved).toMatchObject({ state: 'approved', standing: 'active', decider: { id: reviewer.user.id }, decisionComment: 'Checked against the column timing.' });
    await reviewer2.agent.post(`/api/waivers/${waiver.id}/approve`).send({}).expect(409);

    const mail = await env.smtp.waitFor((m) => m.to.includes(designer.email) && m.subject.includes('was approved'));
    expect(mail.text).toContain(`${PUBLIC_URL}/waivers/${waiver.id}`);

    expect((await findings(designer.agent, run1, { status: 'waived' })).map((f) => f.cell)).toEqual(['hcol_pre']);
    expect((await findings(designer.agent, run1, { status: 'open' })).map((f) => f.cell)).toEqual(['hcol_drv']);
    // The run's counts follow the same decision.
    const detail = (await designer.agent.get(`/api/runs/${run1}`).expect(200)).body;
    expect(detail.statusCounts.bySeverity.error).toEqual({ open: 1, waived: 1, 'waiver-requested': 0, 'waiver-lapsed': 0 });
  });

  it('carries over to a re-run of the same netlist', async () => {
    const run = (await designer.agent.get(`/api/runs/${run1}`).expect(200)).body;
    const rerun = (await designer.agent.post('/api/runs').send({ netlistId: run.netlistId }).expect(201)).body.run;
    expect((await waitForRun(designer.agent, rerun.id)).state).toBe('succeeded');
    const list = await findings(designer.agent, rerun.id);
    expect(inCell(list, 'hcol_pre')).toMatchObject({ status: 'waived', waiver: { id: waiver.id, lapse: null } });
    // One finding by id agrees with the list.
    const one = (await designer.agent.get(`/api/runs/${rerun.id}/findings/${inCell(list, 'hcol_pre').id}`).expect(200)).body;
    expect(one.status).toBe('waived');
  });

  it('lapses, with the reason, when the cell’s devices change', async () => {
    const changed = await finishedRun(designer.agent, blockId, heronColumn({ secondName: 'mn3' }));
    const pre = inCell(await findings(designer.agent, changed), 'hcol_pre');
    expect(pre.devices).toEqual(['mn1', 'mn3']);
    expect(pre.status).toBe('waiver-lapsed');
    expect(pre.waiver).toMatchObject({ id: waiver.id, lapse: 'changed' });
    expect(pre.waiver!.reason).toMatch(/devices or nets changed.*mn1, mn2/);
  });

  it('lapses when the measured value gets worse than the bound', async () => {
    // mn1 drawn 3 mm: the fingerprint (rule, cell, device and net names) is unchanged, the measurement is past the 2.5 mm bound.
    const wider = await finishedRun(designer.agent, blockId, heronColumn({ preWidth: 3000 }));
    const pre = inCell(await findings(designer.agent, wider), 'hcol_pre');
    expect(pre.measured).toEqual({ value: 3e-3, unit: 'm' });
    expect(pre.status).toBe('waiver-lapsed');
    expect(pre.waiver).toMatchObject({ lapse: 'bound' });
    expect(pre.waiver!.reason).toBe('Measured 3 mm is worse than the waiver’s bound of 2.5 mm (at most).');
    // 2.2 mm is within the bound: still waived.
    const within = await finishedRun(designer.agent, blockId, heronColumn({ preWidth: 2200 }));
    expect(inCell(await findings(designer.agent, within), 'hcol_pre').status).toBe('waived');
  });

  it('warns a week ahead, once, and lapses after its expiry date', async () => {
    const expiresAt = Date.parse(waiver.expiresAt!);
    // 8 days ahead: nothing to warn about yet.
    expect(await sweepExpiringWaivers(env.ctx, new Date(expiresAt - 8 * DAY))).toBe(0);
    expect(await sweepExpiringWaivers(env.ctx, new Date(expiresAt - 5 * DAY))).toBe(1);
    expect(await sweepExpiringWaivers(env.ctx, new Date(expiresAt - 4 * DAY))).toBe(0);
    const warned = await env.smtp.waitFor((m) => m.to.includes(designer.email) && m.subject.includes('expires on'));
    expect(warned.subject).toContain(new Date(expiresAt - 1).toISOString().slice(0, 10));
    await env.smtp.waitFor((m) => m.to.includes(reviewer.email) && m.subject.includes('expires on'));
    await env.ctx.outbox.whenIdle();
    expect(env.smtp.messages.filter((m) => m.subject.includes('expires on') && m.text.includes(waiver.id))).toHaveLength(2);

    waiverClock.now = () => new Date(expiresAt - 1000);
    expect(inCell(await findings(designer.agent, run1), 'hcol_pre').status).toBe('waived');
    waiverClock.now = () => new Date(expiresAt + 1000);
    const pre = inCell(await findings(designer.agent, run1), 'hcol_pre');
    expect(pre.status).toBe('waiver-lapsed');
    expect(pre.waiver).toMatchObject({ lapse: 'expired' });
    expect(pre.waiver!.reason).toBe(`The waiver expired on ${new Date(expiresAt).toISOString().slice(0, 10)}.`);
    expect((await designer.agent.get(`/api/waivers/${waiver.id}`).expect(200)).body.standing).toBe('expired');
  });

  it('a revoked waiver stops applying and stays listed', async () => {
    await designer.agent.post(`/api/waivers/${waiver.id}/revoke`).send({ reason: 'no' }).expect(403);
    await reviewer.agent.post(`/api/waivers/${waiver.id}/revoke`).send({ reason: '' }).expect(400);
    const revoked = (await reviewer.agent.post(`/api/waivers/${waiver.id}/revoke`).send({ reason: 'The column timing changed in the new floorplan.' }).expect(200)).body;
    expect(revoked).toMatchObject({ state: 'revoked', standing: 'revoked', revoker: { id: reviewer.user.id } });
    expect(inCell(await findings(designer.agent, run1), 'hcol_pre')).toMatchObject({ status: 'open', waiver: null });
    const listed = (await admin.agent.get('/api/waivers').query({ standing: 'revoked' }).expect(200)).body;
    expect(listed.items.map((w: WaiverView) => w.id)).toContain(waiver.id);
    await reviewer.agent.post(`/api/waivers/${waiver.id}/revoke`).send({ reason: 'again' }).expect(409);
  });

  it('a rejection needs a comment and leaves the finding open', async () => {
    const drv = inCell(await findings(designer.agent, run1), 'hcol_drv');
    const req = (
      await designer.agent
        .post('/api/waivers')
        .send({ runId: run1, findingId: drv.id, scope: 'rule-in-cell', justification: 'The driver is a test structure; it never toggles in mission mode.' })
        .expect(201)
    ).body as WaiverView;
    expect(req.fingerprint).toBeNull();
    await reviewer.agent.post(`/api/waivers/${req.id}/reject`).send({ comment: '' }).expect(400);
    const rejected = (await reviewer.agent.post(`/api/waivers/${req.id}/reject`).send({ comment: 'Test structures need their own deck.' }).expect(200)).body;
    expect(rejected.standing).toBe('rejected');
    await env.smtp.waitFor((m) => m.to.includes(designer.email) && m.subject.includes('was rejected'));
    expect(inCell(await findings(designer.agent, run1), 'hcol_drv').status).toBe('open');
  });

  it('direct waivers: the cell scope reaches every block, the finding scope only its own', async () => {
    const list = await findings(reviewer.agent, run1);
    await designer.agent
      .post('/api/waivers/direct')
      .send({ runId: run1, findingId: inCell(list, 'hcol_pre').id, scope: 'finding', justification: 'designers cannot waive directly at all' })
      .expect(403);
    const pre = (
      await reviewer.agent
        .post('/api/waivers/direct')
        .send({ runId: run1, findingId: inCell(list, 'hcol_pre').id, scope: 'finding', justification: 'Discharge strap, reviewed with the column owner.' })
        .expect(201)
    ).body as WaiverView;
    expect(pre).toMatchObject({ state: 'approved', requester: { id: reviewer.user.id }, decider: { id: reviewer.user.id } });
    await reviewer.agent
      .post('/api/waivers/direct')
      .send({ runId: run1, findingId: inCell(list, 'hcol_drv').id, scope: 'cell', justification: 'Library driver, characterised separately.' })
      .expect(201);

    const other = (await heronBlock(team, 'heron-column-b')).id;
    const runB = await finishedRun(designer.agent, other, heronColumn());
    const inB = await findings(designer.agent, runB);
    expect(inCell(inB, 'hcol_drv').status).toBe('waived');
    expect(inCell(inB, 'hcol_pre').status).toBe('open');
    expect(inCell(await findings(designer.agent, run1), 'hcol_pre').status).toBe('waived');

    // Another team sees none of it.
    const stranger = await signedInAs(env, await createTeam(), ['reviewer']);
    await stranger.agent.get(`/api/waivers/${pre.id}`).expect(404);
    await stranger.agent.post(`/api/waivers/${pre.id}/revoke`).send({ reason: 'not mine' }).expect(404);
  });

  it('keeps a complete audit trail: every state change has its event, actor and time', async () => {
    const detail = (await designer.agent.get(`/api/waivers/${waiver.id}`).expect(200)).body as WaiverDetail;
    expect(detail.history.map((e) => [e.action, e.actor?.id ?? null])).toEqual([
      ['waiver.request', designer.user.id],
      ['waiver.approve', reviewer.user.id],
      ['waiver.expiry-warning', null],
      ['waiver.revoke', reviewer.user.id],
    ]);
    for (const e of detail.history) expect(Date.parse(e.at)).toBeGreaterThanOrEqual(createdAt - 1000);
    const times = detail.history.map((e) => Date.parse(e.at));
    expect(times).toEqual([...times].sort((a, b) => a - b));
    expect(detail.history[3].detail).toMatchObject({ reason: 'The column timing changed in the new floorplan.', was: 'approved' });

    // The team's audit trail holds one event per waiver change, each with its actor, and the waivers still exist: nothing deleted.
    const audit = (await admin.agent.get('/api/audit').query({ pageSize: 500 }).expect(200)).body.items as { action: string; subjectId: string; actor: { id: string } | null }[];
    const waiverEvents = audit.filter((e) => e.action.startsWith('waiver.'));
    const all = (await admin.agent.get('/api/waivers').query({ pageSize: 500 }).expect(200)).body.items as WaiverView[];
    expect(all).toHaveLength(4);
    for (const w of all) {
      const events = waiverEvents.filter((e) => e.subjectId === w.id).map((e) => e.action);
      const expected = {
        requested: ['waiver.request'],
        approved: w.requester?.id === w.decider?.id ? ['waiver.grant'] : ['waiver.request', 'waiver.approve'],
        rejected: ['waiver.request', 'waiver.reject'],
        revoked: ['waiver.request', 'waiver.approve', 'waiver.expiry-warning', 'waiver.revoke'],
      }[w.state];
      expect(events.reverse(), `${w.id} ${w.state}`).toEqual(expected);
    }
    expect(waiverEvents.filter((e) => e.action !== 'waiver.expiry-warning').every((e) => e.actor !== null)).toBe(true);
  });
});

describe('withdrawing a request', () => {
  /** A team with the size rule only, a finished run of the Heron column by its designer, and a reviewer; `ask` requests a waiver for a cell's finding. */
  async function teamWithRun() {
    const team = await createTeam();
    await sizeOnlyTeamDeck(team);
    const blockId = (await heronBlock(team)).id;
    const designer = await signedInAs(env, team, ['designer']);
    const reviewer = await signedInAs(env, team, ['reviewer']);
    const run = await finishedRun(designer.agent, blockId, heronColumn());
    const ask = async (cell: string) => {
      const f = inCell(await findings(designer.agent, run), cell);
      return (await designer.agent.post('/api/waivers').send({ runId: run, findingId: f.id, scope: 'finding', justification: 'Sized for the slow corner only; see the column sizing note.' }).expect(201))
        .body as WaiverView;
    };
    return { team, designer, reviewer, run, ask };
  }

  it('the requester withdraws their own pending request; nobody else can, and a decided one is not withdrawn', async () => {
    const { team, designer, reviewer, run, ask } = await teamWithRun();
    const otherDesigner = await signedInAs(env, team, ['designer']);
    const asked = await ask('hcol_pre');
    expect(inCell(await findings(designer.agent, run), 'hcol_pre').status).toBe('waiver-requested');

    await otherDesigner.agent.post(`/api/waivers/${asked.id}/withdraw`).send({ reason: 'not mine to withdraw' }).expect(403);
    // Every role but the designer's is refused by the route (shared/roles.ts: waiver.request); reviewers reject instead.
    for (const roles of [['reviewer'], ['methodology'], ['admin']] as const) {
      const someone = roles[0] === 'reviewer' ? reviewer : await signedInAs(env, team, [...roles]);
      await someone.agent.post(`/api/waivers/${asked.id}/withdraw`).send({ reason: 'not theirs to withdraw' }).expect(403);
    }
    await designer.agent.post(`/api/waivers/${asked.id}/withdraw`).send({ reason: '' }).expect(400);
    const withdrawn = (await designer.agent.post(`/api/waivers/${asked.id}/withdraw`).send({ reason: 'Resized the strap instead.' }).expect(200)).body;
    expect(withdrawn).toMatchObject({ state: 'revoked', standing: 'revoked', revoker: { id: designer.user.id }, revokeReason: 'Resized the strap instead.' });
    expect(inCell(await findings(designer.agent, run), 'hcol_pre')).toMatchObject({ status: 'open', waiver: null });
    const detail = (await designer.agent.get(`/api/waivers/${asked.id}`).expect(200)).body as WaiverDetail;
    expect(detail.history.map((e) => [e.action, e.actor?.id ?? null])).toEqual([
      ['waiver.request', designer.user.id],
      ['waiver.withdraw', designer.user.id],
    ]);
    await designer.agent.post(`/api/waivers/${asked.id}/withdraw`).send({ reason: 'again' }).expect(409);

    // Once a reviewer has approved it, ending it is a revocation (reviewer or admin), not a withdrawal.
    const approved = await ask('hcol_drv');
    await reviewer.agent.post(`/api/waivers/${approved.id}/approve`).send({ comment: '' }).expect(200);
    await designer.agent.post(`/api/waivers/${approved.id}/withdraw`).send({ reason: 'changed my mind' }).expect(409);
  });

  it('a reviewer rejects a pending request rather than revoking it; an admin, who cannot decide, may cancel it', async () => {
    const { team, designer, reviewer, run, ask } = await teamWithRun();
    const admin = await signedInAs(env, team, ['admin']);
    const asked = await ask('hcol_pre');

    const refused = await reviewer.agent.post(`/api/waivers/${asked.id}/revoke`).send({ reason: 'not this way' }).expect(409);
    expect(refused.body.error.message).toMatch(/reject it/);
    expect((await reviewer.agent.get(`/api/waivers/${asked.id}`).expect(200)).body).toMatchObject({ state: 'requested', revoker: null });

    const cancelled = (await admin.agent.post(`/api/waivers/${asked.id}/revoke`).send({ reason: 'The requester has left the project.' }).expect(200)).body;
    expect(cancelled).toMatchObject({ state: 'revoked', revoker: { id: admin.user.id }, revokeReason: 'The requester has left the project.' });
    expect(inCell(await findings(designer.agent, run), 'hcol_pre')).toMatchObject({ status: 'open', waiver: null });
  });
});
