// dynamic.charge-sharing: ΔV = VDD·Cint/(Cint + Cnode), charge conservation between a
// precharged node and the discharged stack node evaluation connects to it (Rabaey et al.,
// Digital Integrated Circuits, 2nd ed., §6.3). Checked against an ngspice transient of
// the same charge redistribution, and against the formula worked by hand. Device
// capacitances are left out on both sides (per-µm figures of zero, and level-1 cards
// without junction or overlap capacitance), so the explicit capacitors alone set the
// charge.

import { describe, expect, it } from 'vitest';
import rule from '../../rules/dynamic/charge-sharing';
import { budgetPlotSchema } from '../../shared/findings';
import { corner, deckWith, nParams, pParams } from '../electrical/helpers';
import { transientEnd } from '../recognition/ngspice-run';
import { MODELS, findingsOf, lineOf } from '../recognition/support';

const deck = deckWith([corner({ nmos: { ...nParams, cjPerUm: 0, cgPerUm: 0 }, pmos: { ...pParams, cjPerUm: 0, cgPerUm: 0 } })]);

const domino = (cInternal: string) =>
  [
    MODELS,
    '.subckt dom a b clk z vdd vss',
    'mpre x clk vdd vdd pm w=1u l=0.25u',
    'mkp x z vdd vdd pm w=0.4u l=0.5u',
    'ma x a n1 vss nm w=1u l=0.25u',
    'mb n1 b n2 vss nm w=1u l=0.25u',
    'mf n2 clk vss vss nm w=1u l=0.25u',
    'mo z x vdd vdd pm w=3u l=0.25u',
    'mon z x vss vss nm w=1u l=0.25u',
    'cx x vss 10f',
    `cn1 n1 vss ${cInternal}`,
    '.ends',
  ].join('\n');

/** ngspice: the node precharged to VDD, the stack node at 0 V, a rising with b low and the footer on; the node's final level. */
function ngspiceShared(cInternal: number): number {
  const [vx] = transientEnd(
    [
      MODELS,
      'vdd vdd 0 2.5',
      'vclk clk 0 2.5',
      'va a 0 pwl(0 0 1n 0 1.1n 2.5)',
      'vb b 0 0',
      'mpre x clk vdd vdd pm w=1u l=0.25u',
      'ma x a n1 0 nm w=1u l=0.25u',
      'mb n1 b n2 0 nm w=1u l=0.25u',
      'mf n2 clk 0 0 nm w=1u l=0.25u',
      'cx x 0 10f',
      `cn1 n1 0 ${cInternal}`,
      '.ic v(x)=2.5 v(n1)=0 v(n2)=0 v(clk)=2.5 v(vdd)=2.5',
    ].join('\n'),
    30e-9,
    1e-11,
    ['v(x)'],
  );
  return 2.5 - vx;
}

describe('dynamic.charge-sharing', () => {
  it('raises when sharing with a large stack node takes the node past its receiver’s threshold; the drop is ngspice’s', () => {
    const text = domino('10f');
    const f = findingsOf(rule, text, { deck });
    expect(f).toHaveLength(1);
    expect(f[0].line).toBe(lineOf(text, 'mpre'));
    // By hand: 2.5 V · 10 fF / (10 fF + 10 fF).
    expect(f[0].measured!.value).toBeCloseTo((2.5 * 10) / 20, 9);
    expect(Math.abs(f[0].measured!.value - ngspiceShared(10e-15))).toBeLessThan(0.005);
    expect(f[0].message).toContain('a high');
    expect(f[0].nets).toEqual(['x', 'n1']);
    expect(budgetPlotSchema.parse(f[0].plot).bars[0].sense).toBe('max');
  });

  it('does not raise when the stack node is small; the formula bounds ngspice’s drop from above', () => {
    const f = findingsOf(rule, domino('4f'), { deck });
    expect(f).toEqual([]);
    // Here the evaluation device cuts off (its source a body-effected threshold below its gate) just before the charge has
    // spread fully, so the simulated drop is a little smaller than the formula's worst case.
    const formula = (2.5 * 4) / 14;
    const simulated = ngspiceShared(4e-15);
    expect(formula).toBeGreaterThanOrEqual(simulated);
    expect(formula - simulated).toBeLessThan(0.02);
  });

  it('counts a stack node kept precharged by a second clocked device with the node, not against it', () => {
    const text = domino('10f').replace('.ends', 'mpre1 n1 clk vdd vdd pm w=0.5u l=0.25u\n.ends');
    expect(findingsOf(rule, text, { deck })).toEqual([]);
  });
});
