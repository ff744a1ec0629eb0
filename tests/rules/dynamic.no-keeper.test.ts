// dynamic.no-keeper: an unkept dynamic node holds its level for t = C·ΔV/I (charge
// conservation on the node, I the off-state leakage of its evaluation network; Rabaey et
// al., Digital Integrated Circuits, 2nd ed., §6.3). The hold time is checked against that
// formula worked by hand from the netlist's sizes and the deck's per-µm figures, with the
// receiving inverter's VIH taken from an ngspice DC sweep of that inverter.

import { describe, expect, it } from 'vitest';
import rule from '../../rules/dynamic/no-keeper';
import { budgetPlotSchema } from '../../shared/findings';
import { curvePoints, dcSweep } from '../support/ngspice';
import { MODELS, findingsOf, levelOneDeck, lineOf } from '../recognition/support';

const domino = (keeper: boolean) =>
  [
    MODELS,
    '.subckt dom a b clk z vdd vss',
    'mpre x clk vdd vdd pm w=1u l=0.25u',
    keeper ? 'mkp x z vdd vdd pm w=0.4u l=0.5u' : '* no keeper',
    'ma x a n1 vss nm w=2u l=0.25u',
    'mb n1 b n2 vss nm w=2u l=0.25u',
    'mf n2 clk vss vss nm w=2u l=0.25u',
    'mo z x vdd vdd pm w=3u l=0.25u',
    'mon z x vss vss nm w=1u l=0.25u',
    '.ends',
  ].join('\n');

describe('dynamic.no-keeper', () => {
  const corner = levelOneDeck.corners[0];
  const vih = curvePoints(
    ...((s) => [s.x, s.y[0]] as const)(
      dcSweep([MODELS, 'vdd vdd 0 2.5', 'vin x 0 0', 'mo z x vdd vdd pm w=3u l=0.25u', 'mon z x 0 0 nm w=1u l=0.25u'].join('\n'), { source: 'vin', start: 0, stop: 2.5, step: 0.001 }, ['v(z)']),
    ),
  ).vih!;

  it('raises on a domino node without a keeper, with the hold time t = C·ΔV/I worked from the netlist', () => {
    const text = domino(false);
    const findings = findingsOf(rule, text, { deck: levelOneDeck });
    expect(findings).toHaveLength(1);
    const f = findings[0];
    expect(f.line).toBe(lineOf(text, 'mpre'));
    expect(f.nets).toEqual(['x']);
    // Node capacitance: drain junctions of mpre (1 µm) and ma (2 µm), gates of mo (3 µm) and mon (1 µm).
    const c = corner.pmos.cjPerUm * 1 + corner.nmos.cjPerUm * 2 + corner.pmos.cgPerUm * 3 + corner.nmos.cgPerUm * 1;
    // Leakage of the off series stack: its leakiest device, 2 µm of n-channel.
    const leak = corner.nmos.leakPerUm * 2;
    const allowed = corner.vdd - vih - 0.1;
    const expected = (c * allowed) / leak;
    expect(f.measured!.unit).toBe('s');
    expect(Math.abs(f.measured!.value - expected) / expected).toBeLessThan(0.03);
    expect(f.limit).toEqual({ value: levelOneDeck.slowestClockPeriod, unit: 's' });
    expect(f.message).toContain('has no keeper');
    const plot = budgetPlotSchema.parse(f.plot);
    expect(plot.bars[0].sense).toBe('min');
  });

  it('does not raise on the same node with its half keeper', () => {
    expect(findingsOf(rule, domino(true), { deck: levelOneDeck })).toEqual([]);
  });

  it('accepts an unkept node that holds the deck’s multiple of the slowest period, and only then', () => {
    const f = findingsOf(rule, domino(false), { deck: levelOneDeck })[0];
    const periods = f.measured!.value / levelOneDeck.slowestClockPeriod;
    expect(findingsOf(rule, domino(false), { deck: levelOneDeck, params: { 'dynamic.no-keeper': { acceptHoldRatio: periods * 0.9 } } })).toEqual([]);
    expect(findingsOf(rule, domino(false), { deck: levelOneDeck, params: { 'dynamic.no-keeper': { acceptHoldRatio: periods * 1.1 } } })).toHaveLength(1);
  });

  it('takes the worst corner of the built-in deck: the fast, hot one leaks most', () => {
    const f = findingsOf(rule, domino(false).replace(/ pm /g, ' pch ').replace(/ nm /g, ' nch '))[0];
    expect(f.corner).toBe('ff-hot');
  });
});
