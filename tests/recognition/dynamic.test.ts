// Recognition of dynamic nodes and keepers, and of the structures that must not be taken
// for them. The reference forms are those of Rabaey et al., Digital Integrated Circuits,
// 2nd ed., §6.3 (footed and footless domino, the half keeper fed by the output inverter,
// the n-channel pre-discharge mirror with a p-channel evaluation network) and §7.2
// (latches whose clocked feedback holds a node statically), and the precharged read bit
// line of a register file, whose precharge, evaluation stacks and keeper sit in different
// cells of the column.

import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { checkDesign } from '../../rules/engine';
import { defaultDeck } from '../../rules/default-deck';
import { defineRule, type CellContext } from '../../rules/types';
import { dynamicNodesOf, elementName, type DynamicNode } from '../../rules/recognition/dynamic';
import { read } from './support';

interface Summary {
  cell: string;
  node: string;
  style: string;
  clock: string;
  precharge: string[];
  footers: number;
  inputs: string[];
  keepers: string[];
  paths: number;
}

function summarise(d: DynamicNode, cell: string): Summary {
  const c = d.ctx.cell;
  return {
    cell,
    node: d.name,
    style: d.style,
    clock: c.nets[d.clock],
    precharge: d.precharge.map((e) => elementName(c, d.stage, e)),
    footers: d.footers.length,
    inputs: d.inputs.map((n) => c.nets[n]).sort(),
    keepers: d.keepers.map((k) => k.kind),
    paths: d.paths.length,
  };
}

function nodes(text: string | Record<string, string>): Summary[] {
  const deck = defaultDeck();
  const out: Summary[] = [];
  const probe = defineRule({
    meta: { id: 'test.probe', title: 'probe', area: 'dynamic', rationale: '', fix: '', defaultSeverity: 'info' },
    params: z.object({}),
    check(ctx: CellContext) {
      for (const d of dynamicNodesOf(ctx)) out.push(summarise(d, ctx.cell.name));
    },
  });
  checkDesign(read(text, deck), { ...deck, rules: { 'test.probe': { enabled: true, severity: 'info', params: {} } } }, { rules: [probe] });
  return out;
}

const inverter = (name: string, a: string, y: string) => `mn${name} ${y} ${a} vss vss nch w=1u l=0.25u\nmp${name} ${y} ${a} vdd vdd pch w=3u l=0.25u`;

describe('dynamic nodes', () => {
  it('finds a footed domino node: precharge, footer, evaluation inputs and a half keeper', () => {
    const found = nodes(
      ['.subckt d a b clk z vdd vss', 'mpre x clk vdd vdd pch w=1u l=0.25u', 'mkp x z vdd vdd pch w=0.4u l=0.5u', 'ma x a n1 vss nch w=1u l=0.25u', 'mb n1 b n2 vss nch w=1u l=0.25u', 'mf n2 clk vss vss nch w=1u l=0.25u', inverter('o', 'x', 'z'), '.ends'].join('\n'),
    );
    expect(found).toEqual([{ cell: 'd', node: 'x', style: 'n-evaluate', clock: 'clk', precharge: ['mpre'], footers: 1, inputs: ['a', 'b'], keepers: ['half'], paths: 0 }]);
  });

  it('finds a footless node, a cross-coupled full keeper and an always-on keeper', () => {
    const found = nodes(
      [
        '.subckt d a b clk z w vdd vss',
        // footless OR2 with a full keeper: the inverter's output z drives a p-channel to the supply and an n-channel to ground
        'mpre x clk vdd vdd pch w=1u l=0.25u',
        'mkp x z vdd vdd pch w=0.4u l=0.5u',
        'mkn x z vss vss nch w=0.3u l=0.5u',
        'ma x a vss vss nch w=1u l=0.25u',
        'mb x b vss vss nch w=1u l=0.25u',
        inverter('o', 'x', 'z'),
        // a second gate kept by an always-on weak pull-up
        'mpre2 y clk vdd vdd pch w=1u l=0.25u',
        'mwk y vss vdd vdd pch w=0.3u l=2u',
        'mc y a m vss nch w=1u l=0.25u',
        'mf m clk vss vss nch w=1u l=0.25u',
        inverter('p', 'y', 'w'),
        '.ends',
      ].join('\n'),
    );
    expect(found.find((f) => f.node === 'x')).toMatchObject({ footers: 0, inputs: ['a', 'b'], keepers: ['full'] });
    expect(found.find((f) => f.node === 'y')).toMatchObject({ footers: 1, inputs: ['a'], keepers: ['always-on'] });
  });

  it('finds the mirrored form: an n-channel pre-discharge and a p-channel evaluation network', () => {
    const found = nodes(
      ['.subckt d a b clk clk_b z vdd vss', 'mpd x clk vss vss nch w=1u l=0.25u', 'mfp n1 clk_b vdd vdd pch w=2u l=0.25u', 'ma x a n1 vdd pch w=2u l=0.25u', 'mb x b n1 vdd pch w=2u l=0.25u', inverter('o', 'x', 'z'), '.ends'].join('\n'),
    );
    expect(found).toEqual([{ cell: 'd', node: 'x', style: 'p-evaluate', clock: 'clk', precharge: ['mpd'], footers: 1, inputs: ['a', 'b'], keepers: [], paths: 0 }]);
  });

  it('takes none of these for a dynamic node: a latch’s clocked feedback, a clocked inverter, a transmission-gate mux with its inverter, a pseudo-n-channel gate, a cross-coupled level shifter', () => {
    const found = nodes(
      [
        '.subckt latch d clk clk_b q vdd vss',
        'mtn d clk m vss nch w=1u l=0.25u',
        'mtp d clk_b m vdd pch w=2u l=0.25u',
        inverter('q', 'm', 'q'),
        'mf1 vdd q f1 vdd pch w=1u l=0.25u',
        'mf2 f1 clk m vdd pch w=1u l=0.25u',
        'mf3 m clk_b f2 vss nch w=0.5u l=0.25u',
        'mf4 f2 q vss vss nch w=0.5u l=0.25u',
        '.ends',
        '.subckt cinv a clk clk_b y vdd vss',
        'mp1 vdd a s1 vdd pch w=2u l=0.25u',
        'mp2 s1 clk_b y vdd pch w=2u l=0.25u',
        'mn2 y clk s2 vss nch w=1u l=0.25u',
        'mn1 s2 a vss vss nch w=1u l=0.25u',
        '.ends',
        '.subckt tgmux a b s s_b y vdd vss',
        'mna a s_b m vss nch w=1u l=0.25u',
        'mpa a s m vdd pch w=2u l=0.25u',
        'mnb b s m vss nch w=1u l=0.25u',
        'mpb b s_b m vdd pch w=2u l=0.25u',
        inverter('o', 'm', 'y'),
        '.ends',
        '.subckt pseudo a b y vdd vss',
        'mpu y vss vdd vdd pch w=0.5u l=0.5u',
        'mna y a vss vss nch w=2u l=0.25u',
        'mnb y b vss vss nch w=2u l=0.25u',
        '.ends',
        '.subckt shifter in in_b out vdd vss',
        'mp1 o1 o2 vdd vdd pch w=1u l=0.25u',
        'mp2 o2 o1 vdd vdd pch w=1u l=0.25u',
        'mn1 o1 in vss vss nch w=2u l=0.25u',
        'mn2 o2 in_b vss vss nch w=2u l=0.25u',
        inverter('o', 'o2', 'out'),
        '.ends',
      ].join('\n'),
    );
    expect(found).toEqual([]);
  });
});

describe('dynamic nodes across the hierarchy', () => {
  // A register-file read port: the read bit line rbl is one net of the column, its precharge device is in the
  // precharge cell, its evaluation stacks in the bit cells, its keeper and sense inverter in the sense cell.
  const cells = [
    '.subckt rf_bit rwl rbl wwl wbl vdd vss',
    'mw wbl wwl q vss nch w=0.5u l=0.25u',
    inverter('i1', 'q', 'qb'),
    inverter('i2', 'qb', 'q'),
    'mr1 rbl rwl rm vss nch w=1u l=0.25u',
    'mr2 rm qb vss vss nch w=1u l=0.25u',
    '.ends',
    '.subckt rf_pre pclk rbl vdd vss',
    'mpre rbl pclk vdd vdd pch w=2u l=0.25u',
    '.ends',
    '.subckt rf_sense rbl dout vdd vss',
    inverter('s', 'rbl', 'dout'),
    'mkp rbl dout vdd vdd pch w=0.4u l=0.5u',
    '.ends',
  ].join('\n');
  const column = (bits: number) =>
    [
      cells,
      `.subckt rf_col clk ${Array.from({ length: bits }, (_, i) => `rwl${i} wwl${i}`).join(' ')} wbl dout vdd vss`,
      'xp clk rbl vdd vss rf_pre',
      ...Array.from({ length: bits }, (_, i) => `xb${i} rwl${i} rbl wwl${i} wbl vdd vss rf_bit`),
      'xs rbl dout vdd vss rf_sense',
      '.ends',
    ].join('\n');

  it('gathers the bit line’s precharge, evaluation stacks and keeper from the cells of the column', () => {
    const found = nodes(column(4));
    expect(found).toHaveLength(1);
    const [d] = found;
    expect(d).toMatchObject({ cell: 'rf_col', node: 'rbl', style: 'n-evaluate', clock: 'clk', precharge: ['xp/mpre'], keepers: ['half'] });
    // The evaluation inputs are the read word lines (column nets) and each bit cell's storage node.
    expect(d.inputs).toEqual(['rwl0', 'rwl1', 'rwl2', 'rwl3', 'xb0/qb', 'xb1/qb', 'xb2/qb', 'xb3/qb']);
    expect(d.paths).toBe(6);
  });

  it('leaves a dynamic node that is a port of a cell to the cell’s parent, where the keeper in a sibling is seen', () => {
    const text = [
      '.subckt dom_core a b clk x vdd vss',
      'mpre x clk vdd vdd pch w=1u l=0.25u',
      'ma x a n1 vss nch w=1u l=0.25u',
      'mb n1 b n2 vss nch w=1u l=0.25u',
      'mf n2 clk vss vss nch w=1u l=0.25u',
      '.ends',
      '.subckt dom_keep x z vdd vss',
      inverter('o', 'x', 'z'),
      'mkp x z vdd vdd pch w=0.4u l=0.5u',
      '.ends',
      '.subckt dom_top a b clk z vdd vss',
      'xc a b clk x vdd vss dom_core',
      'xk x z vdd vss dom_keep',
      '.ends',
    ].join('\n');
    const found = nodes(text);
    expect(found).toEqual([{ cell: 'dom_top', node: 'x', style: 'n-evaluate', clock: 'clk', precharge: ['xc/mpre'], footers: 1, inputs: ['a', 'b'], keepers: ['half'], paths: 2 }]);
  });
});
