// stage.ratioed-logic: a pseudo-n-channel gate (an always-on p-channel load against an
// n-channel network) has a low level set by the ratio of the two (Rabaey et al., Digital
// Integrated Circuits, 2nd ed., §6.2.2). The reported low level is checked against
// ngspice's operating point of the same gate with one input high.

import { describe, expect, it } from 'vitest';
import rule from '../../rules/stage/ratioed-logic';
import { transferPlotSchema } from '../../shared/findings';
import { operatingPoint } from '../recognition/ngspice-run';
import { MODELS, findingsOf, levelOneDeck, lineOf } from '../recognition/support';

const nor2 = [MODELS, '.subckt pnor a b y vdd vss', 'mpu y vss vdd vdd pm w=0.5u l=0.5u', 'mna y a vss vss nm w=2u l=0.25u', 'mnb y b vss vss nm w=2u l=0.25u', '.ends'].join('\n');

describe('stage.ratioed-logic', () => {
  it('reports a pseudo-n-channel NOR as info, with the low level ngspice gives', () => {
    const f = findingsOf(rule, nor2, { deck: levelOneDeck });
    expect(f).toHaveLength(1);
    expect(f[0].severity).toBe('info');
    expect(f[0].line).toBe(lineOf(nor2, 'mpu'));
    expect(f[0].message).toContain('pseudo-n-channel');
    expect(f[0].message).toContain('Not a dynamic node');
    const [vol] = operatingPoint([MODELS, 'vdd vdd 0 2.5', 'va a 0 2.5', 'vb b 0 0', 'mpu y 0 vdd vdd pm w=0.5u l=0.5u', 'mna y a 0 0 nm w=2u l=0.25u', 'mnb y b 0 0 nm w=2u l=0.25u'].join('\n'), ['v(y)']);
    expect(Math.abs(f[0].measured!.value - vol)).toBeLessThan(0.005);
    expect(transferPlotSchema.parse(f[0].plot).vol).toBeCloseTo(f[0].measured!.value, 9);
  });

  it('does not report a complementary gate', () => {
    const nand = [MODELS, '.subckt nand a b y vdd vss', 'mpa y a vdd vdd pm w=2u l=0.25u', 'mpb y b vdd vdd pm w=2u l=0.25u', 'mna y a m vss nm w=2u l=0.25u', 'mnb m b vss vss nm w=2u l=0.25u', '.ends'].join('\n');
    expect(findingsOf(rule, nand, { deck: levelOneDeck })).toEqual([]);
  });

  it('reports only ratioed stages whose fought-over level is farther from its rail than the deck allows, when asked', () => {
    const vol = findingsOf(rule, nor2, { deck: levelOneDeck })[0].measured!.value;
    expect(findingsOf(rule, nor2, { deck: levelOneDeck, params: { 'stage.ratioed-logic': { reportAboveFraction: (vol / 2.5) * 1.1 } } })).toEqual([]);
    expect(findingsOf(rule, nor2, { deck: levelOneDeck, params: { 'stage.ratioed-logic': { reportAboveFraction: (vol / 2.5) * 0.9 } } })).toHaveLength(1);
  });
});
