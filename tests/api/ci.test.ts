// The CI hand-off end to end: a personal API token with the submit scope, `keepwell
// submit` run as a child process (the same entry as `npm run keepwell`) against this
// test's server, a real worker, and the exit status a CI job reads: 1 while an error is
// unwaived, 0 once a reviewer has waived it, 2 when the run cannot be made (the usual
// command-line convention the offline `keepwell check` follows too).

import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { StoredFinding } from '../../shared/api/runs';
import { REVIEW_CAUTION } from '../../shared/findings';
import { repoRoot } from '../../server/config';
import { createTeam, serverUrl, signedInAs, startTestEnv, type TestEnv } from './helpers';
import { startWorker, type WorkerProcess } from './runs-helpers';
import { heronBlock, heronColumn, sizeOnlyTeamDeck } from './waivers-fixtures';

let env: TestEnv;
let worker: WorkerProcess;
let dir: string;

beforeAll(async () => {
  env = await startTestEnv({ KEEPWELL_LOGIN_MAX_PER_IP: '1000' });
  worker = startWorker(env);
  await worker.ready;
  dir = mkdtempSync(join(tmpdir(), 'keepwell-ci-'));
  // The cells live in an include: the bundle must carry it under the path the netlist names.
  const cells = heronColumn().split('\n').filter((l) => !l.startsWith('*')).join('\n');
  writeFileSync(join(dir, 'heron-cells.inc'), cells);
  writeFileSync(join(dir, 'heron.sp'), '* Heron column top, invented for the CI test\n.include "heron-cells.inc"\n');
});
afterAll(async () => {
  await worker?.stop();
  await env?.close();
  rmSync(dir, { recursive: true, force: true });
});

/** `keepwell submit …` in a child process; never spawnSync: the server answering it runs in this process. */
function submit(args: string[]): Promise<{ code: number | null; out: string; err: string }> {
  return new Promise((resolve) => {
    const child = spawn(process.execPath, ['--import', 'tsx', join(repoRoot, 'server', 'cli.ts'), 'submit', ...args], {
      cwd: repoRoot,
      env: { PATH: process.env.PATH, HOME: process.env.HOME, INIT_CWD: dir },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let out = '';
    let err = '';
    child.stdout.on('data', (d) => (out += d));
    child.stderr.on('data', (d) => (err += d));
    child.on('exit', (code) => resolve({ code, out, err }));
  });
}

describe('keepwell submit', () => {
  it('exits 1 while an error is unwaived and 0 once it is waived', async () => {
    const team = await createTeam();
    await sizeOnlyTeamDeck(team);
    await heronBlock(team);
    const designer = await signedInAs(env, team, ['designer']);
    const reviewer = await signedInAs(env, team, ['reviewer']);
    const token = (await designer.agent.post('/api/tokens').send({ name: 'heron CI', scope: 'submit' }).expect(201)).body.token as string;
    const common = ['heron.sp', '--server', serverUrl(env.server), '--token', token, '--block', 'heron-column', '--timeout', '120'];

    const first = await submit([...common, '--format', 'json', '--note', 'commit 1a2b3c']);
    expect(first.code, first.err).toBe(1);
    const report = JSON.parse(first.out) as { run: { id: string; note: string; submitter: { id: string } }; unwaivedErrors: number; findings: StoredFinding[]; caution: string };
    expect(report.caution).toBe(REVIEW_CAUTION);
    expect(report.run.note).toBe('commit 1a2b3c');
    expect(report.run.submitter.id).toBe(designer.user.id);
    // heronColumn: two cells, one oversized pull-down finding each, both anchored in the include.
    expect(report.unwaivedErrors).toBe(2);
    expect(report.findings.map((f) => [f.cell, f.file, f.status]).sort()).toEqual([
      ['hcol_drv', 'heron-cells.inc', 'open'],
      ['hcol_pre', 'heron-cells.inc', 'open'],
    ]);

    // A request alone does not pass CI; the reviewer's decision does.
    const [drv, pre] = [...report.findings].sort((a, b) => a.cell.localeCompare(b.cell));
    const requested = (
      await designer.agent.post('/api/waivers').send({ runId: report.run.id, findingId: drv.id, scope: 'cell', justification: 'Library driver, characterised on its own.' }).expect(201)
    ).body;
    await reviewer.agent.post('/api/waivers/direct').send({ runId: report.run.id, findingId: pre.id, scope: 'finding', justification: 'Discharge strap drawn 2 mm on purpose.' }).expect(201);
    const pending = await submit([...common]);
    expect(pending.code, pending.err).toBe(1);
    expect(pending.out).toMatch(/heron-cells\.inc:\d+:1 error device\.implausible-size .*\[waiver-requested\]/);
    expect(pending.out).toContain('1 unwaived error.');

    await reviewer.agent.post(`/api/waivers/${requested.id}/approve`).send({ comment: 'Agreed.' }).expect(200);
    const clean = await submit([...common]);
    expect(clean.code, clean.err).toBe(0);
    expect(clean.out).toContain('0 unwaived errors.');
    expect(clean.out).toContain(REVIEW_CAUTION);

    const sarif = await submit([...common, '--format', 'sarif']);
    expect(sarif.code).toBe(0);
    const log = JSON.parse(sarif.out);
    expect(log.version).toBe('2.1.0');
    expect(log.runs[0].results.every((r: { suppressions?: { status: string }[] }) => r.suppressions?.[0].status === 'accepted')).toBe(true);
  });

  it('exits 2 when the run cannot be made', async () => {
    const team = await createTeam();
    await sizeOnlyTeamDeck(team);
    await heronBlock(team);
    const designer = await signedInAs(env, team, ['designer']);
    const read = (await designer.agent.post('/api/tokens').send({ name: 'reader', scope: 'read' }).expect(201)).body.token as string;
    const submitToken = (await designer.agent.post('/api/tokens').send({ name: 'ci', scope: 'submit' }).expect(201)).body.token as string;
    const url = serverUrl(env.server);

    const refused = await submit(['heron.sp', '--server', url, '--token', read, '--block', 'heron-column']);
    expect(refused.code).toBe(2);
    expect(refused.err).toMatch(/forbidden/);
    const unknown = await submit(['heron.sp', '--server', url, '--token', submitToken, '--block', 'no-such-block']);
    expect(unknown.code).toBe(2);
    expect(unknown.err).toMatch(/no block named "no-such-block"/);
    const missing = await submit(['absent.sp', '--server', url, '--token', submitToken, '--block', 'heron-column']);
    expect(missing.code).toBe(2);
    expect(missing.err).toMatch(/absent\.sp: cannot read/);
    const badToken = await submit(['heron.sp', '--server', url, '--token', 'kwt_not-a-token', '--block', 'heron-column']);
    expect(badToken.code).toBe(2);
    expect(badToken.err).toMatch(/invalid-token/);
    const noServer = await submit(['heron.sp', '--token', submitToken, '--block', 'heron-column']);
    expect(noServer.code).toBe(2);

    // A netlist the reader cannot elaborate: the run fails, and so does the job.
    writeFileSync(join(dir, 'broken.sp'), '.subckt broken a\nmn1 a\n');
    const failed = await submit(['broken.sp', '--server', url, '--token', submitToken, '--block', 'heron-column', '--timeout', '120']);
    expect(failed.code, failed.err).toBe(2);
    expect(failed.err).toMatch(/the run failed/);
  });
});
