// dynamic.coupling-noise: a switching neighbour couples ΔV = Vswing·Cc/(Cc + Cvictim) onto a
// net through their coupling capacitance (the capacitive divider; Rabaey et al., Digital
// Integrated Circuits, 2nd ed., §9.3, capacitive cross talk on a floating line). Checked
// against an ngspice transient in which the aggressor falls next to a floating precharged
// node, and against the formula by hand. Device capacitances are zero on both sides.

import { describe, expect, it } from 'vitest';
import rule from '../../rules/dynamic/coupling-noise';
import { corner, deckWith, nParams, pParams } from '../electrical/helpers';
import { transientEnd } from '../recognition/ngspice-run';
import { MODELS, findingsOf, lineOf } from '../recognition/support';

const deck = deckWith([corner({ nmos: { ...nParams, cjPerUm: 0, cgPerUm: 0 }, pmos: { ...pParams, cjPerUm: 0, cgPerUm: 0 } })]);

const domino = (extra: string[]) =>
  [
    MODELS,
    '.subckt dom a b clk agg z vdd vss',
    'mpre x clk vdd vdd pm w=1u l=0.25u',
    'mkp x z vdd vdd pm w=0.4u l=0.5u',
    'ma x a n1 vss nm w=1u l=0.25u',
    'mb n1 b n2 vss nm w=1u l=0.25u',
    'mf n2 clk vss vss nm w=1u l=0.25u',
    'mo z x vdd vdd pm w=3u l=0.25u',
    'mon z x vss vss nm w=1u l=0.25u',
    'cx x vss 10f',
    ...extra,
    '.ends',
  ].join('\n');

describe('dynamic.coupling-noise', () => {
  it('raises on a large coupling capacitor from a signal onto the node; the glitch is ngspice’s', () => {
    const text = domino(['ccx x agg 8f']);
    const f = findingsOf(rule, text, { deck });
    expect(f).toHaveLength(1);
    expect(f[0].line).toBe(lineOf(text, 'mpre'));
    // By hand: 2.5 V · 8 fF / (8 fF + 10 fF).
    expect(f[0].measured!.value).toBeCloseTo((2.5 * 8) / 18, 9);
    const [vx] = transientEnd(
      [MODELS, 'vdd vdd 0 2.5', 'vclk clk 0 2.5', 'vagg agg 0 pwl(0 2.5 1n 2.5 1.1n 0)', 'mpre x clk vdd vdd pm w=1u l=0.25u', 'ma x 0 n1 0 nm w=1u l=0.25u', 'cx x 0 10f', 'ccx x agg 8f', '.ic v(x)=2.5 v(agg)=2.5 v(clk)=2.5'].join('\n'),
      5e-9,
      1e-12,
      ['v(x)'],
    );
    expect(Math.abs(f[0].measured!.value - (2.5 - vx))).toBeLessThan(0.005);
    expect(f[0].devices).toContain('ccx');
  });

  it('does not raise on a small coupling capacitor, nor on a capacitor to a rail', () => {
    expect(findingsOf(rule, domino(['ccx x agg 1f', 'cg x vdd 20f']), { deck })).toEqual([]);
  });

  it('raises on coupling that lifts a low evaluation input past the evaluation device’s threshold', () => {
    // ΔV = 2.5 V · 5 fF / (5 fF + 10 fF) = 0.83 V against VT0 = 0.43 V (the nm card) less the 0.1 V margin.
    const text = domino(['cca a agg 5f', 'ca a vss 10f']);
    const f = findingsOf(rule, text, { deck });
    expect(f).toHaveLength(1);
    expect(f[0].measured!.value).toBeCloseTo((2.5 * 5) / 15, 9);
    expect(f[0].limit!.value).toBeCloseTo(0.43 - 0.1, 9);
    expect(f[0].message).toContain('evaluation input a');
    // 2.5 V · 1 fF / 21 fF = 0.12 V stays below it.
    expect(findingsOf(rule, domino(['cca a agg 1f', 'ca a vss 20f']), { deck })).toEqual([]);
  });
});
