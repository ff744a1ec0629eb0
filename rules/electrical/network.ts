// Series/parallel networks of two-terminal channel elements, and their DC current.
//
// A network joins its ends `a` and `b`. A series network lists its children from a
// to b, with `nodes[i]` the internal node between children i and i+1; a parallel
// network's children all join a and b. Leaves are MOS channels or resistors. The
// same shape describes a stage's pull-up and pull-down networks over cell nets
// (rules/stages) and a compact circuit's networks over node indices (below).
//
// Current through a series stack is found by solving its internal nodes with
// bracketed root-finding (Brent), never by lumping widths: a two-element stack is one
// solve on its middle node; a longer stack is a solve on the stack current in which
// each node, walked up from the low end, is itself solved so that its element carries
// that current. Every element's current is monotone in its terminal voltages, so each
// bracket holds exactly one root.

import { brent } from './roots';
import { channelCurrent, type MosModel } from './mos';

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

/** Evaluates network currents over node voltages `v`; solving a series network writes its internal nodes into `v`. */
export class NetworkEvaluator {
  /** Element evaluations so far (for benchmarks). */
  evaluations = 0;

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
      case 'series':
        return n.children.length === 2 ? this.pair(n) : this.stack(n);
    }
  }

  private leaf(index: number, a: number, b: number): number {
    this.evaluations++;
    const e = this.elements[index];
    const v = this.v;
    if (e.kind === 'res') return (v[a] - v[b]) * e.conductance;
    return channelCurrent(e.model, e.beta, v[a], v[b], v[e.gate], v[e.bulk]);
  }

  private pair(n: Extract<Network, { kind: 'series' }>): number {
    const v = this.v;
    const va = v[n.a];
    const vb = v[n.b];
    const node = n.nodes[0];
    if (va === vb) {
      this.fillNodes(n, va);
      return 0;
    }
    const [first, second] = n.children;
    // Decreasing in the middle node's voltage: the first element's current falls and the second's rises.
    const balance = (x: number) => {
      v[node] = x;
      return this.current(first) - this.current(second);
    };
    const x = brent(balance, Math.min(va, vb), Math.max(va, vb), this.voltageTolerance);
    v[node] = x;
    return 0.5 * (this.current(first) + this.current(second));
  }

  private stack(n: Extract<Network, { kind: 'series' }>): number {
    const v = this.v;
    const va = v[n.a];
    const vb = v[n.b];
    if (va === vb) {
      this.fillNodes(n, va);
      return 0;
    }
    const k = n.children.length;
    const forward = va > vb;
    const sign = forward ? 1 : -1;
    const high = forward ? va : vb;
    const low = forward ? vb : va;
    // Children from the high end to the low end, and the node above each (index j: between child j-1 and j).
    const child = (j: number) => n.children[forward ? j : k - 1 - j];
    const nodeAbove = (j: number) => n.nodes[forward ? j - 1 : k - 1 - j];
    const flow = (c: Network) => sign * this.current(c);

    // Residual of a trial stack current: walk up from the low end solving each node; positive when the top element carries more.
    const residual = (current: number): number => {
      let below = low;
      for (let j = k - 1; j >= 1; j--) {
        const node = nodeAbove(j);
        const c = child(j);
        v[node] = high;
        const capacity = flow(c);
        if (capacity < current) {
          for (let i = j - 1; i >= 1; i--) v[nodeAbove(i)] = high;
          return capacity - 2 * current;
        }
        const x = brent(
          (y) => {
            v[node] = y;
            return flow(c) - current;
          },
          below,
          high,
          this.voltageTolerance,
        );
        v[node] = x;
        below = x;
      }
      return flow(child(0)) - current;
    };

    v[nodeAbove(k - 1)] = high;
    const ceiling = flow(child(k - 1));
    if (!(ceiling > 0)) {
      this.fillNodes(n, low);
      return 0;
    }
    const current = brent(residual, 0, ceiling, ceiling * 1e-14);
    residual(current);
    return sign * current;
  }

  private fillNodes(n: Network, value: number) {
    for (const node of networkNodes(n)) this.v[node] = value;
  }
}
