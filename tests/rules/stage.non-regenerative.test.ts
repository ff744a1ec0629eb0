// stage.non-regenerative: the trade's fact that a stage restores a disturbed level only
// if the magnitude of its gain at the switching threshold exceeds one. The gains the
// rule acts on are those checked against ngspice in tests/electrical/ngspice.test.ts.

import { describe, expect, it } from 'vitest';
import rule from '../../rules/stage/non-regenerative';
import { defaultDeck } from '../../rules/default-deck';
import { transferPlotSchema } from '../../shared/findings';
import { curvePoints, dcSweep } from '../support/ngspice';
import { MODEL_LINES, diodeLoaded, dominoWithPassGate, inverter, levelOneDeck, nand2, run } from '../electrical/stage-fixtures';

describe('stage.non-regenerative', () => {
  it('raises on an n-channel stage with a diode-connected load of equal size (ngspice: peak |gain| < 1)', () => {
    const ref = dcSweep(
      [...MODEL_LINES, 'vdd vdd 0 2.5', 'vin in 0 0', 'ml vdd vdd out 0 nm w=1u l=0.25u', 'md out in 0 0 nm w=1u l=0.25u'].join('\n'),
      { source: 'vin', start: 0, stop: 2.5, step: 0.001 },
      ['v(out)'],
    );
    const refPoints = curvePoints(ref.x, ref.y[0]);
    expect(Math.abs(refPoints.maxGain)).toBeLessThan(1);

    const findings = run(rule, diodeLoaded(), levelOneDeck);
    expect(findings).toHaveLength(1);
    const f = findings[0];
    expect(f.ruleId).toBe('stage.non-regenerative');
    expect(f.measured!.value).toBeLessThan(1);
    expect(f.limit).toEqual({ value: 1, unit: 'V/V' });
    // The gain at VM matches the ngspice curve's slope there to 5 %, and VM to 20 mV.
    const plot = transferPlotSchema.parse(f.plot);
    expect(Math.abs(plot.vm - refPoints.vm)).toBeLessThan(0.02);
    const i = ref.x.findIndex((x) => x >= refPoints.vm);
    const refSlope = (ref.y[0][i + 1] - ref.y[0][i - 1]) / (ref.x[i + 1] - ref.x[i - 1]);
    expect(Math.abs(plot.gainAtVm - refSlope)).toBeLessThan(0.05 * Math.abs(refSlope));
    // Anchored at the stage's first device line (ML, line 2), with local names.
    expect(f.line).toBe(2);
    expect(f.nets).toEqual(['out', 'in']);
    expect(f.devices).toEqual(['ML', 'MD']);
    expect(f.message).toContain('.model nm');
  });

  it('does not raise on a CMOS inverter or a NAND2 (|gain| at VM well above one)', () => {
    expect(run(rule, inverter(), levelOneDeck)).toEqual([]);
    expect(run(rule, nand2(), levelOneDeck)).toEqual([]);
  });

  it('does not judge dynamic or pass stages, only their static neighbours', () => {
    expect(run(rule, dominoWithPassGate(), levelOneDeck)).toEqual([]);
  });

  it('honours the threshold parameter: at 100 V/V the inverter (ngspice peak |gain| ≈ 34) fails', () => {
    const ref = dcSweep(
      [...MODEL_LINES, 'vdd vdd 0 2.5', 'vin in 0 0', 'mn out in 0 0 nm w=1u l=0.25u', 'mp out in vdd vdd pm w=3u l=0.25u'].join('\n'),
      { source: 'vin', start: 0, stop: 2.5, step: 0.0005 },
      ['v(out)'],
    );
    expect(Math.abs(curvePoints(ref.x, ref.y[0]).maxGain)).toBeLessThan(100);
    const f = run(rule, inverter(), levelOneDeck, { minGain: 100 });
    expect(f).toHaveLength(1);
    expect(f[0].limit!.value).toBe(100);
  });

  it('evaluates every corner and reports the weakest one', () => {
    const deck = defaultDeck();
    const all = run(rule, diodeLoaded(), deck, {}, []);
    expect(all).toHaveLength(1);
    const perCorner = deck.corners.map((c) => ({ name: c.name, f: run(rule, diodeLoaded(), { ...deck, corners: [c] }, {}, [])[0] }));
    const weakest = perCorner.reduce((w, x) => (x.f.measured!.value < w.f.measured!.value ? x : w));
    expect(all[0].corner).toBe(weakest.name);
    expect(all[0].measured!.value).toBe(weakest.f.measured!.value);
  });
});
