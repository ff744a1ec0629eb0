// `keepwell stages` end to end: a netlist written here, read by the real parser, and
// the printed figures compared with ngspice on the same circuit and level-1 models.

import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { readDesign } from '../../grammar/index';
import { defaultDeck } from '../../rules/default-deck';
import { localRails } from '../../rules/engine';
import { extractStages } from '../../rules/stages';
import { curvePoints, dcSweep } from '../support/ngspice';
import { CellBuilder } from '../support/cell-builder';
import { MODEL_LINES } from './stage-fixtures';

const dir = mkdtempSync(join(tmpdir(), 'keepwell-stages-'));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

// An invented cell: a NAND2 feeding an inverter, with level-1 cards as a designer's netlist might carry them.
const NETLIST = [
  '* stages command test',
  ...MODEL_LINES,
  '.subckt nandinv a b y vdd vss',
  'mp1 n a vdd vdd pm w=2u l=0.25u',
  'mp2 n b vdd vdd pm w=2u l=0.25u',
  'mn1 n a m vss nm w=2u l=0.25u',
  'mn2 m b vss vss nm w=2u l=0.25u',
  'mn3 y n vss vss nm w=1u l=0.25u',
  'mp3 y n vdd vdd pm w=3u l=0.25u',
  '.ends',
  '',
].join('\n');

// One square-law corner so the solver's equations are ngspice's level 1 (the cards supply the values).
const deck = { ...defaultDeck(), corners: [{ ...defaultDeck().corners[0], name: 'lvl1', model: 'square-law' as const, vdd: 2.5 }] };

function runStages(args: string[]) {
  const r = spawnSync(process.execPath, ['--import', 'tsx', 'server/cli.ts', 'stages', ...args], { encoding: 'utf8', timeout: 120_000 });
  return { code: r.status, out: r.stdout, err: r.stderr };
}

describe('keepwell stages', () => {
  it('prints one row per stage and input, matching ngspice', () => {
    const file = join(dir, 'nandinv.sp');
    const deckFile = join(dir, 'deck.json');
    writeFileSync(file, NETLIST);
    writeFileSync(deckFile, JSON.stringify(deck));
    const r = runStages([file, '--deck', deckFile, '--format', 'json']);
    expect(r.code, r.err).toBe(0);
    const report = JSON.parse(r.out) as { stages: Record<string, unknown>[]; caution: string };
    expect(report.caution).toMatch(/never replace/);
    const rows = report.stages;
    expect(rows.map((x) => [x.output, (x.inputs as string[])[0], x.kind])).toEqual([
      ['n', 'a', 'complementary'],
      ['n', 'b', 'complementary'],
      ['y', 'n', 'inverter'],
    ]);
    const inv = rows[2];
    const ref = curvePoints(
      ...((s) => [s.x, s.y[0]] as const)(
        dcSweep([...MODEL_LINES, 'vdd vdd 0 2.5', 'vin in 0 0', 'mn3 out in 0 0 nm w=1u l=0.25u', 'mp3 out in vdd vdd pm w=3u l=0.25u'].join('\n'), { source: 'vin', start: 0, stop: 2.5, step: 0.0005 }, ['v(out)']),
      ),
    );
    expect(Math.abs((inv.vm as number) - ref.vm)).toBeLessThan(0.02);
    expect(Math.abs((inv.vil as number) - ref.vil!)).toBeLessThan(0.02);
    expect(Math.abs((inv.vih as number) - ref.vih!)).toBeLessThan(0.02);
    expect(inv.gain as number).toBeLessThan(-1);
    expect(inv.corner).toBe('lvl1');
    // NAND input a with b held at VDD.
    expect(rows[0].held).toEqual([{ net: 'b', volts: 2.5 }]);
    expect(rows[0].parameters).toContain('.model nm');
    expect(rows[0].line).toBe(5);
  });

  it('--cell picks one cell; an unknown cell is an input error', () => {
    const file = join(dir, 'nandinv.sp');
    writeFileSync(file, NETLIST);
    const ok = runStages([file, '--cell', 'NANDINV']);
    expect(ok.code, ok.err).toBe(0);
    expect((JSON.parse(ok.out).stages as unknown[]).length).toBe(3);
    const bad = runStages([file, '--cell', 'nope']);
    expect(bad.code).toBe(2);
    expect(bad.err).toMatch(/no cell "nope"/);
  });

  it('the parser and the test builder give the same stage for the same inverter', () => {
    // Model names the built-in deck's device map knows without a .model card.
    const text = ['.subckt inv in out vdd vss', 'mn out in vss vss nch w=1u l=0.25u', 'mp out in vdd vdd pch w=3u l=0.25u', '.ends', ''].join('\n');
    const d = defaultDeck();
    const design = readDesign({ 'inv.sp': text }, { defaultScale: 1, deviceMap: d.deviceMap, supplies: d.supplies });
    const parsed = design.cells.get('inv')!;
    const built = new CellBuilder('inv', ['in', 'out', 'vdd', 'vss'])
      .nmos('mn', 'out', 'in', 'vss', 'vss', { w: 1e-6, l: 0.25e-6 })
      .pmos('mp', 'out', 'in', 'vdd', 'vdd', { w: 3e-6, l: 0.25e-6 })
      .build();
    const a = extractStages(parsed, localRails(design, parsed, d)).stages;
    const b = extractStages(built, localRails(design, built, d)).stages;
    expect(a.map((s) => [s.kind, parsed.nets[s.output!], s.inputs.map((n) => parsed.nets[n])])).toEqual(
      b.map((s) => [s.kind, built.nets[s.output!], s.inputs.map((n) => built.nets[n])]),
    );
    expect([...parsed.mosfets].map((m) => [m.polarity, m.w, m.l])).toEqual([...built.mosfets].map((m) => [m.polarity, m.w, m.l]));
  });
});
