// The pictures of a finding, checked against the electrical core and against textbook results:
// points are read back from the drawn SVG through the axis ticks (value ↔ position), never from
// the component's own numbers.

import { render, screen, within } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import { thresholdVoltage, type MosModel } from '../../rules/electrical/mos';
import { analyseTransfer, TransferSolver, type StageCircuit } from '../../rules/electrical/transfer';
import { chainPlot, repeatStage } from '../../rules/electrical/chain';
import { budgetPlotSchema, chainPlotSchema, transferPlotSchema } from '../../shared/findings';
import { BudgetPlot, ChainPlot, TransferPlot } from '../../src/features/plots';

const VDD = 2.5;
const VT = 0.43;
// Square-law devices, λ = 0 and no body effect (sources sit on the rails), as in the textbook inverter.
const nmos: MosModel = { polarity: 'n', kind: 'square-law', vt0: VT, kPrime: 115e-6, lambda: 0, gamma: 0, phi2F: 0.6, vdsat: 1 };
const pmos: MosModel = { ...nmos, polarity: 'p', kPrime: 30e-6 };

function inverter(betaN: number, betaP: number, pm: MosModel = pmos): StageCircuit {
  return {
    vdd: VDD,
    nodeCount: 4,
    elements: [
      { kind: 'mos', model: pm, beta: betaP, gate: 3, bulk: 1 },
      { kind: 'mos', model: nmos, beta: betaN, gate: 3, bulk: 0 },
    ],
    pullUp: { kind: 'leaf', element: 0, a: 2, b: 1 },
    pullDown: { kind: 'leaf', element: 1, a: 2, b: 0 },
  };
}

/**
 * An n-channel stage with a diode-connected n-channel load (gate and drain on VDD). With both in
 * saturation the small-signal gain is −√(β_driver/β_load) (the textbook diode-loaded stage, no body
 * effect): a load four times the driver gives |gain| = 0.5.
 */
function diodeLoaded(): StageCircuit {
  return {
    vdd: VDD,
    nodeCount: 4,
    elements: [
      { kind: 'mos', model: nmos, beta: 4e-4, gate: 1, bulk: 0 },
      { kind: 'mos', model: nmos, beta: 1e-4, gate: 3, bulk: 0 },
    ],
    pullUp: { kind: 'leaf', element: 0, a: 2, b: 1 },
    pullDown: { kind: 'leaf', element: 1, a: 2, b: 0 },
  };
}

function transferPayload(circuit: StageCircuit) {
  const r = analyseTransfer(circuit);
  return transferPlotSchema.parse({ kind: 'transfer', vdd: r.vdd, vin: r.vin, vout: r.vout, vm: r.vm, gainAtVm: r.gainAtVm, vil: r.vil, vih: r.vih, voh: r.voh, vol: r.vol });
}

/** The value ↔ position map of one axis, recovered from its two outermost drawn ticks. */
function axisMap(svg: SVGElement, axis: 'x' | 'y') {
  const ticks = [...svg.querySelectorAll(`[data-axis="${axis}"] [data-tick]`)].map((t) => ({
    value: Number(t.getAttribute('data-tick')),
    position: Number(t.querySelector('line')!.getAttribute(axis === 'x' ? 'x1' : 'y1')),
  }));
  expect(ticks.length).toBeGreaterThanOrEqual(2);
  const a = ticks[0];
  const b = ticks[ticks.length - 1];
  return (position: number) => a.value + ((position - a.position) * (b.value - a.value)) / (b.position - a.position);
}

function translation(element: Element): [number, number] {
  const m = /translate\(([-\d.]+)[ ,]+([-\d.]+)\)/.exec(element.getAttribute('transform') ?? '');
  if (!m) throw new Error('element has no translate()');
  return [Number(m[1]), Number(m[2])];
}

/** A marker's position in volts, read off the drawn axes. */
function markerVolts(svg: SVGElement, selector: string): [number, number] {
  const marker = svg.querySelector(selector);
  expect(marker, selector).not.toBeNull();
  const [px, py] = translation(marker!);
  return [axisMap(svg, 'x')(px), axisMap(svg, 'y')(py)];
}

describe('transfer curve plot', () => {
  // Symmetric square-law inverter: kn = kp (β = 1e-4 A/V² each), VTn = |VTp|, λ = 0.
  // Textbook closed forms for this case (Sedra & Smith, Microelectronic Circuits, the matched CMOS inverter; recalled from memory,
  // and the same forms tests/electrical/models.test.ts checks the solver against):
  //   VM = VDD/2,  VIL = (3·VDD + 2·VT)/8,  VIH = (5·VDD − 2·VT)/8.
  const circuit = inverter(1e-4, 1e-4);
  const plot = transferPayload(circuit);
  const solver = new TransferSolver(circuit);

  it('puts VM, VIL and VIH where the textbook puts them, read back through the axis ticks', () => {
    render(<TransferPlot plot={plot} />);
    const svg = screen.getByRole('img', { name: /Transfer curve over/ }) as unknown as SVGElement;

    const [vmX, vmY] = markerVolts(svg, '[data-marker="vm"]');
    expect(Math.abs(vmX - VDD / 2)).toBeLessThan(0.005);
    expect(Math.abs(vmY - VDD / 2)).toBeLessThan(0.005); // on the diagonal Vout = Vin

    const [vilX, vilY] = markerVolts(svg, '[data-marker="vil"]');
    expect(Math.abs(vilX - (3 * VDD + 2 * VT) / 8)).toBeLessThan(0.005);
    // On the curve: the solver's own output at that input (not the plot's interpolation).
    expect(Math.abs(vilY - solver.vout(vilX))).toBeLessThan(0.01);

    const [vihX, vihY] = markerVolts(svg, '[data-marker="vih"]');
    expect(Math.abs(vihX - (5 * VDD - 2 * VT) / 8)).toBeLessThan(0.005);
    expect(Math.abs(vihY - solver.vout(vihX))).toBeLessThan(0.01);

    // Each unity-gain point carries a tangent of slope −1 (an inverting stage), in volts per volt.
    for (const key of ['vil', 'vih']) {
      const t = svg.querySelector(`[data-tangent="${key}"]`)!;
      const x = axisMap(svg, 'x');
      const y = axisMap(svg, 'y');
      const slope = (y(Number(t.getAttribute('y2'))) - y(Number(t.getAttribute('y1')))) / (x(Number(t.getAttribute('x2'))) - x(Number(t.getAttribute('x1'))));
      expect(slope).toBeCloseTo(-1, 6);
    }
  });

  it('labels the points with their values and the axes with units', () => {
    render(<TransferPlot plot={plot} />);
    const svg = screen.getByRole('img', { name: /Transfer curve over/ });
    expect(within(svg).getByText('VM 1.25 V')).toBeInTheDocument();
    expect(within(svg).getByText(`VIL ${Number(((3 * VDD + 2 * VT) / 8).toPrecision(3))} V`)).toBeInTheDocument();
    expect(within(svg).getByText('Vin (V)')).toBeInTheDocument();
    expect(within(svg).getByText('Vout (V)')).toBeInTheDocument();
  });

  it('for an unequal inverter, VM sits at (VTn + r(VDD − |VTp|))/(1 + r), r = √(kp/kn)', () => {
    // Long-channel inverter with both devices saturated at VM (Rabaey et al., Digital Integrated Circuits, §5.3).
    const betaN = 4.6e-4;
    const betaP = 1.2e-4;
    const skewed = transferPayload(inverter(betaN, betaP));
    render(<TransferPlot plot={skewed} />);
    const svg = screen.getByRole('img', { name: /Transfer curve over/ }) as unknown as SVGElement;
    const r = Math.sqrt(betaP / betaN);
    const [vmX] = markerVolts(svg, '[data-marker="vm"]');
    expect(Math.abs(vmX - (VT + r * (VDD - VT)) / (1 + r))).toBeLessThan(0.005);
  });

  it('a stage with |gain| < 1 has no unity-gain points and says it does not restore levels', () => {
    const weak = transferPayload(diodeLoaded());
    expect(Math.abs(weak.gainAtVm + 0.5)).toBeLessThan(0.01);
    render(<TransferPlot plot={weak} />);
    const svg = screen.getByRole('img', { name: /no unity-gain points/ });
    expect(svg.querySelector('[data-marker="vil"]')).toBeNull();
    expect(screen.getByText(/does not restore a disturbed level/)).toBeInTheDocument();
  });
});

describe('chain staircase plot', () => {
  function chainOf(circuit: StageCircuit, start: number, stages: number) {
    const curve = analyseTransfer(circuit);
    const solver = new TransferSolver(circuit);
    const f = (v: number) => solver.vout(v);
    const chain = repeatStage(f, stages, start, { vdd: VDD, startLogic: 0 });
    return { plot: chainPlotSchema.parse(chainPlot(curve, chain)), f: (v: number) => new TransferSolver(circuit).vout(v) };
  }

  function drawnSteps(svg: SVGElement) {
    const x = axisMap(svg, 'x');
    const y = axisMap(svg, 'y');
    return [...svg.querySelectorAll('[data-step]')].map((g) => {
      const [px, py] = translation(g);
      return { stage: Number(g.getAttribute('data-step')), on: g.getAttribute('data-on'), vin: x(px), vout: y(py) };
    });
  }

  it('draws each stage’s level as a corner on the curve or on its mirror, and the inverter chain restores a disturbed zero', () => {
    // A logic zero disturbed to 0.3·VDD; CMOS inverters (|gain| at VM > 1) bring it back to the rails in a few stages.
    const { plot, f } = chainOf(inverter(1e-4, 1e-4), 0.3 * VDD, 6);
    render(<ChainPlot plot={plot} />);
    const svg = screen.getByRole('img', { name: /Level through the chain/ }) as unknown as SVGElement;
    const steps = drawnSteps(svg);
    expect(steps).toHaveLength(6);
    for (const s of steps) {
      // Curve corners satisfy Vout = f(Vin); mirror corners satisfy Vin = f(Vout), by an independent solve.
      if (s.on === 'curve') expect(Math.abs(s.vout - f(s.vin))).toBeLessThan(0.01);
      else expect(Math.abs(s.vin - f(s.vout))).toBeLessThan(0.01);
      // The stage-k level is on the output axis for odd k and on the input axis for even k.
      const level = s.stage % 2 === 1 ? s.vout : s.vin;
      expect(Math.abs(level - plot.levels[s.stage])).toBeLessThan(0.005);
    }
    const [startX] = markerVolts(svg, '[data-marker="start"]');
    expect(Math.abs(startX - 0.3 * VDD)).toBeLessThan(0.005);
    // Restored: the last level is at a rail.
    const last = plot.levels.at(-1)!;
    expect(Math.min(last, VDD - last)).toBeLessThan(0.05 * VDD);
    expect(plot.restoredAfter).not.toBeNull();
    expect(screen.getByText(new RegExp(`Restored after stage ${plot.restoredAfter} of 6`))).toBeInTheDocument();
    expect(document.querySelector(`[data-level-row="${plot.restoredAfter}"]`)).toHaveTextContent('restored');
  });

  it('a chain of stages with |gain| < 1 closes in on the crossing Vout = Vin and is reported as not restored', () => {
    // The fact of the trade: without gain above one at the threshold, a disturbed level is never restored;
    // it settles at the fixed point where the curve meets Vout = Vin.
    const circuit = diodeLoaded();
    const { plot } = chainOf(circuit, 0.3 * VDD, 24);
    const vm = analyseTransfer(circuit).vm;
    render(<ChainPlot plot={plot} />);
    const svg = screen.getByRole('img', { name: /Not restored after 24 stages/ }) as unknown as SVGElement;
    const steps = drawnSteps(svg);
    const last = steps.at(-1)!;
    expect(Math.abs(last.vin - vm)).toBeLessThan(0.02);
    expect(Math.abs(last.vout - vm)).toBeLessThan(0.02);
  });
});

describe('chain plot of pass devices before a receiver', () => {
  // An n-channel pass device passes a high only up to VDD − VTn, its threshold raised by the body
  // effect at source voltage Vx: Vx = VDD − VT(Vx) (Rabaey et al., Digital Integrated Circuits,
  // pass-transistor logic). A second device in series loses no further threshold, so two pass
  // devices give the same level; the receiving inverter then restores it.
  const body: MosModel = { ...nmos, gamma: 0.4 };
  let passed = VDD - VT;
  for (let i = 0; i < 60; i++) passed = VDD - thresholdVoltage(body, passed);
  const circuit = inverter(1e-4, 1e-4);
  const receiver = new TransferSolver(circuit);
  const curve = analyseTransfer(circuit);
  const out = receiver.vout(passed);
  const plot = chainPlotSchema.parse({ kind: 'chain', vdd: VDD, vin: curve.vin, vout: curve.vout, levels: [VDD, passed, passed, out], restoredAfter: 3, tolerance: 0.05 * VDD });

  it('slides the level along Vout = Vin through the pass devices and through the receiver’s curve at the end', () => {
    // Worked by hand from the body-effect formula for VT0 0.43 V, γ 0.4 √V, 2φF 0.6 V: at Vx = 1.765 V,
    // VT = 0.43 + 0.4·(√2.365 − √0.6) = 0.735 V and VDD − VT = 1.765 V.
    expect(Math.abs(passed - 1.765)).toBeLessThan(0.005);
    render(<ChainPlot plot={plot} />);
    const svg = screen.getByRole('img', { name: /Level through the chain/ }) as unknown as SVGElement;
    expect(svg.querySelector('[data-series="mirror"]')).toBeNull();
    const x = axisMap(svg, 'x');
    const y = axisMap(svg, 'y');
    const steps = [...svg.querySelectorAll('[data-step]')].map((g) => {
      const [px, py] = translation(g);
      return { on: g.getAttribute('data-on'), vin: x(px), vout: y(py) };
    });
    expect(steps.map((s) => s.on)).toEqual(['pass', 'pass', 'curve']);
    for (const s of steps.slice(0, 2)) {
      expect(Math.abs(s.vin - passed)).toBeLessThan(0.005);
      expect(Math.abs(s.vout - passed)).toBeLessThan(0.005);
    }
    // The receiver's corner: input the passed level, output the inverter's own answer for it.
    expect(Math.abs(steps[2].vin - passed)).toBeLessThan(0.005);
    expect(Math.abs(steps[2].vout - new TransferSolver(circuit).vout(passed))).toBeLessThan(0.01);
    expect(screen.getAllByText('an element not plotted')).toHaveLength(2);
    expect(screen.getByText(/Restored after stage 3 of 3/)).toBeInTheDocument();
  });
});

describe('budget bars', () => {
  const plot = budgetPlotSchema.parse({
    kind: 'budget',
    bars: [
      // Charge sharing ΔV = VDD·Cx/(Cx + Cdyn) (Rabaey et al., dynamic logic): 2.5 V · 12 fF / (12 fF + 28 fF) = 0.75 V.
      { label: 'Charge-sharing drop', measured: { value: (2.5 * 12e-15) / (12e-15 + 28e-15), unit: 'V' }, limit: { value: 0.25, unit: 'V' }, sense: 'max' },
      { label: 'Keeper ratio', measured: { value: 0.12, unit: 'ratio' }, limit: { value: 0.05, unit: 'ratio' }, sense: 'min' },
    ],
  });

  it('draws each bar to its measured value and the limit tick where the limit lies, failing bars said in words', () => {
    render(<BudgetPlot plot={plot} />);
    const svg = screen.getByRole('img', { name: /Budget against limits/ });
    const drop = svg.querySelector('[data-bar="Charge-sharing drop"]')!;
    const keeper = svg.querySelector('[data-bar="Keeper ratio"]')!;
    expect(drop.getAttribute('data-failing')).toBe('true');
    expect(keeper.getAttribute('data-failing')).toBe('false');
    // Bar length over limit position is measured/limit on the bar's own linear scale from 0.
    for (const [bar, measured, limit] of [
      [drop, 0.75, 0.25],
      [keeper, 0.12, 0.05],
    ] as const) {
      const rect = bar.querySelector('[data-measured]')!;
      const x0 = Number(rect.getAttribute('x'));
      const width = Number(rect.getAttribute('width'));
      const [limitX] = translation(bar.querySelector('[data-limit]')!);
      expect(width / (limitX - x0)).toBeCloseTo(measured / limit, 3);
    }
    expect(within(svg).getByText('750 mV · over the limit')).toBeInTheDocument();
    expect(within(svg).getByText('limit 250 mV')).toBeInTheDocument();
    expect(within(svg).getByText('0.12 · above the minimum')).toBeInTheDocument();
  });
});
