// A run's SARIF over the API (GET /api/runs/:id/sarif): validates against the OASIS
// SARIF 2.1.0 JSON schema (tests/fixtures, draft 2020-12, ajv), carries the Keepwell
// fingerprint in partialFingerprints (SARIF 2.1.0 §3.27.17), approved waivers as
// external suppressions with status accepted and their justification, and pending
// requests as underReview (§3.35.3, §3.35.4); uris are the uploaded paths, relative.

import { readFileSync } from 'node:fs';
import Ajv2020 from 'ajv/dist/2020';
import addFormats from 'ajv-formats';
import request from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { StoredFinding } from '../../shared/api/runs';
import { SARIF_FINGERPRINT_KEY, SARIF_ROOT_ID, type SarifLog } from '../../rules/sarif';
import { createTeam, signedInAs, startTestEnv, type TestEnv } from './helpers';
import { startWorker, submitUpload, waitForRun, type WorkerProcess } from './runs-helpers';
import { heronBlock, heronWithSense, lineOf, sizeOnlyTeamDeck } from './waivers-fixtures';

const schema = JSON.parse(readFileSync(new URL('../fixtures/sarif-schema-2.1.0.json', import.meta.url), 'utf8'));
// The dialect the schema declares: JSON Schema draft 2020-12.
const ajv = new Ajv2020({ strict: false, allErrors: true });
addFormats(ajv);
const validate = ajv.compile(schema);

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

describe('SARIF of a run', () => {
  it('validates, locates each finding in its uploaded file and carries waivers as suppressions', async () => {
    const team = await createTeam();
    await sizeOnlyTeamDeck(team);
    const block = await heronBlock(team);
    const designer = await signedInAs(env, team, ['designer']);
    const reviewer = await signedInAs(env, team, ['reviewer']);
    const text = heronWithSense();
    const run = (await submitUpload(designer.agent, block.id, { 'heron col.sp': text }).expect(201)).body.run;
    expect((await waitForRun(designer.agent, run.id)).state).toBe('succeeded');
    const items: StoredFinding[] = (await designer.agent.get(`/api/runs/${run.id}/findings`).expect(200)).body.items;
    const byCell = new Map(items.map((f) => [f.cell, f]));
    const justification = 'Discharge strap drawn 2 mm on purpose; reviewed with the column owner.';
    await reviewer.agent.post('/api/waivers/direct').send({ runId: run.id, findingId: byCell.get('hcol_pre')!.id, scope: 'finding', justification }).expect(201);
    await designer.agent.post('/api/waivers').send({ runId: run.id, findingId: byCell.get('hcol_drv')!.id, scope: 'cell', justification: 'Library driver, characterised on its own.' }).expect(201);

    // A CI job reads it with a read-scoped token, no cookie.
    const token = (await designer.agent.post('/api/tokens').send({ name: 'sarif reader', scope: 'read' }).expect(201)).body.token;
    const res = await request(env.server).get(`/api/runs/${run.id}/sarif`).set('Authorization', `Bearer ${token}`).expect(200);
    expect(res.headers['content-type']).toMatch(/^application\/sarif\+json/);
    const log = JSON.parse(res.text) as SarifLog;
    expect(validate(log), JSON.stringify(validate.errors)).toBe(true);

    const results = log.runs[0].results;
    expect(results).toHaveLength(3);
    for (const r of results) {
      const cell = r.locations[0].logicalLocations[0].name;
      const f = byCell.get(cell)!;
      expect(log.runs[0].tool.driver.rules[r.ruleIndex].id).toBe(r.ruleId);
      expect(r.partialFingerprints[SARIF_FINGERPRINT_KEY]).toBe(f.fingerprint);
      expect(r.locations[0].physicalLocation.artifactLocation).toEqual({ uri: 'heron%20col.sp', uriBaseId: SARIF_ROOT_ID });
      // Each cell's anchor is its first oversized pull-down, mn1, as the text above places it.
      expect(r.locations[0].physicalLocation.region).toEqual({ startLine: lineOf(text, cell, 'mn1 '), startColumn: 1 });
      expect(r.level).toBe('error');
    }
    const of = (cell: string) => results.find((r) => r.locations[0].logicalLocations[0].name === cell)!;
    expect(of('hcol_pre').suppressions).toEqual([
      expect.objectContaining({ kind: 'external', status: 'accepted', justification, guid: expect.any(String), properties: expect.objectContaining({ approvedBy: reviewer.email }) }),
    ]);
    expect(of('hcol_drv').suppressions).toEqual([expect.objectContaining({ kind: 'external', status: 'underReview' })]);
    expect(of('hcol_sense').suppressions).toBeUndefined();

    // Nobody else's: another team's reader gets nothing.
    const stranger = await signedInAs(env, await createTeam(), ['designer']);
    await stranger.agent.get(`/api/runs/${run.id}/sarif`).expect(404);
  });
});
