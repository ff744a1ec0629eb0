// dynamic.keeper-ratio: the keeper's on-current against the weakest evaluation path's,
// both at full drive (|VGS| = |VDS| = VDD). The reference is ngspice: the two currents of
// the same devices at those bias points, with the same level-1 cards.

import { describe, expect, it } from 'vitest';
import rule from '../../rules/dynamic/keeper-ratio';
import { operatingPoint } from '../recognition/ngspice-run';
import { MODELS, findingsOf, levelOneDeck, lineOf } from '../recognition/support';

const domino = (keeper: string) =>
  [
    MODELS,
    '.subckt dom a b clk z vdd vss',
    'mpre x clk vdd vdd pm w=1u l=0.25u',
    `mkp x z vdd vdd pm ${keeper}`,
    'ma x a n1 vss nm w=1u l=0.25u',
    'mb n1 b n2 vss nm w=1u l=0.25u',
    'mf n2 clk vss vss nm w=1u l=0.25u',
    'mo z x vdd vdd pm w=3u l=0.25u',
    'mon z x vss vss nm w=1u l=0.25u',
    '.ends',
  ].join('\n');

/** ngspice: keeper current into a node held at 0 V with its gate low; stack current from a node held at VDD with every gate high. */
function ngspiceRatio(keeper: string): number {
  const [ik] = operatingPoint([MODELS, 'vdd vdd 0 2.5', 'vx x 0 0', `mkp x 0 vdd vdd pm ${keeper}`].join('\n'), ['i(vx)']);
  const [ie] = operatingPoint(
    [MODELS, 'vdd vdd 0 2.5', 'vx vdd x 0', 'ma x vdd n1 0 nm w=1u l=0.25u', 'mb n1 vdd n2 0 nm w=1u l=0.25u', 'mf n2 vdd 0 0 nm w=1u l=0.25u'].join('\n'),
    ['i(vx)'],
  );
  return Math.abs(ik) / Math.abs(ie);
}

describe('dynamic.keeper-ratio', () => {
  it('raises on a keeper too strong for the evaluation stack, with the ratio ngspice gives', () => {
    const keeper = 'w=2u l=0.25u';
    const text = domino(keeper);
    const findings = findingsOf(rule, text, { deck: levelOneDeck });
    expect(findings).toHaveLength(1);
    const f = findings[0];
    expect(f.line).toBe(lineOf(text, 'mpre'));
    expect(f.devices).toContain('mkp');
    const ref = ngspiceRatio(keeper);
    expect(ref).toBeGreaterThan(0.3);
    expect(Math.abs(f.measured!.value - ref) / ref).toBeLessThan(0.02);
    expect(f.limit).toEqual({ value: 0.3, unit: 'ratio' });
    expect(f.message).toContain('above 0.3');
  });

  it('raises on a keeper too weak to hold the node', () => {
    const keeper = 'w=0.1u l=3u';
    const f = findingsOf(rule, domino(keeper), { deck: levelOneDeck });
    expect(f).toHaveLength(1);
    const ref = ngspiceRatio(keeper);
    expect(ref).toBeLessThan(0.03);
    expect(Math.abs(f[0].measured!.value - ref) / ref).toBeLessThan(0.02);
    expect(f[0].limit!.value).toBe(0.03);
  });

  it('does not raise on a keeper inside the window', () => {
    const keeper = 'w=0.4u l=0.5u';
    const ref = ngspiceRatio(keeper);
    expect(ref).toBeGreaterThan(0.03);
    expect(ref).toBeLessThan(0.3);
    expect(findingsOf(rule, domino(keeper), { deck: levelOneDeck })).toEqual([]);
  });

  it('follows the deck’s window', () => {
    const keeper = 'w=0.4u l=0.5u';
    const ref = ngspiceRatio(keeper);
    expect(findingsOf(rule, domino(keeper), { deck: levelOneDeck, params: { 'dynamic.keeper-ratio': { maxRatio: ref * 0.9 } } })).toHaveLength(1);
    expect(findingsOf(rule, domino(keeper), { deck: levelOneDeck, params: { 'dynamic.keeper-ratio': { minRatio: ref * 1.1 } } })).toHaveLength(1);
  });
});
