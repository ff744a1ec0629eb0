// An exported deck version is exactly what `keepwell check --deck FILE` reads: export
// one from the API, run the command line on it, and compare with what the deck asks.
// Expected findings come from the netlist's drawn sizes (decks-fixtures.ts): with a
// 1.5 µm size limit the 2 µm devices Mp and Mw are flagged and the 1 µm Mn is not; the
// exit status follows the command's documented contract (1 when an error-severity
// finding exists, 0 when none).

import { execFile } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { promisify } from 'node:util';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { checkReportSchema } from '../../shared/findings';
import { deckVersionSchema } from '../../shared/api/decks';
import { createTeam, signedInAs, startTestEnv, type TestEnv } from './helpers';
import { deckWithOnly, INVERTER_NETLIST, makeDeck } from './decks-fixtures';

const run = promisify(execFile);
const root = new URL('../..', import.meta.url).pathname;

let env: TestEnv;
let dir: string;
beforeAll(async () => {
  env = await startTestEnv();
  dir = mkdtempSync(join(tmpdir(), 'keepwell-deck-cli-'));
});
afterAll(async () => {
  await env?.close();
  rmSync(dir, { recursive: true, force: true });
});

async function keepwellCheck(args: string[]) {
  try {
    const { stdout } = await run(process.execPath, ['--import', 'tsx', 'server/cli.ts', 'check', ...args], { cwd: root, env: { ...process.env, INIT_CWD: root } });
    return { code: 0, stdout };
  } catch (err) {
    const e = err as { code?: number; stdout?: string; stderr?: string };
    if (typeof e.code !== 'number') throw err;
    return { code: e.code, stdout: e.stdout ?? '', stderr: e.stderr ?? '' };
  }
}

describe('keepwell check --deck with an exported version', () => {
  it('checks with the exported settings', async () => {
    const team = await createTeam();
    const owner = await signedInAs(env, team, ['methodology']);
    // Only the size rule runs, whatever else the registry holds.
    const { deck, published } = await makeDeck(team.id, { name: 'cli-export-deck', content: { ...deckWithOnly(['device.implausible-size']), name: 'cli-export-deck' } });
    const draft = deckVersionSchema.parse((await owner.agent.post(`/api/decks/${deck.id}/drafts`).send({}).expect(201)).body);
    const edited = deckVersionSchema.parse(
      (
        await owner.agent
          .patch(`/api/decks/${deck.id}/versions/${draft.id}`)
          .send({ lockVersion: draft.lockVersion, changes: [{ op: 'replace', path: '/rules/device.implausible-size/params/maxWidth', value: 1.5e-6 }] })
          .expect(200)
      ).body,
    );
    await owner.agent.post(`/api/decks/${deck.id}/versions/${draft.id}/publish`).send({ lockVersion: edited.lockVersion, changeNote: 'strict sizes' }).expect(200);

    const netlist = join(dir, 'cells.sp');
    writeFileSync(netlist, INVERTER_NETLIST);
    for (const [version, name] of [
      [published.id, 'v1.json'],
      [draft.id, 'v2.json'],
    ]) {
      const res = await owner.agent.get(`/api/decks/${deck.id}/versions/${version}/export`).expect(200);
      writeFileSync(join(dir, name), res.text);
    }

    const loose = await keepwellCheck([netlist, '--deck', join(dir, 'v1.json'), '--format', 'json']);
    expect(loose.code, loose.stderr).toBe(0);
    expect(checkReportSchema.parse(JSON.parse(loose.stdout)).findings).toEqual([]);

    const strict = await keepwellCheck([netlist, '--deck', join(dir, 'v2.json'), '--format', 'json']);
    expect(strict.code, strict.stderr).toBe(1);
    const report = checkReportSchema.parse(JSON.parse(strict.stdout));
    expect(report.deck.name).toBe('cli-export-deck');
    expect(report.findings.map((f) => [f.ruleId, f.devices[0], f.severity]).sort()).toEqual([
      ['device.implausible-size', 'Mp', 'error'],
      ['device.implausible-size', 'Mw', 'error'],
    ]);
    expect(report.findings[0].limit).toEqual({ value: 1.5e-6, unit: 'm' });
  });
});
