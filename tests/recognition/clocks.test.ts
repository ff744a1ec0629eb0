// Clock tracing. The references are Boolean identities: an inverter complements its
// input, so a clock through one inverter is the opposite phase and through two the same
// one; NAND(clk, en) is 1 whenever clk is 0 and NOR(clk, en) is 0 whenever clk is 1
// (a gated clock known in one half of the period, De Morgan); and SPICE's positional
// subcircuit pins, by which a parent's net reaches a child's port.

import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { checkDesign } from '../../rules/engine';
import { defaultDeck } from '../../rules/default-deck';
import { defineRule, type CellContext } from '../../rules/types';
import { stagesOf } from '../../rules/stages';
import { timingOf, type Timing } from '../../rules/recognition/timing';
import nonRegenerative from '../../rules/stage/non-regenerative';
import noiseMargin from '../../rules/stage/noise-margin';
import { check, read } from './support';

interface Seen {
  cell: string;
  signals: string;
  timing: Map<string, Timing>;
  kinds: Map<string, string>;
}

/** Timing of every net and kind of every driving stage, per analysed context. */
function trace(text: string | Record<string, string>): Seen[] {
  const deck = defaultDeck();
  const seen: Seen[] = [];
  const probe = defineRule({
    meta: { id: 'test.probe', title: 'probe', area: 'stage', rationale: '', fix: '', defaultSeverity: 'info' },
    params: z.object({}),
    check(ctx: CellContext) {
      const t = timingOf(ctx).timing;
      const timing = new Map<string, Timing>();
      ctx.cell.nets.forEach((n, i) => {
        const x = t[i];
        if (x) timing.set(n, x);
      });
      const kinds = new Map<string, string>();
      for (const s of stagesOf(ctx).stages) if (s.output !== null) kinds.set(ctx.cell.nets[s.output], s.kind);
      seen.push({ cell: ctx.cell.name, signals: JSON.stringify(ctx.signals ?? null), timing, kinds });
    },
  });
  checkDesign(read(text, deck), { ...deck, rules: { 'test.probe': { enabled: true, severity: 'info', params: {} } } }, { rules: [probe] });
  return seen;
}

const levels = (t: Timing | undefined) => (t ? `${t.phase}:${t.low === 2 ? '?' : t.low}${t.high === 2 ? '?' : t.high}` : 'none');

describe('clock roots', () => {
  it('takes roots from the deck’s name patterns, with inverted-phase suffixes', () => {
    const [c] = trace(
      [
        '.subckt names clk clk_b ckx phi1 phi1bar clkin clkb_lone y1 y2 y3 y4 y5 y6 y7 vdd vss',
        ...['clk', 'clk_b', 'ckx', 'phi1', 'phi1bar', 'clkin', 'clkb_lone'].map((n, i) => `mn${i} y${i + 1} ${n} vss vss nch w=1u l=0.25u\nmp${i} y${i + 1} ${n} vdd vdd pch w=2u l=0.25u`),
        '.ends',
      ].join('\n'),
    );
    expect(levels(c.timing.get('clk'))).toBe('clk:01');
    expect(levels(c.timing.get('clk_b'))).toBe('clk:10');
    expect(levels(c.timing.get('ckx'))).toBe('ckx:01');
    expect(levels(c.timing.get('phi1'))).toBe('phi1:01');
    // "bar" without a separator counts because phi1 is a net of the cell.
    expect(levels(c.timing.get('phi1bar'))).toBe('phi1:10');
    // "clkin" is not an inverted "clki" (no such net): a clock of its own.
    expect(levels(c.timing.get('clkin'))).toBe('clkin:01');
    // Each inverter output is the opposite phase of its clock.
    expect(levels(c.timing.get('y1'))).toBe('clk:10');
    expect(levels(c.timing.get('y2'))).toBe('clk:01');
  });

  it('takes a net driven by a periodic source as a clock, whatever its name', () => {
    const [top] = trace(['vdd vdd 0 2.5', 'vss vss 0 0', 'vck ph 0 pulse(0 2.5 0 0.1n 0.1n 1n 2n)', 'mn y ph vss vss nch w=1u l=0.25u', 'mp y ph vdd vdd pch w=2u l=0.25u'].join('\n'));
    expect(levels(top.timing.get('ph'))).toBe('ph:01');
    expect(levels(top.timing.get('y'))).toBe('ph:10');
  });
});

describe('tracing through stages', () => {
  const text = [
    '.subckt tree clk en n1 n2 g1 g2 vdd vss',
    // a local inverted copy with a name that says nothing, and a buffer after it
    'mn1 a_27_47# clk vss vss nch w=1u l=0.25u',
    'mp1 a_27_47# clk vdd vdd pch w=2u l=0.25u',
    'mn2 n1 a_27_47# vss vss nch w=1u l=0.25u',
    'mp2 n1 a_27_47# vdd vdd pch w=2u l=0.25u',
    // NAND(clk, en)
    'mn3 g1 clk s1 vss nch w=1u l=0.25u',
    'mn4 s1 en vss vss nch w=1u l=0.25u',
    'mp3 g1 clk vdd vdd pch w=2u l=0.25u',
    'mp4 g1 en vdd vdd pch w=2u l=0.25u',
    // NOR(clk, en)
    'mn5 g2 clk vss vss nch w=1u l=0.25u',
    'mn6 g2 en vss vss nch w=1u l=0.25u',
    'mp5 g2 clk s2 vdd pch w=4u l=0.25u',
    'mp6 s2 en vdd vdd pch w=4u l=0.25u',
    // a clock-named net driven by a traced stage takes the traced phase
    'mn7 clk_fake a_27_47# vss vss nch w=1u l=0.25u',
    'mp7 clk_fake a_27_47# vdd vdd pch w=2u l=0.25u',
    'mn8 n2 clk_fake vss vss nch w=1u l=0.25u',
    'mp8 n2 clk_fake vdd vdd pch w=2u l=0.25u',
    '.ends',
  ].join('\n');
  const [c] = trace(text);

  it('recognises a locally inverted copy of the clock whatever its name, and its buffered copy', () => {
    expect(c.timing.get('a_27_47#')).toMatchObject({ phase: 'clk', low: 1, high: 0, kind: 'clock' });
    expect(c.timing.get('n1')).toMatchObject({ phase: 'clk', low: 0, high: 1, kind: 'clock' });
  });

  it('gives a NAND with a clock input a gated clock known while the clock is low, a NOR one known while it is high', () => {
    expect(c.timing.get('g1')).toMatchObject({ phase: 'clk', low: 1, high: 2, kind: 'gated' });
    expect(c.timing.get('g2')).toMatchObject({ phase: 'clk', low: 2, high: 0, kind: 'gated' });
    expect(c.timing.has('en')).toBe(false);
  });

  it('lets the trace override a clock name on a net a traced stage drives', () => {
    expect(levels(c.timing.get('clk_fake'))).toBe('clk:01');
    expect(levels(c.timing.get('n2'))).toBe('clk:10');
  });
});

describe('clocks across the hierarchy', () => {
  const cells = [
    '.subckt inv a y vdd vss',
    'mn y a vss vss nch w=1u l=0.25u',
    'mp y a vdd vdd pch w=2u l=0.25u',
    '.ends',
    '* a footless domino gate whose precharge port has no clock-like name',
    '.subckt fdom pc a b out vdd vss',
    'mpre x pc vdd vdd pch w=1u l=0.25u',
    'mkp x out vdd vdd pch w=0.3u l=0.5u',
    'ma x a vss vss nch w=1u l=0.25u',
    'mb x b vss vss nch w=1u l=0.25u',
    'mo out x vdd vdd pch w=3u l=0.25u',
    'mon out x vss vss nch w=1u l=0.25u',
    '.ends',
  ].join('\n');
  const top = [
    cells,
    '.subckt blk clk d0 d1 d2 q0 q1 q2 vdd vss',
    'xi clk ck_n vdd vss inv',
    'xj ck_n ck_p vdd vss inv',
    'xa d0 da vdd vss inv',
    'xb d1 db vdd vss inv',
    // two gates on the same clock, fed from domino-free static inputs at their evaluation side
    'x0 ck_p da db q0 vdd vss fdom',
    'x1 ck_p db da q1 vdd vss fdom',
    // the same cell with a data signal on its precharge port
    'x2 d2 da db q2 vdd vss fdom',
    '.ends',
  ].join('\n');
  const seen = trace(top);

  it('learns what a child does with a clock from the child itself (two inverter instances make a buffered clock)', () => {
    const blk = seen.find((s) => s.cell === 'blk')!;
    expect(levels(blk.timing.get('ck_n'))).toBe('clk:10');
    expect(levels(blk.timing.get('ck_p'))).toBe('clk:01');
  });

  it('asks a child what it does with a clock only where the parent reads the answer; the child traces its own outputs either way', () => {
    const t = trace(
      [
        cells,
        '.subckt pair clk z vdd vss',
        // qm gates a device here, so the parent must know it is the inverted clock; qn is touched by nothing but xn
        'xm clk qm vdd vss inv',
        'xn clk qn vdd vss inv',
        'mg z qm vss vss nch w=1u l=0.25u',
        'mz z vdd vdd vdd pch w=1u l=0.25u',
        '.ends',
      ].join('\n'),
    );
    const pair = t.find((s) => s.cell === 'pair')!;
    expect(levels(pair.timing.get('qm'))).toBe('clk:10');
    expect(levels(pair.timing.get('qn'))).toBe('none');
    // Whatever each instance of inv is told about y, its own trace makes y the inverted clock.
    const inv = t.filter((s) => s.cell === 'inv');
    expect(inv.length).toBeGreaterThan(0);
    for (const c of inv) expect(levels(c.timing.get('y'))).toBe('clk:10');
  });

  it('feeds each child port the timing its parent’s net has, and analyses each distinct context once', () => {
    const fdom = seen.filter((s) => s.cell === 'fdom');
    // x0 and x1 share one context (the clock on pc); x2 has a context of its own (no clock).
    expect(fdom).toHaveLength(2);
    const clocked = fdom.find((s) => s.signals !== 'null');
    const plain = fdom.find((s) => s.signals === 'null');
    expect(levels(clocked!.timing.get('pc'))).toBe('clk:01');
    expect(plain).toBeDefined();
    const inv = seen.filter((s) => s.cell === 'inv');
    // inv carries clk (xi), the inverted clock (xj) and data (xa, xb): three contexts.
    expect(inv).toHaveLength(3);
  });

  it('makes the footless stage dynamic, traced where its precharge port carries a clock and on an enable phase of its own where not; the stage rules leave it alone', () => {
    const fdom = seen.filter((s) => s.cell === 'fdom');
    const clocked = fdom.find((s) => s.timing.get('pc')?.phase === 'clk')!;
    const plain = fdom.find((s) => s.timing.get('pc')?.phase !== 'clk')!;
    expect(clocked.kinds.get('x')).toBe('dynamic');
    expect(plain.kinds.get('x')).toBe('dynamic');
    // With its clock traced, the node is precharged high while clk is low; otherwise while its own enable pc is low.
    expect(levels(clocked.timing.get('x'))).toBe('clk:1?');
    expect(plain.timing.get('pc')).toMatchObject({ phase: 'pc', kind: 'enable' });
    expect(levels(plain.timing.get('x'))).toBe('pc:1?');
    // A precharged node has no static transfer curve: no stage finding names it.
    const findings = check(top, { rules: [nonRegenerative, noiseMargin] });
    expect(findings.filter((f) => f.cell === 'fdom' && f.nets[0] === 'x')).toEqual([]);
  });
});
