// stage.noise-margin: NMH = VOH − VIH and NML = VIL − VOL (textbook definitions) below a
// fraction of VDD. Decisions are checked against margins measured on ngspice curves.

import { describe, expect, it } from 'vitest';
import rule from '../../rules/stage/noise-margin';
import { defaultDeck } from '../../rules/default-deck';
import { curvePoints, dcSweep } from '../support/ngspice';
import { MODEL_LINES, diodeLoaded, dominoWithPassGate, inverter, levelOneDeck, nand2, run } from '../electrical/stage-fixtures';

function ngspiceMargins(devices: string[]) {
  const s = dcSweep([...MODEL_LINES, 'vdd vdd 0 2.5', 'vin in 0 0', ...devices].join('\n'), { source: 'vin', start: 0, stop: 2.5, step: 0.0005 }, [
    'v(out)',
  ]);
  const p = curvePoints(s.x, s.y[0]);
  return { nmh: p.voh - p.vih!, nml: p.vil! - p.vol };
}

describe('stage.noise-margin', () => {
  it('raises on a diode-loaded stage with a 3× driver: it regenerates, but VOL sits high and NML is a few % of VDD', () => {
    const ref = ngspiceMargins(['ml vdd vdd out 0 nm w=1u l=0.25u', 'md out in 0 0 nm w=3u l=0.25u']);
    expect(ref.nml).toBeLessThan(0.1 * 2.5);
    const findings = run(rule, diodeLoaded(3e-6, 1e-6), levelOneDeck);
    expect(findings).toHaveLength(1);
    const f = findings[0];
    expect(f.message).toContain('NML');
    expect(Math.abs(f.measured!.value - ref.nml)).toBeLessThan(0.02);
    expect(f.limit).toEqual({ value: 0.25, unit: 'V' });
    expect(f.corner).toBe('c0');
    expect(f.plot!.kind).toBe('transfer');
  });

  it('does not raise on a CMOS inverter or a NAND2 (ngspice: both margins above 10 % of VDD)', () => {
    const ref = ngspiceMargins(['mn out in 0 0 nm w=1u l=0.25u', 'mp out in vdd vdd pm w=3u l=0.25u']);
    expect(Math.min(ref.nmh, ref.nml)).toBeGreaterThan(0.25);
    expect(run(rule, inverter(), levelOneDeck)).toEqual([]);
    expect(run(rule, nand2(), levelOneDeck)).toEqual([]);
  });

  it('leaves stages without unity-gain points to stage.non-regenerative, and skips dynamic and pass stages', () => {
    expect(run(rule, diodeLoaded(), levelOneDeck)).toEqual([]);
    expect(run(rule, dominoWithPassGate(), levelOneDeck)).toEqual([]);
  });

  it('honours the fraction parameter', () => {
    // With the bar at 45 % of VDD the inverter's smaller margin (about 0.9 V of 2.5 V per ngspice) falls short.
    const ref = ngspiceMargins(['mn out in 0 0 nm w=1u l=0.25u', 'mp out in vdd vdd pm w=3u l=0.25u']);
    expect(Math.min(ref.nmh, ref.nml)).toBeLessThan(0.45 * 2.5);
    const f = run(rule, inverter(), levelOneDeck, { minFraction: 0.45 });
    expect(f).toHaveLength(1);
    expect(Math.abs(f[0].measured!.value - Math.min(ref.nmh, ref.nml))).toBeLessThan(0.02);
  });

  it('evaluates every corner and reports the worst', () => {
    const deck = defaultDeck();
    const cell = () => diodeLoaded(2e-6, 1e-6);
    const all = run(rule, cell(), deck, {}, []);
    expect(all).toHaveLength(1);
    const perCorner = deck.corners.map((c) => ({ c, f: run(rule, cell(), { ...deck, corners: [c] }, {}, [])[0] }));
    const worst = perCorner.filter((x) => x.f).reduce((w, x) => (x.f.measured!.value / x.c.vdd < w.f.measured!.value / w.c.vdd ? x : w));
    expect(all[0].corner).toBe(worst.c.name);
  });
});
