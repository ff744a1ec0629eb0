// chain.threshold-drop: an n-channel pass device with its gate at VDD delivers a high of
// VDD − VT(VSB = VOUT), the threshold raised by the body effect (Rabaey et al., Digital
// Integrated Circuits, 2nd ed., §3.3 and §6.2, pass-transistor logic). The reference is
// ngspice: the operating point of the same pass device, and the DC sweep of the same
// receiving inverter for its VIH, both with the same level-1 cards (γ = 0.4 V^½).

import { describe, expect, it } from 'vitest';
import rule from '../../rules/chain/threshold-drop';
import { chainPlotSchema } from '../../shared/findings';
import { curvePoints, dcSweep } from '../support/ngspice';
import { operatingPoint } from '../recognition/ngspice-run';
import { MODELS, findingsOf, levelOneDeck, lineOf } from '../recognition/support';

const HIGH_VT = '.model nhv nmos level=1 vto=0.8 kp=115e-6 lambda=0.06 gamma=0.4 phi=0.6';

const chain = (pass: string[], receiver: string) =>
  [
    MODELS,
    HIGH_VT,
    '.subckt sel a s s_b y vdd vss',
    'mdn n0 a vss vss nm w=1u l=0.25u',
    'mdp n0 a vdd vdd pm w=2u l=0.25u',
    ...pass,
    `mrn y n1 vss vss nm ${receiver.split('|')[0]}`,
    `mrp y n1 vdd vdd pm ${receiver.split('|')[1]}`,
    '.ends',
  ].join('\n');

const SKEWED = 'w=1u l=0.25u|w=6u l=0.25u';

describe('chain.threshold-drop', () => {
  it('raises when an n-channel pass device cannot lift its receiver past VIH; level and VIH are ngspice’s', () => {
    const text = chain(['mpass n0 s n1 vss nhv w=1u l=0.25u'], SKEWED);
    const f = findingsOf(rule, text, { deck: levelOneDeck });
    expect(f).toHaveLength(1);
    expect(f[0].line).toBe(lineOf(text, 'mpass'));
    const [passed] = operatingPoint([MODELS, HIGH_VT, 'vdd vdd 0 2.5', 'vin n0 0 2.5', 'vs s 0 2.5', 'mpass n0 s n1 0 nhv w=1u l=0.25u', 'mrn y n1 0 0 nm w=1u l=0.25u', 'mrp y n1 vdd vdd pm w=6u l=0.25u'].join('\n'), ['v(n1)']);
    expect(Math.abs(f[0].measured!.value - passed)).toBeLessThan(0.02);
    const sweep = dcSweep([MODELS, 'vdd vdd 0 2.5', 'vin n1 0 0', 'mrn y n1 0 0 nm w=1u l=0.25u', 'mrp y n1 vdd vdd pm w=6u l=0.25u'].join('\n'), { source: 'vin', start: 0, stop: 2.5, step: 0.001 }, ['v(y)']);
    const vih = curvePoints(sweep.x, sweep.y[0]).vih!;
    expect(passed).toBeLessThan(vih);
    expect(Math.abs(f[0].limit!.value - vih)).toBeLessThan(0.03);
    const plot = chainPlotSchema.parse(f[0].plot);
    expect(plot.levels[0]).toBe(2.5);
    expect(plot.levels[1]).toBeCloseTo(f[0].measured!.value, 9);
  });

  it('does not raise when a p-channel device completes the transmission gate', () => {
    expect(findingsOf(rule, chain(['mpass n0 s n1 vss nhv w=1u l=0.25u', 'mpp n0 s_b n1 vdd pm w=2u l=0.25u'], SKEWED), { deck: levelOneDeck })).toEqual([]);
  });

  it('does not raise when the passed level clears a receiver with a lower VIH', () => {
    const [passed] = operatingPoint([MODELS, 'vdd vdd 0 2.5', 'vin n0 0 2.5', 'vs s 0 2.5', 'mpass n0 s n1 0 nm w=1u l=0.25u', 'mrn y n1 0 0 nm w=2u l=0.25u', 'mrp y n1 vdd vdd pm w=1u l=0.25u'].join('\n'), ['v(n1)']);
    const sweep = dcSweep([MODELS, 'vdd vdd 0 2.5', 'vin n1 0 0', 'mrn y n1 0 0 nm w=2u l=0.25u', 'mrp y n1 vdd vdd pm w=1u l=0.25u'].join('\n'), { source: 'vin', start: 0, stop: 2.5, step: 0.001 }, ['v(y)']);
    expect(passed).toBeGreaterThan(curvePoints(sweep.x, sweep.y[0]).vih!);
    expect(findingsOf(rule, chain(['mpass n0 s n1 vss nm w=1u l=0.25u'], 'w=2u l=0.25u|w=1u l=0.25u'), { deck: levelOneDeck })).toEqual([]);
  });
});
