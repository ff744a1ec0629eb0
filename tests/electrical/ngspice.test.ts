// The stage solver against an external reference: ngspice (Debian package), level-1
// MOS models with the same VTO, KP, LAMBDA, GAMMA and PHI, DC sweep in batch mode.
// The netlist's .model cards reach Keepwell's solver the way a designer's would.
// Agreement required: 20 mV on VM, VIL, VIH and 5 % on the peak gain (the brief's tolerances).

import { afterAll, describe, expect, it } from 'vitest';
import { CellBuilder, mosCard } from '../support/cell-builder';
import { curvePoints, dcSweep } from '../support/ngspice';
import { analyseCell, corner, deckWith, sweptResult } from './helpers';

const MODELS = [
  '.model nm nmos level=1 vto=0.43 kp=115e-6 lambda=0.06 gamma=0.4 phi=0.6',
  // SPICE convention: a p-channel enhancement device has a negative VTO.
  '.model pm pmos level=1 vto=-0.4 kp=30e-6 lambda=0.1 gamma=0.4 phi=0.6',
];
const CARDS = [
  mosCard('nm', 'nmos', { vto: 0.43, kp: 115e-6, lambda: 0.06, gamma: 0.4, phi: 0.6 }),
  mosCard('pm', 'pmos', { vto: -0.4, kp: 30e-6, lambda: 0.1, gamma: 0.4, phi: 0.6 }),
];
// The deck corner's device values deliberately differ from the cards: only the cards may be used.
const deck = deckWith([corner({ nmos: { ...corner().nmos, vt0: 0.7, kPrime: 50e-6 }, pmos: { ...corner().pmos, vt0: 0.7 } })]);
const VDD = 2.5;

function reference(body: string) {
  const sweep = dcSweep([...MODELS, `vdd vdd 0 ${VDD}`, 'vin in 0 0', body].join('\n'), { source: 'vin', start: 0, stop: VDD, step: 0.0005 }, [
    'v(out)',
  ]);
  return curvePoints(sweep.x, sweep.y[0]);
}

/** Differences against ngspice per case, printed at the end for the record. */
const agreement: string[] = [];
afterAll(() => {
  if (agreement.length) console.log(['case | ΔVM | ΔVIL | ΔVIH | Δ peak gain', ...agreement].join('\n'));
});
const mV = (a: number | null | undefined, b: number | null | undefined) => (a == null || b == null ? '–' : `${(Math.abs(a - b) * 1000).toFixed(3)} mV`);

function expectAgreement(ours: ReturnType<typeof sweptResult>['result'], ref: ReturnType<typeof reference>) {
  agreement.push(
    `${expect.getState().currentTestName ?? '?'} | ${mV(ours.vm, ref.vm)} | ${mV(ours.vil, ref.vil)} | ${mV(ours.vih, ref.vih)} | ${((Math.abs(ours.maxGain - ref.maxGain) / Math.abs(ref.maxGain)) * 100).toFixed(2)} % (ours ${ours.maxGain.toFixed(3)}, ngspice ${ref.maxGain.toFixed(3)})`,
  );
  expect(Math.abs(ours.vm - ref.vm)).toBeLessThan(0.02);
  if (ref.vil === null) expect(ours.vil).toBeNull();
  else expect(Math.abs(ours.vil! - ref.vil)).toBeLessThan(0.02);
  if (ref.vih === null) expect(ours.vih).toBeNull();
  else expect(Math.abs(ours.vih! - ref.vih)).toBeLessThan(0.02);
  expect(Math.abs(ours.maxGain - ref.maxGain)).toBeLessThan(0.05 * Math.abs(ref.maxGain));
  expect(Math.abs(ours.voh - ref.voh)).toBeLessThan(0.02);
  expect(Math.abs(ours.vol - ref.vol)).toBeLessThan(0.02);
}

describe('stage transfer curves against ngspice', () => {
  it('CMOS inverter', () => {
    const cell = new CellBuilder('inv', ['in', 'out', 'vdd', 'vss'])
      .nmos('M1', 'out', 'in', 'vss', 'vss', { w: 1e-6, l: 0.25e-6, model: 'nm' })
      .pmos('M2', 'out', 'in', 'vdd', 'vdd', { w: 3e-6, l: 0.25e-6, model: 'pm' })
      .build();
    const ours = sweptResult(analyseCell(cell, deck, CARDS), 'out', 'in').result;
    const ref = reference(['m1 out in 0 0 nm w=1u l=0.25u', 'm2 out in vdd vdd pm w=3u l=0.25u'].join('\n'));
    expectAgreement(ours, ref);
    expect(ours.inverting).toBe(true);
  });

  // Input a drives the device next to the output, b the one next to ground (body effect on the upper device).
  for (const [swept, held] of [
    ['a', 'b'],
    ['b', 'a'],
  ] as const) {
    it(`two-input NAND, input ${swept} swept, ${held} held high`, () => {
      const cell = new CellBuilder('nand2', ['a', 'b', 'out', 'vdd', 'vss'])
        .pmos('MP1', 'out', 'a', 'vdd', 'vdd', { w: 2e-6, l: 0.25e-6, model: 'pm' })
        .pmos('MP2', 'out', 'b', 'vdd', 'vdd', { w: 2e-6, l: 0.25e-6, model: 'pm' })
        .nmos('MN1', 'out', 'a', 'mid', 'vss', { w: 2e-6, l: 0.25e-6, model: 'nm' })
        .nmos('MN2', 'mid', 'b', 'vss', 'vss', { w: 2e-6, l: 0.25e-6, model: 'nm' })
        .build();
      const analysed = analyseCell(cell, deck, CARDS);
      const stage = analysed.driving('out');
      expect(stage.stage.kind).toBe('complementary');
      const result = sweptResult(analysed, 'out', swept);
      expect(result.held).toEqual([{ net: cell.netIndex.get(held), high: true }]);
      const gate = (x: string) => (x === swept ? 'in' : 'vdd');
      const ref = reference(
        [
          `mp1 out ${gate('a')} vdd vdd pm w=2u l=0.25u`,
          `mp2 out ${gate('b')} vdd vdd pm w=2u l=0.25u`,
          `mn1 out ${gate('a')} mid 0 nm w=2u l=0.25u`,
          `mn2 mid ${gate('b')} 0 0 nm w=2u l=0.25u`,
        ].join('\n'),
      );
      expectAgreement(result.result, ref);
    });
  }

  it('n-channel driver with a diode-connected n-channel load of equal size: gain magnitude below one', () => {
    const cell = new CellBuilder('dload', ['in', 'out', 'vdd', 'vss'])
      .nmos('ML', 'vdd', 'vdd', 'out', 'vss', { w: 1e-6, l: 0.25e-6, model: 'nm' })
      .nmos('MD', 'out', 'in', 'vss', 'vss', { w: 1e-6, l: 0.25e-6, model: 'nm' })
      .build();
    const analysed = analyseCell(cell, deck, CARDS);
    expect(analysed.driving('out').stage.kind).toBe('ratioed');
    const ours = sweptResult(analysed, 'out', 'in').result;
    const ref = reference(['ml vdd vdd out 0 nm w=1u l=0.25u', 'md out in 0 0 nm w=1u l=0.25u'].join('\n'));
    expect(Math.abs(ref.maxGain)).toBeLessThan(1);
    expectAgreement(ours, ref);
    expect(Math.abs(ours.gainAtVm)).toBeLessThan(1);
    expect(ours.vil).toBeNull();
    expect(ours.nmh).toBeNull();
  });
});

describe('a non-inverting stage against ngspice', () => {
  it('n-channel source follower with a resistive load: positive gain, mid-swing threshold, no unity-gain points', () => {
    const cell = new CellBuilder('follow', ['in', 'out', 'vdd', 'vss'])
      .nmos('MF', 'vdd', 'in', 'out', 'vss', { w: 4e-6, l: 0.25e-6, model: 'nm' })
      .res('RL', 'out', 'vss', 20e3)
      .build();
    const analysed = analyseCell(cell, deck, CARDS);
    expect(analysed.driving('out').stage.kind).toBe('ratioed');
    const ours = sweptResult(analysed, 'out', 'in').result;
    const sweep = dcSweep([...MODELS, `vdd vdd 0 ${VDD}`, 'vin in 0 0', 'mf vdd in out 0 nm w=4u l=0.25u', 'rl out 0 20k'].join('\n'), { source: 'vin', start: 0, stop: VDD, step: 0.0005 }, ['v(out)']);
    const ref = curvePoints(sweep.x, sweep.y[0]);
    // A follower's output stays a threshold (raised by body effect) below its input: the curve never meets Vout = Vin.
    expect(Number.isNaN(ref.vm)).toBe(true);
    expect(ours.inverting).toBe(false);
    expect(ours.vmDefinition).toBe('mid-swing');
    expect(ours.gainAtVm).toBeGreaterThan(0);
    expect(ours.gainAtVm).toBeLessThan(1);
    expect(ours.vil).toBeNull();
    // The ngspice curve at the same input: output level within 20 mV, slope within 5 %.
    const i = sweep.x.findIndex((x) => x >= ours.vm);
    expect(Math.abs(sweep.y[0][i] - (0.5 * (ours.voh + ours.vol)))).toBeLessThan(0.02);
    const refSlope = (sweep.y[0][i + 1] - sweep.y[0][i - 1]) / (sweep.x[i + 1] - sweep.x[i - 1]);
    expect(Math.abs(ours.gainAtVm - refSlope)).toBeLessThan(0.05 * refSlope);
    expect(Math.abs(ours.maxGain - ref.maxGain)).toBeLessThan(0.05 * ref.maxGain);
    expect(Math.abs(ours.voh - ref.voh)).toBeLessThan(0.02);
  });
});
