// The review report of a run (JSON for the printable page, PDF, CSV): deck version and
// its publish note, counts by severity and status, every open error, every lapsed
// waiver with its reason, every waiver with justification, requester, approver and
// dates, and the review caution in each. CSV is read back with a parser written from
// RFC 4180's grammar (§2); the PDF is checked against the structure ISO 32000-1 §7.5
// requires (header, cross-reference, trailer, %%EOF).

import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { ReviewReport } from '../../shared/api/reports';
import type { StoredFinding } from '../../shared/api/runs';
import { REVIEW_CAUTION } from '../../shared/findings';
import { csvField } from '../../server/services/reports';
import { createTeam, signedInAs, startTestEnv, type TestEnv } from './helpers';
import { startWorker, submitUpload, waitForRun, type WorkerProcess } from './runs-helpers';
import { heronBlock, heronWithSense, sizeOnlyTeamDeck } from './waivers-fixtures';

let env: TestEnv;
let worker: WorkerProcess;

beforeAll(async () => {
  env = await startTestEnv({ KEEPWELL_LOGIN_MAX_PER_IP: '1000' });
  worker = startWorker(env);
  await worker.ready;
});
afterAll(async () => {
  await worker?.stop();
  await env?.close();
});

/** RFC 4180 §2: records split by CRLF, fields by commas; a quoted field may hold commas, CRLF and doubled quotes. */
function parseCsv(text: string): string[][] {
  const records: string[][] = [];
  let field = '';
  let record: string[] = [];
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (quoted) {
      if (c === '"' && text[i + 1] === '"') (field += '"'), i++;
      else if (c === '"') quoted = false;
      else field += c;
    } else if (c === '"' && field === '') quoted = true;
    else if (c === ',') record.push(field), (field = '');
    else if (c === '\r' && text[i + 1] === '\n') {
      record.push(field), records.push(record), (record = []), (field = ''), i++;
    } else field += c;
  }
  if (field !== '' || record.length) record.push(field), records.push(record);
  return records;
}

describe('review report', () => {
  let designer: Awaited<ReturnType<typeof signedInAs>>;
  let reviewer: Awaited<ReturnType<typeof signedInAs>>;
  let runId: string;
  let blockId: string;
  let byCell: Map<string, StoredFinding>;

  beforeAll(async () => {
    const team = await createTeam();
    await sizeOnlyTeamDeck(team);
    blockId = (await heronBlock(team)).id;
    designer = await signedInAs(env, team, ['designer']);
    reviewer = await signedInAs(env, team, ['reviewer']);
    const run = (await submitUpload(designer.agent, blockId, { 'heron.sp': heronWithSense() }, { note: 'tape-in candidate' }).expect(201)).body.run;
    expect((await waitForRun(designer.agent, run.id)).state).toBe('succeeded');
    runId = run.id;
    const items: StoredFinding[] = (await designer.agent.get(`/api/runs/${runId}/findings`).expect(200)).body.items;
    byCell = new Map(items.map((f) => [f.cell, f]));
    await reviewer.agent
      .post('/api/waivers/direct')
      .send({ runId, findingId: byCell.get('hcol_pre')!.id, scope: 'finding', justification: 'Discharge strap, 2 mm "by design", reviewed, with the column owner.', boundValue: 2.5e-3, expiresAt: '2099-06-30' })
      .expect(201);
    await designer.agent
      .post('/api/waivers')
      .send({ runId, findingId: byCell.get('hcol_drv')!.id, scope: 'cell', justification: 'Library driver; characterised on its own.' })
      .expect(201);
  });

  it('says what is open, what is waived and by whom, with the deck version and its publish note', async () => {
    const report = (await designer.agent.get(`/api/runs/${runId}/report`).expect(200)).body as ReviewReport;
    expect(report.caution).toBe(REVIEW_CAUTION);
    expect(report.deck).toMatchObject({ version: 1, state: 'published', publishNote: 'Only the size rule, for the waiver tests.' });
    expect(report.run).toMatchObject({ note: 'tape-in candidate', submitter: { id: designer.user.id }, files: [{ path: 'heron.sp' }] });
    // Three cells with one oversized device each: one waived, one requested, one open.
    expect(report.counts.bySeverity.error).toEqual({ open: 1, waived: 1, 'waiver-requested': 1, 'waiver-lapsed': 0 });
    expect(report.counts.bySeverity.warning).toEqual({ open: 0, waived: 0, 'waiver-requested': 0, 'waiver-lapsed': 0 });
    expect(report.openErrorsTotal).toBe(1);
    // 5000u is 5 mm (SPICE scale suffix u = 1e-6).
    expect(report.openErrors.map((f) => [f.cell, f.measured])).toEqual([['hcol_sense', { value: 5e-3, unit: 'm' }]]);
    expect(report.waivers.map((w) => [w.cell, w.statusInRun, w.findings, w.state])).toEqual([
      ['hcol_pre', 'waived', 1, 'approved'],
      ['hcol_drv', 'waiver-requested', 1, 'requested'],
    ]);
    const pre = report.waivers[0];
    expect(pre.justification).toContain('by design');
    expect(pre.requester?.id).toBe(reviewer.user.id);
    expect(pre.decider?.id).toBe(reviewer.user.id);
    expect(pre.decidedAt).not.toBeNull();
    expect(pre.expiresAt).toBe('2099-07-01T00:00:00.000Z');
    expect(report.waivers[1].requester?.id).toBe(designer.user.id);
  });

  it('lists a lapsed waiver with its reason', async () => {
    const run = (await submitUpload(designer.agent, blockId, { 'heron.sp': heronWithSense({ preWidth: 3000 }) }).expect(201)).body.run;
    expect((await waitForRun(designer.agent, run.id)).state).toBe('succeeded');
    const report = (await designer.agent.get(`/api/runs/${run.id}/report`).expect(200)).body as ReviewReport;
    expect(report.counts.bySeverity.error).toEqual({ open: 1, waived: 0, 'waiver-requested': 1, 'waiver-lapsed': 1 });
    expect(report.lapsed.map((f) => [f.cell, f.waiver?.lapse])).toEqual([['hcol_pre', 'bound']]);
    expect(report.lapsed[0].waiver?.reason).toContain('3 mm');
    expect(report.waivers.find((w) => w.cell === 'hcol_pre')?.statusInRun).toBe('waiver-lapsed');
  });

  it('exports every finding as RFC 4180 CSV, with the caution', async () => {
    const res = await designer.agent.get(`/api/runs/${runId}/findings.csv`).expect(200);
    expect(res.headers['content-type']).toBe('text/csv; charset=utf-8; header=present');
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="keepwell-findings-/);
    expect(res.text.endsWith('\r\n')).toBe(true);
    const records = parseCsv(res.text);
    const [header, ...rest] = records;
    expect(header.slice(0, 5)).toEqual(['id', 'severity', 'status', 'rule', 'cell']);
    for (const r of records) expect(r).toHaveLength(header.length);
    const caution = rest.pop()!;
    expect(caution[0]).toBe(REVIEW_CAUTION);
    const col = (name: string) => header.indexOf(name);
    expect(rest.map((r) => [r[col('cell')], r[col('status')]]).sort()).toEqual([
      ['hcol_drv', 'waiver-requested'],
      ['hcol_pre', 'waived'],
      ['hcol_sense', 'open'],
    ]);
    const sense = rest.find((r) => r[col('cell')] === 'hcol_sense')!;
    // The message holds a comma; read back whole it is the API's message.
    expect(sense[col('message')]).toBe(byCell.get('hcol_sense')!.message);
    expect(sense[col('message')]).toContain(',');
    expect(Number(sense[col('measured')])).toBe(5e-3);
    expect(sense[col('fingerprint')]).toBe(byCell.get('hcol_sense')!.fingerprint);
  });

  it('quotes fields as RFC 4180 says and defuses spreadsheet formulas', () => {
    expect(csvField('plain')).toBe('plain');
    expect(csvField('a,b')).toBe('"a,b"');
    expect(csvField('say "no"')).toBe('"say ""no"""');
    expect(csvField('two\r\nlines')).toBe('"two\r\nlines"');
    expect(parseCsv(`${csvField('x, "y"\r\nz')},2\r\n`)).toEqual([['x, "y"\r\nz', '2']]);
    // OWASP "CSV Injection": a leading =, +, - or @ would run as a formula.
    expect(csvField('=HYPERLINK("x")')).toBe(`"'=HYPERLINK(""x"")"`);
    expect(csvField(-0.25, false)).toBe('-0.25');
  });

  it('serves a PDF of the report', async () => {
    const res = await designer.agent.get(`/api/runs/${runId}/report.pdf`).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('application/pdf');
    const pdf = res.body as Buffer;
    const text = pdf.toString('latin1');
    // ISO 32000-1 §7.5.2 header, §7.5.4 cross-reference table, §7.5.5 trailer ending in %%EOF.
    expect(text.startsWith('%PDF-1.')).toBe(true);
    expect(text).toMatch(/\nxref\n/);
    expect(text).toMatch(/trailer\n<<[\s\S]*\/Root [\s\S]*>>\nstartxref\n\d+\n%%EOF\s*$/);
    expect((text.match(/\/Type \/Page\b/g) ?? []).length).toBeGreaterThanOrEqual(1);
    expect(text).toContain('(Review report: heron-column)');
  });

  it('has no report before the run finishes, and none for another team', async () => {
    const queued = (await submitUpload(designer.agent, blockId, { 'bad.sp': '.subckt broken a\nmn1 a\n' }).expect(201)).body.run;
    const finished = await waitForRun(designer.agent, queued.id);
    expect(finished.state).toBe('failed');
    await designer.agent.get(`/api/runs/${queued.id}/report`).expect(409);
    await designer.agent.get(`/api/runs/${queued.id}/findings.csv`).expect(409);
    const stranger = await signedInAs(env, await createTeam(), ['reviewer']);
    await stranger.agent.get(`/api/runs/${runId}/report`).expect(404);
    await stranger.agent.get(`/api/runs/${runId}/report.pdf`).expect(404);
  });
});
