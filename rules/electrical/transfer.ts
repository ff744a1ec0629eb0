// DC transfer curve of one stage: Vout(Vin) by current balance at the output node.
//
// A stage circuit is compact: node 0 is ground, 1 the supply, 2 the output, 3 the
// swept input; inputs held at a logic level are tied to node 0 or 1; nodes from 4 up
// are internal. The pull-up network joins the output (its end a) to the supply, the
// pull-down network joins the output (a) to ground.
//
// For each input voltage the output is the root of the net current into the output
// node, which falls monotonically as Vout rises (the pull-up carries less, the
// pull-down more), found with Brent's method on [0, VDD]. Slopes come from the
// implicit-function theorem, dVout/dVin = −(∂I/∂Vin)/(∂I/∂Vout), with central
// differences of the balance; so the curve's gain is exact at the switching threshold
// even where λ = 0 makes the curve vertical.
//
// Derived points follow the usual definitions (Rabaey et al., Digital Integrated
// Circuits, 2nd ed., §5.3): VM where Vout = Vin, VIL and VIH where the slope is −1
// (+1 for a non-inverting stage), VOH and VOL the output levels for rail inputs,
// NMH = VOH − VIH, NML = VIL − VOL.

import type { CircuitElement, Network } from './network';
import { NetworkEvaluator } from './network';
import { brent, brentNear, goldenMax } from './roots';

export const GROUND = 0;
export const POWER = 1;
export const OUTPUT = 2;
export const INPUT = 3;
export const FIRST_INTERNAL = 4;

/**
 * SPICE's default minimum conductance (GMIN = 1e-12 S), which SPICE places across every
 * junction. Keepwell places it across each junction on the output node (to the device's
 * bulk), as SPICE does: when every device is cut off it settles the output where SPICE
 * would instead of anywhere on a zero-current plateau, and it keeps the output
 * conductance, and so the gain of an ideal λ = 0 curve, finite.
 */
export const GMIN = 1e-12;

export interface StageCircuit {
  vdd: number;
  nodeCount: number;
  elements: CircuitElement[];
  pullUp: Network;
  pullDown: Network;
}

export interface TransferResult {
  vdd: number;
  /** The sampled curve (finely near the threshold), for plots. */
  vin: number[];
  vout: number[];
  inverting: boolean;
  /** Switching threshold. */
  vm: number;
  /** How `vm` was found: where Vout = Vin, or (a non-inverting stage whose curve never meets Vout = Vin) where the output crosses mid-swing. */
  vmDefinition: 'vout-equals-vin' | 'mid-swing';
  /** dVout/dVin at VM (negative for an inverting stage). */
  gainAtVm: number;
  /** The slope of largest magnitude anywhere on the curve, and where. */
  maxGain: number;
  maxGainAt: number;
  vil: number | null;
  vih: number | null;
  voh: number;
  vol: number;
  nmh: number | null;
  nml: number | null;
}

export interface TransferOptions {
  /** Uniform intervals of the coarse grid that brackets the threshold and the unity-gain points. */
  bracketIntervals?: number;
  /** Uniform intervals of the plotted curve before refinement. */
  gridIntervals?: number;
  /** Refine an interval while its output step exceeds this fraction of VDD. */
  maxStepFraction?: number;
  maxPoints?: number;
}

export class TransferSolver {
  readonly v: Float64Array;
  readonly net: NetworkEvaluator;
  private readonly h: number;
  /** Bulk node of every junction on the output. */
  private readonly outputJunctions: number[] = [];

  constructor(readonly circuit: StageCircuit) {
    this.v = new Float64Array(circuit.nodeCount);
    this.v[POWER] = circuit.vdd;
    this.net = new NetworkEvaluator(circuit.elements, this.v);
    this.h = 1e-5 * Math.max(circuit.vdd, 0.1);
    const visit = (n: Network) => {
      if (n.kind !== 'leaf') return n.children.forEach(visit);
      const e = circuit.elements[n.element];
      if (e.kind !== 'mos') return;
      if (n.a === OUTPUT) this.outputJunctions.push(e.bulk);
      if (n.b === OUTPUT) this.outputJunctions.push(e.bulk);
    };
    visit(circuit.pullUp);
    visit(circuit.pullDown);
  }

  /** Net current into the output node. */
  balance(vin: number, vout: number): number {
    const v = this.v;
    v[INPUT] = vin;
    v[OUTPUT] = vout;
    let leak = 0;
    for (const b of this.outputJunctions) leak += GMIN * (v[b] - vout);
    return leak - this.net.current(this.circuit.pullUp) - this.net.current(this.circuit.pullDown);
  }

  private sweptInput = 0;
  private readonly balanceAtInput = (vout: number) => this.balance(this.sweptInput, vout);

  /** Vout for one input voltage: Brent on the output node, starting next to the previous answer. */
  vout(vin: number): number {
    const vdd = this.circuit.vdd;
    this.sweptInput = vin;
    const guess = this.lastVout >= 0 ? this.lastVout : 0.5 * vdd;
    const x = brentNear(this.balanceAtInput, 0, vdd, guess, 1e-3 * vdd, 1e-12, true);
    this.lastVout = x;
    return x;
  }
  private lastVout = -1;

  /** dVout/dVin at a solved point. */
  slope(vin: number, vout: number): number {
    const h = this.h;
    const dIn = (this.balance(vin + h, vout) - this.balance(vin - h, vout)) / (2 * h);
    const dOut = Math.min((this.balance(vin, vout + h) - this.balance(vin, vout - h)) / (2 * h), -GMIN);
    return -dIn / dOut;
  }

  slopeAt(vin: number): number {
    return this.slope(vin, this.vout(vin));
  }
}

/** Sample the curve on a uniform grid, refined where the output moves fast (the threshold region). */
function sampleCurve(solver: TransferSolver, intervals: number, maxStep: number, maxPoints: number): { vin: number[]; vout: number[] } {
  const vdd = solver.circuit.vdd;
  const minWidth = vdd / 8192;
  const vin: number[] = [];
  const vout: number[] = [];
  for (let i = 0; i <= intervals; i++) {
    const x = (vdd * i) / intervals;
    vin.push(x);
    vout.push(solver.vout(x));
  }
  for (let pass = 0; pass < 12 && vin.length < maxPoints; pass++) {
    let changed = false;
    for (let i = vin.length - 2; i >= 0 && vin.length < maxPoints; i--) {
      if (Math.abs(vout[i + 1] - vout[i]) > maxStep && vin[i + 1] - vin[i] > minWidth) {
        const x = 0.5 * (vin[i] + vin[i + 1]);
        vin.splice(i + 1, 0, x);
        vout.splice(i + 1, 0, solver.vout(x));
        changed = true;
      }
    }
    if (!changed) break;
  }
  return { vin, vout };
}

/**
 * The analysis of one stage circuit. The figures the rules use (VM, gain, VIL, VIH, VOH, VOL,
 * margins) are solved at once from a coarse bracketing grid; the finely sampled curve and the
 * peak gain, which only plots and reports read, are computed the first time they are asked for.
 */
class TransferAnalysis implements TransferResult {
  readonly vdd: number;
  readonly inverting: boolean;
  readonly vm: number;
  readonly vmDefinition: TransferResult['vmDefinition'];
  readonly gainAtVm: number;
  readonly vil: number | null;
  readonly vih: number | null;
  readonly voh: number;
  readonly vol: number;
  readonly nmh: number | null;
  readonly nml: number | null;
  private sampled: { vin: number[]; vout: number[]; maxGain: number; maxGainAt: number } | null = null;

  constructor(
    private readonly circuit: StageCircuit,
    private readonly options: TransferOptions,
  ) {
    const solver = new TransferSolver(circuit);
    const vdd = circuit.vdd;
    this.vdd = vdd;
    // Coarse grid: brackets for the threshold and the unity-gain points.
    const { vin, vout } = sampleCurve(solver, options.bracketIntervals ?? 8, vdd, 0);
    const n = vin.length;
    const exact = new Float64Array(n).fill(NaN);
    const slopeAtPoint = (i: number) => {
      if (Number.isNaN(exact[i])) exact[i] = solver.slope(vin[i], vout[i]);
      return exact[i];
    };
    const secant = (i: number) => (vout[i + 1] - vout[i]) / (vin[i + 1] - vin[i]);
    this.inverting = vout[0] >= vout[n - 1];
    this.voh = Math.max(vout[0], vout[n - 1]);
    this.vol = Math.min(vout[0], vout[n - 1]);

    // Switching threshold: Vout = Vin. The balance with output tied to input has the sign of Vout(V) − V.
    let vm: number | null = null;
    let vmOut = 0;
    let vmDefinition: TransferResult['vmDefinition'] = 'vout-equals-vin';
    let bestGain = -1;
    const railMargin = 1e-3 * vdd;
    for (let i = 0; i < n - 1; i++) {
      const d0 = vout[i] - vin[i];
      const d1 = vout[i + 1] - vin[i + 1];
      if (d0 === 0 || (d0 > 0) !== (d1 > 0)) {
        const x = d0 === 0 ? vin[i] : brent((y) => solver.balance(y, y), vin[i], vin[i + 1], 1e-12);
        // A non-inverting stage that passes a rail (a follower at 0 V) meets Vout = Vin there: not a switching threshold.
        if (x < railMargin || x > vdd - railMargin) continue;
        const g = Math.abs(secant(i));
        if (g > bestGain) {
          bestGain = g;
          vm = x;
          vmOut = x;
        }
      }
    }
    if (vm === null) {
      vmDefinition = 'mid-swing';
      const mid = 0.5 * (this.voh + this.vol);
      let i = 0;
      while (i < n - 2 && (vout[i] - mid > 0) === (vout[i + 1] - mid > 0)) i++;
      vm = brent((x) => solver.vout(x) - mid, vin[i], vin[i + 1], 1e-12);
      vmOut = solver.vout(vm);
    }
    this.vm = vm;
    this.vmDefinition = vmDefinition;
    this.gainAtVm = solver.slope(vm, vmOut);

    // Unity-gain points nearest the threshold on either side: walk out from VM to the first grid point with gain at most one.
    const excess = (x: number) => Math.abs(solver.slopeAt(x)) - 1;
    let vil: number | null = null;
    let vih: number | null = null;
    if (Math.abs(this.gainAtVm) > 1) {
      let below = 0;
      while (below < n - 1 && vin[below + 1] < vm) below++;
      let right = vm;
      for (let j = below; j >= 0; j--) {
        if (vin[j] >= vm) continue;
        if (Math.abs(slopeAtPoint(j)) <= 1) {
          vil = brent(excess, vin[j], right, 1e-7);
          break;
        }
        right = vin[j];
      }
      let left = vm;
      for (let j = below + 1; j < n; j++) {
        if (vin[j] <= vm) continue;
        if (Math.abs(slopeAtPoint(j)) <= 1) {
          vih = brent(excess, left, vin[j], 1e-7);
          break;
        }
        left = vin[j];
      }
    }
    this.vil = vil;
    this.vih = vih;
    this.nmh = vih === null ? null : this.voh - vih;
    this.nml = vil === null ? null : vil - this.vol;
  }

  get vin(): number[] {
    return this.sample().vin;
  }
  get vout(): number[] {
    return this.sample().vout;
  }
  get maxGain(): number {
    return this.sample().maxGain;
  }
  get maxGainAt(): number {
    return this.sample().maxGainAt;
  }

  private sample() {
    if (this.sampled) return this.sampled;
    const solver = new TransferSolver(this.circuit);
    const vdd = this.vdd;
    const { vin, vout } = sampleCurve(
      solver,
      this.options.gridIntervals ?? 24,
      (this.options.maxStepFraction ?? 1 / 24) * vdd,
      this.options.maxPoints ?? 200,
    );
    const n = vin.length;
    // The steepest secant of the fine grid, refined by golden-section search on the exact slope.
    let peak = 0;
    for (let i = 1; i < n - 1; i++) {
      if (Math.abs((vout[i + 1] - vout[i]) / (vin[i + 1] - vin[i])) > Math.abs((vout[peak + 1] - vout[peak]) / (vin[peak + 1] - vin[peak]))) peak = i;
    }
    const lo = vin[Math.max(peak - 1, 0)];
    const hi = vin[Math.min(peak + 2, n - 1)];
    const refined = goldenMax((x) => Math.abs(solver.slopeAt(x)), lo, hi, 1e-4 * vdd);
    let maxGainAt = refined.x;
    let maxGain = solver.slopeAt(refined.x);
    if (Math.abs(this.gainAtVm) > Math.abs(maxGain)) {
      maxGain = this.gainAtVm;
      maxGainAt = this.vm;
    }
    this.sampled = { vin, vout, maxGain, maxGainAt };
    return this.sampled;
  }
}

export function analyseTransfer(circuit: StageCircuit, options: TransferOptions = {}): TransferResult {
  return new TransferAnalysis(circuit, options);
}
