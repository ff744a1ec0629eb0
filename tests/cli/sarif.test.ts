// `keepwell check --format sarif`: the log validates against the OASIS SARIF 2.1.0 JSON
// schema (tests/fixtures/sarif-schema-2.1.0.json, draft 2020-12, checked with ajv), and
// follows the standard where the schema cannot tell: ruleIndex points at the rule with
// the result's ruleId (SARIF 2.1.0 §3.27.6), levels are error/warning/note (§3.27.10),
// relative uris resolve against originalUriBaseIds (§3.14.14, RFC 3986 §5), and lines
// and columns are 1-based (§3.30.5, §3.30.6). Expected lines come from the netlist text.

import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import Ajv2020 from 'ajv/dist/2020';
import addFormats from 'ajv-formats';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { defaultDeck } from '../../rules/default-deck';
import { ruleRegistry } from '../../rules/registry';
import { SARIF_FINGERPRINT_KEY, SARIF_ROOT_ID, type SarifLog } from '../../rules/sarif';
import { REVIEW_CAUTION } from '../../shared/findings';
import type { Severity } from '../../shared/deck';

const schema = JSON.parse(readFileSync(new URL('../fixtures/sarif-schema-2.1.0.json', import.meta.url), 'utf8'));
// The dialect the schema declares: JSON Schema draft 2020-12.
const ajv = new Ajv2020({ strict: false, allErrors: true });
addFormats(ajv);
const validate = ajv.compile(schema);

const cli = join(import.meta.dirname, '..', '..', 'server', 'cli.ts');
// tsx's loader by absolute URL: the command runs in a scratch folder outside the project.
const tsx = import.meta.resolve('tsx');
let dir: string;

// Widths in metres; "wide cell.sp" has a space, which a URI must percent-encode (RFC 3986 §2.1).
const WIDE = ['* two oversized pull-downs, invented for the SARIF tests', '.subckt strap a y vss', 'Mw y a vss vss nmos w=2e-3 l=0.25e-6', '.ends strap', ''].join('\n');
const OK = ['* a sane inverter', '.subckt inv a y vdd vss', 'Mp y a vdd vdd pmos w=2e-6 l=0.25e-6', 'Mn y a vss vss nmos w=1e-6 l=0.25e-6', '.ends inv', ''].join('\n');

function deckFile(severity: Severity): string {
  const deck = defaultDeck();
  for (const [id, s] of Object.entries(deck.rules)) s.enabled = id === 'device.implausible-size';
  deck.rules['device.implausible-size'].severity = severity;
  const path = join(dir, `deck-${severity}.json`);
  writeFileSync(path, JSON.stringify(deck));
  return path;
}

function check(...args: string[]) {
  const r = spawnSync(process.execPath, ['--import', tsx, cli, 'check', ...args], { cwd: dir, encoding: 'utf8', env: { ...process.env, INIT_CWD: '' } });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'keepwell-sarif-'));
  mkdirSync(join(dir, 'lib'));
  writeFileSync(join(dir, 'lib', 'wide cell.sp'), WIDE);
  writeFileSync(join(dir, 'inv.sp'), OK);
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('keepwell check --format sarif', () => {
  it('writes a log that validates against the SARIF 2.1.0 schema, with rule metadata and locations', () => {
    const { code, out, err } = check('lib/wide cell.sp', 'inv.sp', '--deck', deckFile('error'), '--format', 'sarif');
    expect(err).toBe('');
    // Same exit status as the other formats: an error-severity finding.
    expect(code).toBe(1);
    const log = JSON.parse(out) as SarifLog;
    expect(validate(log), JSON.stringify(validate.errors)).toBe(true);
    expect(log.version).toBe('2.1.0');
    const run = log.runs[0];
    expect(run.tool.driver.name).toBe('Keepwell');
    expect(run.properties.caution).toBe(REVIEW_CAUTION);

    const meta = ruleRegistry.find((r) => r.meta.id === 'device.implausible-size')!.meta;
    const rule = run.tool.driver.rules.find((r) => r.id === meta.id)!;
    expect(rule).toMatchObject({
      name: 'DeviceImplausibleSize',
      shortDescription: { text: meta.title },
      fullDescription: { text: meta.rationale },
      help: { text: meta.fix },
      defaultConfiguration: { level: 'error' },
    });

    expect(run.results).toHaveLength(1);
    const [result] = run.results;
    expect(run.tool.driver.rules[result.ruleIndex].id).toBe(result.ruleId);
    expect(result.level).toBe('error');
    const loc = result.locations[0].physicalLocation;
    expect(loc.artifactLocation).toEqual({ uri: 'lib/wide%20cell.sp', uriBaseId: SARIF_ROOT_ID });
    // The anchor is the oversized device's line: line 3 of the file as written above, first column.
    expect(loc.region).toEqual({ startLine: WIDE.split('\n').findIndex((l) => l.startsWith('Mw ')) + 1, startColumn: 1 });
    const root = run.originalUriBaseIds[SARIF_ROOT_ID].uri!;
    expect(root).toBe(pathToFileURL(dir).href + '/');
    expect(new URL(loc.artifactLocation.uri, root).href).toBe(pathToFileURL(join(dir, 'lib', 'wide cell.sp')).href);
    expect(result.locations[0].logicalLocations).toEqual([{ name: 'strap', kind: 'module' }]);
    expect(result.suppressions).toBeUndefined();

    // The fingerprint is the JSON report's.
    const json = JSON.parse(check('lib/wide cell.sp', 'inv.sp', '--deck', deckFile('error'), '--format', 'json').out);
    expect(result.partialFingerprints[SARIF_FINGERPRINT_KEY]).toBe(json.findings[0].fingerprint);
  });

  it('maps severities to SARIF levels: warning stays warning, info becomes note', () => {
    for (const [severity, level] of [
      ['warning', 'warning'],
      ['info', 'note'],
    ] as const) {
      const { code, out } = check('lib/wide cell.sp', '--deck', deckFile(severity), '--format', 'sarif');
      expect(code).toBe(0);
      const log = JSON.parse(out) as SarifLog;
      expect(validate(log)).toBe(true);
      expect(log.runs[0].results.map((r) => r.level)).toEqual([level]);
    }
  });

  it('a clean design is a valid log with no results; the validator does refuse broken logs', () => {
    const { code, out } = check('inv.sp', '--deck', deckFile('error'), '--format', 'sarif');
    expect(code).toBe(0);
    const log = JSON.parse(out);
    expect(validate(log)).toBe(true);
    expect(log.runs[0].results).toEqual([]);
    // The schema is live: a level the standard does not define, or a missing version, fails.
    const broken = JSON.parse(check('lib/wide cell.sp', '--deck', deckFile('error'), '--format', 'sarif').out);
    broken.runs[0].results[0].level = 'fatal';
    expect(validate(broken)).toBe(false);
    delete broken.version;
    expect(validate(broken)).toBe(false);
  });
});
