// `keepwell check`: the offline check end to end. Exit status follows the usual
// command-line convention (0 clean, 1 findings of error severity, 2 unusable input);
// the JSON report is validated with an independent JSON Schema validator (ajv)
// against the schema shared with the server and client.

import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import Ajv from 'ajv';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { z } from 'zod';
import { reportFormats, run } from '../../server/cli/check';
import { CHECK_SEMI_SPACE_MB } from '../../server/worker/threads';
import { defaultDeck } from '../../rules/default-deck';
import { checkReportSchema, REVIEW_CAUTION } from '../../shared/findings';

let dir: string;

function write(name: string, text: string): string {
  const path = join(dir, name);
  mkdirSync(join(path, '..'), { recursive: true });
  writeFileSync(path, text);
  return path;
}

async function check(...args: string[]): Promise<{ code: number; out: string; err: string }> {
  let out = '';
  let err = '';
  const o = vi.spyOn(process.stdout, 'write').mockImplementation((chunk) => ((out += String(chunk)), true));
  const e = vi.spyOn(process.stderr, 'write').mockImplementation((chunk) => ((err += String(chunk)), true));
  try {
    const code = await run(args);
    return { code, out, err };
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
}

// Widths in micrometres, as schematic netlisters write them for `.option scale=1e-6`.
const inverters = [
  '* two inverters in micrometres, no scale line',
  '.subckt inv a y vdd vss',
  'Mn y a vss vss nch w=0.65 l=0.15',
  'Mp y a vdd vdd pch w=1.3 l=0.15',
  '.ends inv',
  'X1 in mid vdd 0 inv',
  'X2 mid out vdd 0 inv',
  'Vdd vdd 0 1.8',
  'Vin in 0 pulse(0 1.8 0 10p 10p 1n 2n)',
  '',
].join('\n');

// Other rules land in the registry in parallel; most tests run a deck with only the size rule on,
// so that what they check does not move when an unrelated rule starts to find something.
let sizeOnlyDeck: string;

beforeAll(() => {
  dir = mkdtempSync(join(tmpdir(), 'keepwell-check-'));
  const deck = defaultDeck();
  for (const [id, setting] of Object.entries(deck.rules)) setting.enabled = id === 'device.implausible-size';
  sizeOnlyDeck = write('size-only.json', JSON.stringify(deck));
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe('keepwell check', () => {
  it('exits 1 when widths read without a scale are implausible, and 0 with --scale', async () => {
    const file = write('inv.sp', inverters);
    // Without a scale, w=0.65 means 0.65 m (SPICE: values in metres unless scaled): far beyond any drawn device.
    const bad = await check(file, '--deck', sizeOnlyDeck);
    expect(bad.code).toBe(1);
    expect(bad.out).toMatch(/^inv \(2 instances\)$/m);
    expect(bad.out).toContain(`${file}:3:1 error device.implausible-size Mn has width 650 mm`);
    expect(bad.err).toBe('');
    const good = await check(file, '--scale', '1e-6', '--deck', sizeOnlyDeck);
    expect(good.code).toBe(0);
    expect(good.out).not.toContain('implausible');
  });

  it('runs the built-in deck without --deck, its exit status following its error findings', async () => {
    const file = write('inv-default.sp', inverters);
    for (const args of [[file], [file, '--scale', '1e-6']]) {
      const { code, out } = await check(...args, '--format', 'json');
      const report = JSON.parse(out);
      expect(report.deck.name).toBe('Keepwell built-in deck');
      expect(code).toBe(report.summary.errors > 0 ? 1 : 0);
      const sizeFindings = report.findings.filter((f: { ruleId: string }) => f.ruleId === 'device.implausible-size');
      expect(sizeFindings).toHaveLength(args.length === 1 ? 1 : 0);
    }
  });

  it('ends the text report with a summary line and the review caution', async () => {
    const file = write('inv2.sp', inverters);
    const { out } = await check(file, '--deck', sizeOnlyDeck);
    const tail = out.trimEnd().split('\n').slice(-2);
    expect(tail[0]).toMatch(/^2 cells, 6 devices flattened; 1 error, 0 warnings, 0 infos \(\d+\.\d\d s, deck "Keepwell built-in deck"\)$/);
    expect(tail[1]).toBe(REVIEW_CAUTION);
  });

  it('writes a JSON report that validates against the shared report schema', async () => {
    const file = write('inv3.sp', inverters);
    const { code, out } = await check(file, '--format', 'json', '--deck', sizeOnlyDeck);
    expect(code).toBe(1);
    const report = JSON.parse(out);
    const ajv = new Ajv({ allErrors: true, strict: false });
    const validate = ajv.compile(z.toJSONSchema(checkReportSchema, { target: 'draft-7' }) as object);
    expect(validate(report), JSON.stringify(validate.errors)).toBe(true);
    expect(report.tool.name).toBe('keepwell');
    // Two distinct cells (the top level and inv, checked once for both instances); flattened: 2 × 2 MOSFETs + 2 sources.
    expect(report.summary).toMatchObject({ cells: 2, devices: 6, instances: 2, parseErrors: 0, errors: 1, warnings: 0, infos: 0 });
    expect(report.findings[0]).toMatchObject({ ruleId: 'device.implausible-size', cell: 'inv', line: 3, column: 1, instances: 2, devices: ['Mn', 'Mp'] });
  });

  it('exits 2 and prints file:line:column with a hint when the netlist has errors', async () => {
    const file = write('broken.sp', ['* broken', '.subckt inv a y', 'Mn y a 0 0 nch w=0.65u l=1.5.0u', 'X1 a y nosuch', ''].join('\n'));
    const { code, err, out } = await check(file, '--deck', sizeOnlyDeck);
    expect(code).toBe(2);
    expect(err).toContain(`${file}:3:26: error: malformed number "1.5.0u"`);
    expect(err).toContain(`${file}:4:8: error: X1: unknown subcircuit "nosuch"`);
    expect(err).toContain(`${file}:2:1: error: .subckt inv is never closed`);
    expect(err).toMatch(/\n {2}hint: /);
    // The report is still written, counting the netlist errors.
    expect(out).toContain('3 netlist errors');
  });

  it('exits 2 for a file that cannot be read', async () => {
    const { code, err } = await check(join(dir, 'missing.sp'));
    expect(code).toBe(2);
    expect(err).toContain('missing.sp: cannot read: no such file');
  });

  it('uses an exported deck given with --deck, and refuses an invalid one', async () => {
    const file = write('inv4.sp', inverters);
    const deck = { ...JSON.parse(readFileSync(sizeOnlyDeck, 'utf8')), name: 'Team deck, micrometre netlists', scale: 1e-6 };
    const deckFile = write('deck.json', JSON.stringify(deck));
    const { code, out } = await check(file, '--deck', deckFile);
    expect(code).toBe(0);
    expect(out).toContain('deck "Team deck, micrometre netlists"');
    const badDeck = write('bad-deck.json', JSON.stringify({ ...deck, scale: 5 }));
    const refused = await check(file, '--deck', badDeck);
    expect(refused.code).toBe(2);
    expect(refused.err).toContain('scale');
  });

  it('checks from --top only', async () => {
    const file = write('two.sp', ['* two cells', '.subckt good a', 'M1 a a 0 0 nch w=0.5u l=0.15u', '.ends', '.subckt bad a', 'M1 a a 0 0 nch w=0.5 l=0.15', '.ends', ''].join('\n'));
    expect((await check(file, '--deck', sizeOnlyDeck)).code).toBe(1);
    expect((await check(file, '--top', 'good', '--deck', sizeOnlyDeck)).code).toBe(0);
  });

  it('reads includes next to the given file and refuses paths outside its folder', async () => {
    write('proj/cells/inv.inc', ['.subckt inv a y vdd vss', 'Mn y a vss vss nch w=0.65u l=0.15u', 'Mp y a vdd vdd pch w=1.3u l=0.15u', '.ends', ''].join('\n'));
    write('secret.inc', 'R1 a b 1k\n');
    const top = write('proj/top.sp', ['* deck', '.include "cells/inv.inc"', 'X1 a b vdd 0 inv', ''].join('\n'));
    expect((await check(top, '--deck', sizeOnlyDeck)).code).toBe(0);
    const escaping = write('proj/escape.sp', ['* deck', '.include "../secret.inc"', ''].join('\n'));
    const { code, err } = await check(escaping, '--deck', sizeOnlyDeck);
    expect(code).toBe(2);
    expect(err).toContain('leaves the set of uploaded files');
  });

  it('writes the report to --output and rejects an unknown format', async () => {
    const file = write('inv5.sp', inverters);
    const target = join(dir, 'report.json');
    const { code, out } = await check(file, '--format', 'json', '--output', target, '--deck', sizeOnlyDeck);
    expect(code).toBe(1);
    expect(out).toBe('');
    expect(JSON.parse(readFileSync(target, 'utf8')).findings).toHaveLength(1);
    const unknown = await check(file, '--format', 'yaml');
    expect(unknown.code).toBe(2);
    expect(unknown.err).toContain(`unknown format "yaml" (available: ${Object.keys(reportFormats).join(', ')})`);
  });

  it('runs as a command: npm run keepwell -- check', () => {
    const file = write('cmd.sp', inverters);
    const cli = join(import.meta.dirname, '../../server/cli.ts');
    const tsx = join(import.meta.dirname, '../../node_modules/.bin/tsx');
    const bad = spawnSync(tsx, [cli, 'check', file, '--deck', sizeOnlyDeck], { encoding: 'utf8', timeout: 60_000 });
    expect(bad.status).toBe(1);
    expect(bad.stdout).toContain('device.implausible-size');
    const good = spawnSync(tsx, [cli, 'check', file, '--scale', '1u', '--deck', sizeOnlyDeck], { encoding: 'utf8', timeout: 60_000 });
    expect(good.status).toBe(0);
  });

  it('runs with the young-generation size of the worker\'s check threads', () => {
    const scripts = JSON.parse(readFileSync(join(import.meta.dirname, '../../package.json'), 'utf8')).scripts as Record<string, string>;
    expect(scripts.keepwell).toContain(`--max-semi-space-size=${CHECK_SEMI_SPACE_MB} `);
  });
});
