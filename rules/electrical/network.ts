// Series/parallel networks of two-terminal channel elements, and their DC current.
//
// A network joins its ends `a` and `b`. A series network lists its children from a
// to b, with `nodes[i]` the internal node between children i and i+1; a parallel
// network's children all join a and b, written the same way round (each child's a is
// the parent's a). Leaves are MOS channels or resistors. The
// same shape describes a stage's pull-up and pull-down networks over cell nets
// (rules/stages) and a compact circuit's networks over node indices (below).
//
// Current through a series stack is found by solving its internal nodes with
// bracketed root-finding (Brent), never by lumping widths: a two-element stack is one
// solve on its middle node; a longer stack is a solve on the stack current in which
// each node, walked up from the low end, is itself solved so that its element carries
// that current. Every element's current is monotone in its terminal voltages, so each
// bracket holds exactly one root.

import { brentNear } from './roots';
import { channelCurrentAt, channelCurrentSlopesAt, type MosModel } from './mos';

const slopes = new Float64Array(3);

/** Network ends standing for the supply and ground rails in networks over cell nets (whatever rail nets a cell has). */
export const POWER_END = -1;
export const GROUND_END = -2;

export type Network =
  | { kind: 'leaf'; element: number; a: number; b: number }
  | { kind: 'series'; a: number; b: number; children: Network[]; nodes: number[] }
  | { kind: 'parallel'; a: number; b: number; children: Network[] };

export type CircuitElement =
  | { kind: 'mos'; model: MosModel; /** k′·W/L */ beta: number; gate: number; bulk: number }
  | { kind: 'res'; conductance: number };

export function reverseNetwork(n: Network): Network {
  switch (n.kind) {
    case 'leaf':
      return { kind: 'leaf', element: n.element, a: n.b, b: n.a };
    case 'parallel':
      return { kind: 'parallel', a: n.b, b: n.a, children: n.children.map(reverseNetwork) };
    case 'series':
      return {
        kind: 'series',
        a: n.b,
        b: n.a,
        children: n.children.map(reverseNetwork).reverse(),
        nodes: n.nodes.slice().reverse(),
      };
  }
}

/** Elements of a network, left to right. */
export function networkElements(n: Network, out: number[] = []): number[] {
  if (n.kind === 'leaf') out.push(n.element);
  else for (const c of n.children) networkElements(c, out);
  return out;
}

/** Internal nodes of a network (series nodes at every depth). */
export function networkNodes(n: Network, out: number[] = []): number[] {
  if (n.kind === 'series') out.push(...n.nodes);
  if (n.kind !== 'leaf') for (const c of n.children) networkNodes(c, out);
  return out;
}

/** Rewrites every node and element reference of a network. */
export function mapNetwork(n: Network, node: (x: number) => number, element: (e: number) => number = (e) => e): Network {
  switch (n.kind) {
    case 'leaf':
      return { kind: 'leaf', element: element(n.element), a: node(n.a), b: node(n.b) };
    case 'parallel':
      return { kind: 'parallel', a: node(n.a), b: node(n.b), children: n.children.map((c) => mapNetwork(c, node, element)) };
    case 'series':
      return {
        kind: 'series',
        a: node(n.a),
        b: node(n.b),
        children: n.children.map((c) => mapNetwork(c, node, element)),
        nodes: n.nodes.map(node),
      };
  }
}

/** Does the network conduct when `on(element)` says which elements conduct? */
export function conducts(n: Network, on: (element: number) => boolean): boolean {
  switch (n.kind) {
    case 'leaf':
      return on(n.element);
    case 'series':
      return n.children.every((c) => conducts(c, on));
    case 'parallel':
      return n.children.some((c) => conducts(c, on));
  }
}

type Series = Extract<Network, { kind: 'series' }>;

/** A single element, or single elements all in parallel: what the stack Newton solve handles directly. */
function isSimple(n: Network): boolean {
  if (n.kind === 'leaf') return true;
  if (n.kind === 'series') return false;
  for (const c of n.children) if (c.kind !== 'leaf') return false;
  return true;
}

/**
 * Work arrays of the stack Newton solve, shared by every evaluator: a solve never nests another (a stack it solves holds
 * single elements only) and evaluators run one at a time, and a transfer analysis makes two evaluators, so arrays of
 * their own cost more to allocate than the solves they serve.
 */
interface StackWork {
  x: Float64Array;
  cur: Float64Array;
  dA: Float64Array;
  dB: Float64Array;
  diag: Float64Array;
  upper: Float64Array;
  lower: Float64Array;
  rhs: Float64Array;
}

function newStackWork(n: number): StackWork {
  const f = () => new Float64Array(n);
  return { x: f(), cur: f(), dA: f(), dB: f(), diag: f(), upper: f(), lower: f(), rhs: f() };
}

let stackWork = newStackWork(64);

/** Per series network: solver closures made once (making closures on every call is costly), and warm-start state. */
interface SeriesSolver {
  /** Two-element series: balance of the two currents as a function of the middle node. */
  balance: (x: number) => number;
  /** Longer stacks: residual of a trial current, and per element the flow balance at its upper node. */
  residual: (current: number) => number;
  forward: boolean;
  sign: number;
  high: number;
  low: number;
  current: number;
  lastCurrent: number;
  child: Network[];
  nodeAbove: number[];
  inner: ((y: number) => number)[];
}

/** Evaluates network currents over node voltages `v`; solving a series network writes its internal nodes into `v`. */
export class NetworkEvaluator {
  /** Element evaluations so far (for benchmarks). */
  evaluations = 0;
  private readonly solvers = new Map<Network, SeriesSolver>();

  constructor(
    readonly elements: readonly CircuitElement[],
    readonly v: Float64Array,
    /** Absolute tolerance on internal node voltages, volts. */
    readonly voltageTolerance = 1e-12,
  ) {}

  /** Current from `n.a` to `n.b`. */
  current(n: Network): number {
    switch (n.kind) {
      case 'leaf':
        return this.leaf(n.element, n.a, n.b);
      case 'parallel': {
        let sum = 0;
        for (const c of n.children) sum += this.current(c);
        return sum;
      }
      case 'series': {
        let simple = true;
        for (const c of n.children) if (!isSimple(c)) simple = false;
        if (simple && this.leafStack(n)) return this.stackCurrent;
        return n.children.length === 2 ? this.pair(n) : this.stack(n);
      }
    }
  }

  /**
   * A series stack of single elements by Newton's method on its internal nodes (tridiagonal
   * Jacobian from analytic device slopes), warm-started from the nodes' previous voltages.
   * Returns null when Newton does not converge inside the bracket; the caller then falls
   * back to the bracketed solve. An element that is off whatever its node voltages makes
   * the stack current zero at once. The current goes to `stackCurrent` (a number returned from a
   * call that is not inlined is boxed on the heap, and this runs millions of times).
   */
  private leafStack(n: Series): boolean {
    const v = this.v;
    const va = v[n.a];
    const vb = v[n.b];
    const k = n.children.length;
    const lo = Math.min(va, vb);
    const hi = Math.max(va, vb);
    if (va === vb || this.anyAlwaysOff(n)) {
      this.fillNodes(n, lo);
      this.stackCurrent = 0;
      return true;
    }
    const m = k - 1;
    const x = this.scratch(m);
    for (let j = 0; j < m; j++) {
      const old = v[n.nodes[j]];
      x[j] = old > lo && old < hi ? old : va + ((vb - va) * (j + 1)) / k;
    }
    const { cur, dA, dB, diag, upper, lower, rhs } = stackWork;
    for (let iter = 0; iter < 40; iter++) {
      for (let j = 0; j < m; j++) v[n.nodes[j]] = x[j];
      for (let j = 0; j < k; j++) {
        const c = n.children[j];
        if (c.kind === 'leaf') {
          this.leafSlopes(c.element, c.a, c.b);
          cur[j] = slopes[0];
          dA[j] = slopes[1];
          dB[j] = slopes[2];
        } else {
          // A parallel group of single elements between the same two nodes: currents and slopes add.
          let i = 0;
          let da = 0;
          let db = 0;
          for (const leaf of (c as Extract<Network, { kind: 'parallel' }>).children as Extract<Network, { kind: 'leaf' }>[]) {
            this.leafSlopes(leaf.element, leaf.a, leaf.b);
            i += slopes[0];
            da += slopes[1];
            db += slopes[2];
          }
          cur[j] = i;
          dA[j] = da;
          dB[j] = db;
        }
      }
      // F_j = I_j − I_{j+1} at node j (between children j and j+1).
      let worst = 0;
      for (let j = 0; j < m; j++) {
        rhs[j] = -(cur[j] - cur[j + 1]);
        diag[j] = dB[j] - dA[j + 1];
        lower[j] = dA[j];
        upper[j] = -dB[j + 1];
      }
      // Thomas algorithm.
      for (let j = 1; j < m; j++) {
        if (diag[j - 1] === 0) return false;
        const w = lower[j] / diag[j - 1];
        diag[j] -= w * upper[j - 1];
        rhs[j] -= w * rhs[j - 1];
      }
      if (diag[m - 1] === 0) return false;
      rhs[m - 1] /= diag[m - 1];
      for (let j = m - 2; j >= 0; j--) rhs[j] = (rhs[j] - upper[j] * rhs[j + 1]) / diag[j];
      for (let j = 0; j < m; j++) {
        let step = rhs[j];
        if (!Number.isFinite(step)) return false;
        // Limit a step to a fraction of the span so a cut-off region cannot throw the node out of the stack.
        const cap = 0.25 * (hi - lo);
        if (step > cap) step = cap;
        else if (step < -cap) step = -cap;
        let next = x[j] + step;
        if (next < lo) next = 0.5 * (x[j] + lo);
        else if (next > hi) next = 0.5 * (x[j] + hi);
        worst = Math.max(worst, Math.abs(next - x[j]));
        x[j] = next;
      }
      if (worst <= this.voltageTolerance) {
        for (let j = 0; j < m; j++) v[n.nodes[j]] = x[j];
        let sum = 0;
        for (let j = 0; j < k; j++) sum += this.current(n.children[j]);
        this.stackCurrent = sum / k;
        return true;
      }
    }
    return false;
  }

  /** Current of the stack `leafStack` last solved. */
  private stackCurrent = 0;

  private scratch(m: number): Float64Array {
    if (m >= stackWork.x.length) stackWork = newStackWork(2 * m + 2); // very long stacks: grow the work arrays once
    return stackWork.x;
  }

  private leafSlopes(index: number, a: number, b: number): void {
    this.evaluations++;
    const e = this.elements[index];
    const v = this.v;
    if (e.kind === 'res') {
      slopes[0] = (v[a] - v[b]) * e.conductance;
      slopes[1] = e.conductance;
      slopes[2] = -e.conductance;
      return;
    }
    channelCurrentSlopesAt(e.model, e.beta, v, a, b, e.gate, e.bulk, slopes);
  }

  /**
   * Whether some element of the stack (a device, or every device of a parallel group) cannot conduct for any node voltages
   * between the stack's ends. The ends are read here, not passed: numbers passed to a call that is not inlined are boxed.
   */
  private anyAlwaysOff(n: Series): boolean {
    for (const c of n.children) {
      if (c.kind === 'leaf') {
        if (this.leafAlwaysOff(c.element, n)) return true;
      } else if (c.kind === 'parallel') {
        let all = true;
        for (const leaf of c.children) if (leaf.kind !== 'leaf' || !this.leafAlwaysOff(leaf.element, n)) all = false;
        if (all) return true;
      }
    }
    return false;
  }

  private leafAlwaysOff(element: number, n: Series): boolean {
    const v = this.v;
    const e = this.elements[element];
    if (e.kind !== 'mos') return false;
    if (e.gate === n.a || e.gate === n.b || n.nodes.indexOf(e.gate) >= 0) return false;
    const lo = Math.min(v[n.a], v[n.b]);
    const hi = Math.max(v[n.a], v[n.b]);
    // The most favourable source is the stack's low end (n-channel) or high end (p-channel); the body effect only raises VT from there.
    // VT as thresholdVoltage computes it, written out so that no number crosses a call.
    const m = e.model;
    const gate = v[e.gate];
    const vsb = m.polarity === 'n' ? lo - v[e.bulk] : v[e.bulk] - hi;
    const vt = m.gamma === 0 ? m.vt0 : m.vt0 + m.gamma * (Math.sqrt(Math.max(m.phi2F + vsb, 0)) - Math.sqrt(m.phi2F));
    const drive = m.polarity === 'n' ? gate - lo - vt : hi - gate - vt;
    return drive <= 0;
  }

  private leaf(index: number, a: number, b: number): number {
    this.evaluations++;
    const e = this.elements[index];
    const v = this.v;
    if (e.kind === 'res') return (v[a] - v[b]) * e.conductance;
    return channelCurrentAt(e.model, e.beta, v, a, b, e.gate, e.bulk);
  }

  private solverFor(n: Series): SeriesSolver {
    let s = this.solvers.get(n);
    if (s) return s;
    const v = this.v;
    const k = n.children.length;
    const solver: SeriesSolver = {
      balance: (x) => {
        v[n.nodes[0]] = x;
        return this.current(n.children[0]) - this.current(n.children[1]);
      },
      residual: (current) => this.walk(solver, current),
      forward: true,
      sign: 1,
      high: 0,
      low: 0,
      current: 0,
      lastCurrent: -1,
      child: new Array(k),
      nodeAbove: new Array(k),
      inner: [],
    };
    // inner[j] (j = 1 … k−1 in high-to-low order) for each orientation: index j + (forward ? 0 : k).
    for (const forward of [true, false]) {
      for (let j = 0; j < k; j++) {
        const child = n.children[forward ? j : k - 1 - j];
        const node = j === 0 ? -1 : n.nodes[forward ? j - 1 : k - 1 - j];
        solver.inner[j + (forward ? 0 : k)] = (y) => {
          v[node] = y;
          return solver.sign * this.current(child) - solver.current;
        };
      }
    }
    this.solvers.set(n, solver);
    return (s = solver);
  }

  private pair(n: Series): number {
    const v = this.v;
    const va = v[n.a];
    const vb = v[n.b];
    if (va === vb) {
      this.fillNodes(n, va);
      return 0;
    }
    const s = this.solverFor(n);
    const node = n.nodes[0];
    const lo = Math.min(va, vb);
    const hi = Math.max(va, vb);
    // Decreasing in the middle node's voltage: the first element's current falls and the second's rises.
    const x = brentNear(s.balance, lo, hi, v[node], Math.max(1e-3 * (hi - lo), 1e-9), this.voltageTolerance, true);
    v[node] = x;
    return 0.5 * (this.current(n.children[0]) + this.current(n.children[1]));
  }

  // Longer stacks: a solve on the stack current in which each node, walked up from the low end, is itself solved.
  private stack(n: Series): number {
    const v = this.v;
    const va = v[n.a];
    const vb = v[n.b];
    if (va === vb) {
      this.fillNodes(n, va);
      return 0;
    }
    const s = this.solverFor(n);
    const k = n.children.length;
    s.forward = va > vb;
    s.sign = s.forward ? 1 : -1;
    s.high = s.forward ? va : vb;
    s.low = s.forward ? vb : va;
    for (let j = 0; j < k; j++) {
      s.child[j] = n.children[s.forward ? j : k - 1 - j];
      s.nodeAbove[j] = j === 0 ? -1 : n.nodes[s.forward ? j - 1 : k - 1 - j];
    }
    v[s.nodeAbove[k - 1]] = s.high;
    const ceiling = s.sign * this.current(s.child[k - 1]);
    if (!(ceiling > 0)) {
      this.fillNodes(n, s.low);
      return 0;
    }
    const guess = s.lastCurrent >= 0 && s.lastCurrent <= ceiling ? s.lastCurrent : 0.5 * ceiling;
    const current = brentNear(s.residual, 0, ceiling, guess, 1e-3 * ceiling, ceiling * 1e-14, true);
    s.lastCurrent = current;
    this.walk(s, current);
    return s.sign * current;
  }

  // Residual of a trial stack current: positive when the top element carries more than the trial.
  private walk(s: SeriesSolver, current: number): number {
    const v = this.v;
    const k = s.child.length;
    const offset = s.forward ? 0 : k;
    s.current = current;
    let below = s.low;
    for (let j = k - 1; j >= 1; j--) {
      const node = s.nodeAbove[j];
      const previous = v[node];
      v[node] = s.high;
      const capacity = s.sign * this.current(s.child[j]);
      if (capacity < current) {
        for (let i = j - 1; i >= 1; i--) v[s.nodeAbove[i]] = s.high;
        return capacity - 2 * current;
      }
      const step = Math.max(1e-3 * (s.high - below), 1e-9);
      const x = brentNear(s.inner[j + offset], below, s.high, previous, step, this.voltageTolerance, false);
      v[node] = x;
      below = x;
      s.current = current;
    }
    return s.sign * this.current(s.child[0]) - current;
  }

  private fillNodes(n: Network, value: number) {
    if (n.kind === 'leaf') return;
    if (n.kind === 'series') for (const node of n.nodes) this.v[node] = value;
    for (const c of n.children) this.fillNodes(c, value);
  }
}
