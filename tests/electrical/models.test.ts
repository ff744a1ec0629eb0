// Device equations and the stage solver against closed-form textbook results.

import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { channelCurrent, channelCurrentAt, channelCurrentSlopesAt, forwardCurrent, thresholdVoltage, type MosModel } from '../../rules/electrical/mos';
import { analyseTransfer, type StageCircuit } from '../../rules/electrical/transfer';
import { resolveModel } from '../../rules/electrical/parameters';
import { mosCard } from '../support/cell-builder';
import { corner } from './helpers';

const n: MosModel = { polarity: 'n', kind: 'square-law', vt0: 0.43, kPrime: 115e-6, lambda: 0, gamma: 0.4, phi2F: 0.6, vdsat: 0.63 };
const p: MosModel = { ...n, polarity: 'p', vt0: 0.4, kPrime: 30e-6 };

function inverter(nm: MosModel, pm: MosModel, betaN: number, betaP: number, vdd: number): StageCircuit {
  return {
    vdd,
    nodeCount: 4,
    elements: [
      { kind: 'mos', model: pm, beta: betaP, gate: 3, bulk: 1 },
      { kind: 'mos', model: nm, beta: betaN, gate: 3, bulk: 0 },
    ],
    pullUp: { kind: 'leaf', element: 0, a: 2, b: 1 },
    pullDown: { kind: 'leaf', element: 1, a: 2, b: 0 },
  };
}

describe('square law (Shichman–Hodges)', () => {
  it('saturation current k′/2·(W/L)·VGT²·(1 + λVDS) and linear current k′(W/L)(VGT·VDS − VDS²/2)(1 + λVDS)', () => {
    const m = { ...n, lambda: 0.06, gamma: 0 };
    const beta = 115e-6 * 4;
    // Textbook forms, evaluated by hand: VGS = 1.5, VT = 0.43, VGT = 1.07.
    expect(forwardCurrent(m, beta, 1.5, 2, 0)).toBeCloseTo((beta / 2) * 1.07 ** 2 * (1 + 0.06 * 2), 15);
    expect(forwardCurrent(m, beta, 1.5, 0.5, 0)).toBeCloseTo(beta * (1.07 * 0.5 - 0.125) * (1 + 0.06 * 0.5), 15);
    expect(forwardCurrent(m, beta, 0.3, 1, 0)).toBe(0);
  });

  it('is continuous at the linear/saturation boundary VDS = VGT', () => {
    fc.assert(
      fc.property(fc.double({ min: 0.5, max: 3, noNaN: true }), fc.double({ min: 0, max: 0.5, noNaN: true }), (vgs, lambda) => {
        const m = { ...n, lambda, gamma: 0 };
        const vgt = vgs - m.vt0;
        const below = forwardCurrent(m, 1e-3, vgs, vgt * (1 - 1e-9), 0);
        const above = forwardCurrent(m, 1e-3, vgs, vgt * (1 + 1e-9), 0);
        // A jump would be of the order of the current itself; a continuous curve moves by ~λ·VGT·2e-9 relative.
        return Math.abs(below - above) <= 1e-7 * Math.abs(above) + 1e-18;
      }),
    );
  });

  it('body effect VT = VT0 + γ(√(2φF + VSB) − √(2φF))', () => {
    // Worked by hand: VT0 0.43 V, γ 0.4 √V, 2φF 0.6 V, VSB 2.5 V → 0.43 + 0.4·(1.7607 − 0.7746) = 0.8244 V.
    expect(thresholdVoltage(n, 2.5)).toBeCloseTo(0.8244, 4);
    expect(thresholdVoltage(n, 0)).toBe(0.43);
  });

  it('is symmetric in source and drain, and p-channel is the mirror of n-channel', () => {
    const m = { ...n, lambda: 0.1 };
    fc.assert(
      fc.property(fc.double({ min: -1, max: 3, noNaN: true }), fc.double({ min: -1, max: 3, noNaN: true }), fc.double({ min: 0, max: 3, noNaN: true }), (va, vb, vg) => {
        const ab = channelCurrent(m, 1e-3, va, vb, vg, 0);
        const ba = channelCurrent(m, 1e-3, vb, va, vg, 0);
        const mirror = channelCurrent({ ...m, polarity: 'p' }, 1e-3, -va, -vb, -vg, 0);
        return Math.abs(ab + ba) <= 1e-15 && Math.abs(ab + mirror) <= 1e-15;
      }),
    );
  });
});

describe('unified velocity-saturated model', () => {
  it('reduces to the square law when VDSAT is large (Rabaey et al., unified model, Vmin = min(VGT, VDS, VDSAT))', () => {
    const sq = { ...n, lambda: 0.06 };
    const vs = { ...sq, kind: 'velocity-saturated' as const, vdsat: 100 };
    for (const [vgs, vds, vsb] of [
      [1.5, 2, 0],
      [2.5, 0.3, 0.5],
      [0.9, 1.2, 1],
    ]) {
      expect(forwardCurrent(vs, 1e-4, vgs, vds, vsb)).toBe(forwardCurrent(sq, 1e-4, vgs, vds, vsb));
    }
    const a = analyseTransfer(inverter(sq, { ...p, lambda: 0.1 }, 4.6e-4, 3.6e-4, 2.5));
    const b = analyseTransfer(inverter(vs, { ...p, lambda: 0.1, kind: 'velocity-saturated', vdsat: 100 }, 4.6e-4, 3.6e-4, 2.5));
    expect(Math.abs(a.vm - b.vm)).toBeLessThan(1e-9);
  });

  it('saturates at VDSAT: ID = k′(W/L)(VGT·VDSAT − VDSAT²/2)(1 + λVDS) for VDS, VGT > VDSAT', () => {
    const vs = { ...n, kind: 'velocity-saturated' as const, lambda: 0.06, gamma: 0 };
    // Rabaey et al. 0.25 µm NMOS: VDSAT 0.63 V; VGS = 2.5, VDS = 2.5 → VGT 2.07.
    expect(forwardCurrent(vs, 1e-4, 2.5, 2.5, 0)).toBeCloseTo(1e-4 * (2.07 * 0.63 - 0.63 ** 2 / 2) * (1 + 0.06 * 2.5), 15);
  });
});

describe('inverter switching threshold, λ = 0', () => {
  // Standard textbook result for the long-channel CMOS inverter with both devices saturated at VM:
  // VM = (VTn + r(VDD − |VTp|)) / (1 + r), r = √(kp/kn), kp and kn including W/L.
  it('matches VM = (VTn + r(VDD − |VTp|))/(1 + r) within 1 mV for many sizings', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 1e-5, max: 2e-3, noNaN: true }),
        fc.double({ min: 1e-5, max: 2e-3, noNaN: true }),
        fc.double({ min: 1.2, max: 3.3, noNaN: true }),
        (kn, kp, vdd) => {
          const r = analyseTransfer(inverter(n, p, kn, kp, vdd), { gridIntervals: 16 });
          const ratio = Math.sqrt(kp / kn);
          const expected = (n.vt0 + ratio * (vdd - p.vt0)) / (1 + ratio);
          return Math.abs(r.vm - expected) < 1e-3;
        },
      ),
      { numRuns: 40 },
    );
  });

  it('a symmetric inverter switches at VDD/2 (kn = kp, VTn = |VTp|)', () => {
    const r = analyseTransfer(inverter(n, { ...p, vt0: 0.43 }, 1e-4, 1e-4, 2.5));
    expect(r.vm).toBeCloseTo(1.25, 6);
    // Symmetric curve: VIL + VIH = VDD and NMH = NML (mirror symmetry of the textbook curve).
    expect(r.vil! + r.vih!).toBeCloseTo(2.5, 4);
    expect(r.nmh!).toBeCloseTo(r.nml!, 4);
  });

  it('VIL for the symmetric square-law inverter: VIL = (3VDD + 2VT)/8 (textbook closed form for kn = kp, λ = 0)', () => {
    const r = analyseTransfer(inverter(n, { ...p, vt0: 0.43 }, 1e-4, 1e-4, 2.5));
    expect(Math.abs(r.vil! - (3 * 2.5 + 2 * 0.43) / 8)).toBeLessThan(1e-3);
  });
});

describe('parameter sources', () => {
  it('takes VTO, KP, LAMBDA, GAMMA, PHI from a level-1 card and the rest from the corner; a p-channel VTO is negative in SPICE', () => {
    const models = new Map([['pm', mosCard('pm', 'pmos', { vto: -0.55, kp: 40e-6 })]]);
    const r = resolveModel('p', 'PM', corner(), models, true);
    expect(r.model.vt0).toBe(0.55);
    expect(r.model.kPrime).toBe(40e-6);
    expect(r.sources.vt0).toEqual({ from: 'model-card', name: 'pm' });
    expect(r.sources.lambda).toEqual({ from: 'corner', name: 'c0' });
    const off = resolveModel('p', 'pm', corner(), models, false);
    expect(off.model.vt0).toBe(corner().pmos.vt0);
    expect(off.sources.vt0.from).toBe('corner');
  });
});

describe('stack solutions', () => {
  it('Newton on a stack with a parallel group agrees with bisection on the same device equations', async () => {
    const { NetworkEvaluator } = await import('../../rules/electrical/network');
    const nm = { ...n, lambda: 0.06 };
    const elements = [0, 1, 2].map(() => ({ kind: 'mos' as const, model: nm, beta: 2e-4, gate: 1, bulk: 0 }));
    // Node 0 ground, 1 supply (gates), 2 top, 3 middle. A parallel pair in series with one device.
    const par = { kind: 'parallel' as const, a: 2, b: 3, children: [{ kind: 'leaf' as const, element: 0, a: 2, b: 3 }, { kind: 'leaf' as const, element: 1, a: 2, b: 3 }] };
    const stack = { kind: 'series' as const, a: 2, b: 0, nodes: [3], children: [par, { kind: 'leaf' as const, element: 2, a: 3, b: 0 }] };
    const v = new Float64Array([0, 2.5, 1.7, 0]);
    const newton = new NetworkEvaluator(elements, v).current(stack);
    // Reference: the middle node by bisection on the current balance (same device equations).
    let lo = 0;
    let hi = 1.7;
    for (let i = 0; i < 200; i++) {
      const x = 0.5 * (lo + hi);
      const top = 2 * channelCurrent(nm, 2e-4, 1.7, x, 2.5, 0);
      const bottom = channelCurrent(nm, 2e-4, x, 0, 2.5, 0);
      if (top > bottom) lo = x;
      else hi = x;
    }
    expect(newton / channelCurrent(nm, 2e-4, lo, 0, 2.5, 0)).toBeCloseTo(1, 9);
  });
});

describe('long stacks', () => {
  it('a series chain of 100 resistors carries V / ΣR (Ohm’s law), and a two-element chain solved after it still does', async () => {
    const { NetworkEvaluator } = await import('../../rules/electrical/network');
    // Ohm's law for resistors in series: I = V / (R1 + … + Rn). The chain is longer than the solver's first work arrays.
    const count = 100;
    const resistances = Array.from({ length: count }, (_, i) => 1e3 * (1 + (i % 7)));
    const elements = resistances.map((r) => ({ kind: 'res' as const, conductance: 1 / r }));
    // Node 0 ground, 1 the top end, 2 … count internal.
    const node = (i: number) => (i === 0 ? 1 : i === count ? 0 : i + 1);
    const chain = {
      kind: 'series' as const,
      a: 1,
      b: 0,
      nodes: Array.from({ length: count - 1 }, (_, i) => i + 2),
      children: resistances.map((_, i) => ({ kind: 'leaf' as const, element: i, a: node(i), b: node(i + 1) })),
    };
    const v = new Float64Array(count + 1);
    v[1] = 2.5;
    const total = resistances.reduce((x, y) => x + y, 0);
    expect(new NetworkEvaluator(elements, v).current(chain) / (2.5 / total)).toBeCloseTo(1, 9);
    const short = { kind: 'series' as const, a: 1, b: 0, nodes: [2], children: [{ kind: 'leaf' as const, element: 0, a: 1, b: 2 }, { kind: 'leaf' as const, element: 1, a: 2, b: 0 }] };
    const w = new Float64Array([0, 1.2, 0]);
    expect(new NetworkEvaluator(elements, w).current(short) / (1.2 / (resistances[0] + resistances[1]))).toBeCloseTo(1, 9);
  });
});

describe('currents read by node index (the network solver’s unboxed path)', () => {
  // Independent forms: the Shichman–Hodges `forwardCurrent` with the source end picked by hand (the lower terminal for
  // n-channel, the higher for p-channel, whose voltages are mirrored), and the analytic slopes against central
  // finite differences of the current itself.
  const volts = fc.double({ min: -0.5, max: 3.5, noNaN: true });
  const device = fc.record({ pChannel: fc.boolean(), saturated: fc.boolean(), gamma: fc.double({ min: 0, max: 0.8, noNaN: true }) });
  const modelOf = (d: { pChannel: boolean; saturated: boolean; gamma: number }): MosModel => ({ ...(d.pChannel ? p : n), gamma: d.gamma, lambda: 0.07, kind: d.saturated ? 'velocity-saturated' : 'square-law' });

  /** The n-equivalent source-end voltages, and the sign that turns a source-to-drain magnitude into the current from a to b. */
  function sourceEnd(pChannel: boolean, va: number, vb: number, vg: number, vbulk: number) {
    const mirror = pChannel ? -1 : 1;
    const [xa, xb] = [mirror * va, mirror * vb];
    const sourceIsB = xa >= xb;
    const vs = sourceIsB ? xb : xa;
    return { vgs: mirror * vg - vs, vds: Math.abs(xa - xb), vsb: vs - mirror * vbulk, sign: sourceIsB ? mirror : -mirror };
  }

  it('channelCurrentAt is forwardCurrent of the source end, with the sign of the current from a to b', () => {
    fc.assert(
      fc.property(volts, volts, volts, volts, device, (va, vb, vg, vbulk, d) => {
        const m = modelOf(d);
        const end = sourceEnd(d.pChannel, va, vb, vg, vbulk);
        const want = end.sign * forwardCurrent(m, 2e-4, end.vgs, end.vds, end.vsb);
        const got = channelCurrentAt(m, 2e-4, new Float64Array([va, vb, vg, vbulk]), 0, 1, 2, 3);
        return Math.abs(got - want) <= 1e-12 * Math.max(1e-9, Math.abs(want));
      }),
      { numRuns: 2000 },
    );
  });

  it('channelCurrentSlopesAt gives the current and its derivatives in Va and Vb, as central differences measure them', () => {
    const h = 1e-6;
    fc.assert(
      fc.property(volts, volts, volts, volts, device, (va, vb, vg, vbulk, d) => {
        const m = modelOf(d);
        const current = (x: number, y: number) => channelCurrentAt(m, 2e-4, new Float64Array([x, y, vg, vbulk]), 0, 1, 2, 3);
        // The model has kinks (threshold, saturation edge, source/drain swap, the body-effect clamp) where a one-sided
        // slope is right and a central difference is not: sample away from them.
        const { vgs, vds, vsb } = sourceEnd(d.pChannel, va, vb, vg, vbulk);
        const vgt = vgs - thresholdVoltage(m, vsb);
        const near = (x: number, y: number) => Math.abs(x - y) < 1e-3;
        fc.pre(!(near(vgt, 0) || near(vds, vgt) || near(vds, 0) || near(m.phi2F + vsb, 0) || (d.saturated && (near(vds, m.vdsat) || near(vgt, m.vdsat)))));
        const out = new Float64Array(3);
        channelCurrentSlopesAt(m, 2e-4, new Float64Array([va, vb, vg, vbulk]), 0, 1, 2, 3, out);
        const dA = (current(va + h, vb) - current(va - h, vb)) / (2 * h);
        const dB = (current(va, vb + h) - current(va, vb - h)) / (2 * h);
        const close = (x: number, y: number) => Math.abs(x - y) <= 1e-6 * Math.max(1e-6, Math.abs(y));
        return out[0] === current(va, vb) && close(out[1], dA) && close(out[2], dB);
      }),
      { numRuns: 2000 },
    );
  });
});
