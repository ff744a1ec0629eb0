// Pass chains. References: an n-channel device passes a full low but not a full high, a
// p-channel device the reverse, and a transmission gate both (Rabaey et al., Digital
// Integrated Circuits, 2nd ed., §6.2); a chain ends where a restoring (static) stage reads
// it, and a Manchester carry chain runs through its precharged carry nodes, which do not
// drive the chain (§11.3, recalled from memory).

import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { checkDesign } from '../../rules/engine';
import { defaultDeck } from '../../rules/default-deck';
import { defineRule, type CellContext } from '../../rules/types';
import { passChainsOf } from '../../rules/recognition/pass';
import { read } from './support';

interface ChainSummary {
  receiver: string;
  source: string;
  sourceKind: string;
  length: number;
  high: boolean;
  low: boolean;
  path: string;
}

function chains(text: string): ChainSummary[] {
  const deck = defaultDeck();
  const out: ChainSummary[] = [];
  const probe = defineRule({
    meta: { id: 'test.probe', title: 'probe', area: 'chain', rationale: '', fix: '', defaultSeverity: 'info' },
    params: z.object({}),
    check(ctx: CellContext) {
      for (const c of passChainsOf(ctx)) {
        out.push({
          receiver: ctx.cell.nets[c.receiver],
          source: ctx.cell.nets[c.source],
          sourceKind: c.sourceKind,
          length: c.length,
          high: c.degradesHigh,
          low: c.degradesLow,
          path: [c.source, ...c.steps.map((s) => s.to)].map((n) => ctx.cell.nets[n]).join('>'),
        });
      }
    },
  });
  checkDesign(read(text, deck), { ...deck, rules: { 'test.probe': { enabled: true, severity: 'info', params: {} } } }, { rules: [probe] });
  return out.sort((a, b) => a.receiver.localeCompare(b.receiver));
}

const inv = (name: string, a: string, y: string) => `mn${name} ${y} ${a} vss vss nch w=1u l=0.25u\nmp${name} ${y} ${a} vdd vdd pch w=2u l=0.25u`;

describe('pass chains', () => {
  it('tells an n-only device (degrades a high), a p-only one (degrades a low) and a transmission gate (neither) apart', () => {
    const found = chains(
      [
        '.subckt p a s s_b y1 y2 y3 vdd vss',
        inv('d', 'a', 'n0'),
        'mn1 n0 s m1 vss nch w=1u l=0.25u',
        inv('r1', 'm1', 'y1'),
        'mp2 n0 s_b m2 vdd pch w=2u l=0.25u',
        inv('r2', 'm2', 'y2'),
        'mn3 n0 s m3 vss nch w=1u l=0.25u',
        'mp3 n0 s_b m3 vdd pch w=2u l=0.25u',
        inv('r3', 'm3', 'y3'),
        '.ends',
      ].join('\n'),
    );
    expect(found).toEqual([
      { receiver: 'm1', source: 'n0', sourceKind: 'stage', length: 1, high: true, low: false, path: 'n0>m1' },
      { receiver: 'm2', source: 'n0', sourceKind: 'stage', length: 1, high: false, low: true, path: 'n0>m2' },
      { receiver: 'm3', source: 'n0', sourceKind: 'stage', length: 1, high: false, low: false, path: 'n0>m3' },
    ]);
  });

  it('counts series devices through unobserved stack nodes and stops at the restoring stage that reads the chain', () => {
    const found = chains(['.subckt s a s1 s2 y vdd vss', 'mn1 a s1 k vss nch w=1u l=0.25u', 'mn2 k s2 m vss nch w=1u l=0.25u', inv('r', 'm', 'y'), '.ends'].join('\n'));
    expect(found).toEqual([{ receiver: 'm', source: 'a', sourceKind: 'port', length: 2, high: true, low: false, path: 'a>k>m' }]);
  });

  it('runs a Manchester carry chain through its precharged carry nodes, from the carry-in driver to the last carry’s inverter', () => {
    const bit = (i: number) =>
      [`mpc${i} c${i} clk vdd vdd pch w=1u l=0.25u`, `mg${i} c${i} g${i} f${i} vss nch w=1u l=0.25u`, `mf${i} f${i} clk vss vss nch w=1u l=0.25u`, `mt${i} c${i - 1} p${i} c${i} vss nch w=1u l=0.25u`, inv(`o${i}`, `c${i}`, `co${i}`)].join('\n');
    const found = chains(['.subckt m cin g1 g2 g3 p1 p2 p3 clk co1 co2 co3 vdd vss', inv('i', 'cin', 'c0'), bit(1), bit(2), bit(3), '.ends'].join('\n'));
    expect(found.find((c) => c.receiver === 'c3')).toEqual({ receiver: 'c3', source: 'c0', sourceKind: 'stage', length: 3, high: true, low: false, path: 'c0>c1>c2>c3' });
  });
});
