// Charge and leakage budgets of a dynamic node.
//
//  - Charge sharing: when evaluation connects discharged internal nodes of the
//    evaluation network to the precharged node without completing a path to the
//    rail, the node drops by ΔV = VDD·Cint/(Cint + Cnode) (charge conservation;
//    Rabaey et al., Digital Integrated Circuits, 2nd ed., §6.3). The worst case is
//    the input combination that connects the most capacitance while the path stays off.
//  - Keeper strength: the ratio of the keeper's on-current to the weakest single
//    conducting path of the evaluation network's on-current, both as saturation
//    currents at full drive (|VGS| = |VDS| = VDD), solved through the stacks.
//  - Hold time without a keeper: t = C·ΔVallowed / Ileak, with the worst-case
//    leakage of the off evaluation network (parallel branches add; a series branch
//    leaks as its leakiest device with the others on), to compare with the slowest
//    clock period.
//
// Networks here run over cell nets, with rails as POWER_END / GROUND_END, and leaves
// index `elements` (the stage's element list).

import type { Cell, ModelCard, RailKind } from '../../grammar/design';
import type { Corner } from '../../shared/deck';
import type { CircuitElement, Network } from './network';
import { GROUND_END, mapNetwork, NetworkEvaluator, networkElements, POWER_END } from './network';
import { ModelResolver } from './parameters';
import { elementIndex, isMosElement, type ElementRef } from './element';

export type { ElementRef } from './element';

/** Charge-sharing drop ΔV = VDD·Cint/(Cint + Cnode). */
export function chargeShareDrop(vdd: number, cInternal: number, cNode: number): number {
  return cInternal + cNode > 0 ? (vdd * cInternal) / (cInternal + cNode) : 0;
}

/** Hold time t = C·ΔVallowed / Ileak (infinite without leakage). */
export function holdTime(capacitance: number, allowedDrop: number, leakage: number): number {
  return leakage > 0 ? (capacitance * allowedDrop) / leakage : Infinity;
}

export interface NodeCapacitance {
  total: number;
  /** Explicit capacitors with one end on the net (counted as if the other end were grounded). */
  explicit: number;
  /** Drain/source junctions on the net: corner cjPerUm × width (µm), once per terminal. */
  junction: number;
  /** Gates on the net: corner cgPerUm × width (µm). */
  gate: number;
}

const PER_UM = 1e6;

export function nodeCapacitance(cell: Cell, net: number, corner: Corner, alias?: Int32Array): NodeCapacitance {
  const same = alias ? (x: number) => alias[x] === alias[net] : (x: number) => x === net;
  let explicit = 0;
  let junction = 0;
  let gate = 0;
  for (const o of cell.others) {
    if (o.kind !== 'cap') continue;
    if (same(o.a) !== same(o.b)) explicit += o.value;
  }
  const mos = cell.mosfets;
  for (let i = 0; i < mos.length; i++) {
    const p = mos.isN(i) ? corner.nmos : corner.pmos;
    const widthUm = mos.w[i] * mos.m[i] * PER_UM;
    if (same(mos.drain[i])) junction += p.cjPerUm * widthUm;
    if (same(mos.source[i])) junction += p.cjPerUm * widthUm;
    if (same(mos.gate[i])) gate += p.cgPerUm * widthUm;
  }
  return { total: explicit + junction + gate, explicit, junction, gate };
}

export interface NetworkContext {
  cell: Cell;
  corner: Corner;
  elements: readonly ElementRef[];
  railOf: (net: number) => RailKind | undefined;
  alias?: Int32Array;
}

export interface ChargeSharingInput extends NetworkContext {
  /** The dynamic node. */
  node: number;
  /** Evaluation network from the node (a) to its rail (b). */
  network: Network;
  /** Gate nets with a known level during evaluation (the clock high on a footer, for example). */
  held?: ReadonlyMap<number, boolean>;
  /** Whether a free gate net may go high during evaluation (default: every one may). */
  mayBeHigh?: (net: number) => boolean;
}

export interface ChargeSharingResult {
  vdd: number;
  cNode: number;
  /** Internal capacitance connected in the worst case. */
  cShared: number;
  drop: number;
  /** Nets connected to the node in the worst case. */
  sharedNets: number[];
  /** Gate nets high in the worst case. */
  highInputs: number[];
  /** True when every combination was tried (otherwise a greedy search, above 16 free inputs). */
  exhaustive: boolean;
}

const MAX_EXHAUSTIVE_SIGNALS = 16;

export function worstChargeSharing(input: ChargeSharingInput): ChargeSharingResult {
  const { cell, corner, elements, railOf, network, node } = input;
  const alias = input.alias;
  const root = (net: number) => (net < 0 ? net : alias ? alias[net] : net);
  const leaves: { a: number; b: number; gate: number; n: boolean }[] = [];
  const collect = (n: Network) => {
    if (n.kind === 'leaf') {
      const el = elements[n.element];
      if (!isMosElement(el)) leaves.push({ a: root(n.a), b: root(n.b), gate: -1, n: true });
      else {
        leaves.push({ a: root(n.a), b: root(n.b), gate: root(cell.mosfets.gate[el]), n: cell.mosfets.isN(el) });
      }
    } else n.children.forEach(collect);
  };
  collect(network);
  const railEnd = network.b;
  const nodeRoot = root(node);
  const nets = [...new Set(leaves.flatMap((l) => [l.a, l.b]))].filter((x) => x >= 0 && x !== nodeRoot && !railOf(x));
  const capOf = new Map(nets.map((x) => [x, nodeCapacitance(cell, x, corner, alias).total]));
  const cNode = nodeCapacitance(cell, nodeRoot, corner, alias).total;

  const signals: number[] = [];
  const fixed = new Map<number, boolean>();
  for (const l of leaves) {
    if (l.gate < 0 || fixed.has(l.gate) || signals.includes(l.gate)) continue;
    const r = railOf(l.gate);
    const held = input.held?.get(l.gate);
    if (r) fixed.set(l.gate, r === 'power');
    else if (held !== undefined) fixed.set(l.gate, held);
    else if (input.mayBeHigh && !input.mayBeHigh(l.gate)) fixed.set(l.gate, false);
    else signals.push(l.gate);
  }

  const index = new Map<number, number>([[nodeRoot, 0], [railEnd, 1]]);
  nets.forEach((x) => index.set(x, index.size));
  const parent = new Int32Array(index.size);
  const find = (x: number): number => {
    while (parent[x] !== x) x = parent[x] = parent[parent[x]];
    return x;
  };
  const evaluate = (high: Set<number>): number => {
    for (let i = 0; i < parent.length; i++) parent[i] = i;
    for (const l of leaves) {
      const level = l.gate < 0 ? true : (fixed.get(l.gate) ?? high.has(l.gate));
      if (l.gate >= 0 && level !== l.n) continue;
      const ia = index.get(l.a) ?? index.get(railOf(l.a) ? railEnd : l.a);
      const ib = index.get(l.b) ?? index.get(railOf(l.b) ? railEnd : l.b);
      if (ia === undefined || ib === undefined) continue;
      parent[find(ia)] = find(ib);
    }
    if (find(0) === find(1)) return -1;
    let c = 0;
    for (const x of nets) if (find(index.get(x)!) === find(0)) c += capOf.get(x)!;
    return c;
  };

  let best = { c: evaluate(new Set()), high: new Set<number>() };
  const exhaustive = signals.length <= MAX_EXHAUSTIVE_SIGNALS;
  if (exhaustive) {
    for (let mask = 1; mask < 1 << signals.length; mask++) {
      const high = new Set(signals.filter((_, i) => (mask >> i) & 1));
      const c = evaluate(high);
      if (c > best.c) best = { c, high };
    }
  } else {
    for (let improved = true; improved; ) {
      improved = false;
      for (const s of signals) {
        if (best.high.has(s)) continue;
        const high = new Set(best.high).add(s);
        const c = evaluate(high);
        if (c > best.c) {
          best = { c, high };
          improved = true;
        }
      }
    }
  }
  const cShared = Math.max(best.c, 0);
  evaluate(best.high);
  const sharedNets = nets.filter((x) => find(index.get(x)!) === find(0));
  return {
    vdd: corner.vdd,
    cNode,
    cShared,
    drop: chargeShareDrop(corner.vdd, cShared, cNode),
    sharedNets,
    highInputs: [...best.high],
    exhaustive,
  };
}

export interface DriveInput extends NetworkContext {
  models: ReadonlyMap<string, ModelCard>;
  useNetlistModels: boolean;
}

/**
 * On-current of a network with every device fully on (n-channel gates at VDD,
 * p-channel at ground), its end `a` at `va` and `b` at `vb`: the current from a to b.
 */
export function driveCurrent(input: DriveInput, network: Network, va: number, vb: number): number {
  const { cell, corner, elements, railOf } = input;
  const resolver = new ModelResolver(corner, input.models, input.useNetlistModels);
  const A = 2;
  const B = 3;
  const nodes = new Map<number, number>();
  let next = 4;
  const nodeOf = (net: number) => {
    if (net === network.a) return A;
    if (net === network.b) return B;
    if (net === POWER_END) return 1;
    if (net === GROUND_END) return 0;
    const r = railOf(net);
    if (r) return r === 'power' ? 1 : 0;
    let x = nodes.get(net);
    if (x === undefined) nodes.set(net, (x = next++));
    return x;
  };
  const mapped = mapNetwork(network, nodeOf);
  const circuitElements: CircuitElement[] = elements.map((el) => {
    if (!isMosElement(el)) {
      const r = cell.others[elementIndex(el)];
      return { kind: 'res', conductance: r.kind === 'res' && r.value > 0 ? 1 / r.value : 0 };
    }
    const m = cell.mosfets.at(el);
    const resolved = resolver.get(m.polarity, m.model);
    const br = railOf(m.bulk);
    const bulk = br ? (br === 'power' ? 1 : 0) : m.polarity === 'n' ? 0 : 1;
    return { kind: 'mos', model: resolved.model, beta: (resolved.model.kPrime * m.w * m.m) / m.l, gate: m.polarity === 'n' ? 1 : 0, bulk };
  });
  const v = new Float64Array(next);
  v[1] = corner.vdd;
  v[A] = va;
  v[B] = vb;
  return new NetworkEvaluator(circuitElements, v).current(mapped);
}

/** The single conducting path of a network with the lowest effective k′W/L (parallel: the weakest branch; series: all of them). */
export function weakestPath(input: Pick<NetworkContext, 'cell' | 'corner' | 'elements'>, network: Network): Network {
  const strength = (n: Network): number => {
    if (n.kind === 'leaf') {
      const el = input.elements[n.element];
      if (!isMosElement(el)) return Infinity;
      const m = input.cell.mosfets.at(el);
      const p = m.polarity === 'n' ? input.corner.nmos : input.corner.pmos;
      return (p.kPrime * m.w * m.m) / m.l;
    }
    const parts = n.children.map(strength);
    return n.kind === 'series' ? 1 / parts.reduce((s, x) => s + 1 / x, 0) : Math.min(...parts);
  };
  const path = (n: Network): Network => {
    if (n.kind === 'leaf') return n;
    if (n.kind === 'series') return { ...n, children: n.children.map(path) };
    let best = n.children[0];
    for (const c of n.children) if (strength(c) < strength(best)) best = c;
    return path(best);
  };
  return path(network);
}

export interface KeeperRatio {
  keeperCurrent: number;
  pullDownCurrent: number;
  /** keeperCurrent / pullDownCurrent. */
  ratio: number;
  /** Elements of the weakest evaluation path. */
  weakestPath: number[];
  basis: string;
}

/**
 * Keeper against the weakest evaluation path, as saturation currents at full drive:
 * keeper from its rail to the node held at the other rail, evaluation path from the
 * node held at its precharge level to its rail.
 */
export function keeperRatio(input: DriveInput, keeper: Network, evaluation: Network): KeeperRatio {
  const vdd = input.corner.vdd;
  // Keeper ends: rail (POWER_END for an n-evaluate node) and the node; evaluation: node (a) and rail (b).
  const keeperRailHigh = keeper.a === POWER_END || keeper.b === POWER_END;
  const railV = keeperRailHigh ? vdd : 0;
  const nodeV = keeperRailHigh ? 0 : vdd;
  const keeperFromRail = keeper.a === POWER_END || keeper.a === GROUND_END;
  const keeperCurrent = Math.abs(driveCurrent(input, keeper, keeperFromRail ? railV : nodeV, keeperFromRail ? nodeV : railV));
  const path = weakestPath(input, evaluation);
  const pullDownCurrent = Math.abs(driveCurrent(input, path, keeperRailHigh ? vdd : 0, keeperRailHigh ? 0 : vdd));
  return {
    keeperCurrent,
    pullDownCurrent,
    ratio: pullDownCurrent > 0 ? keeperCurrent / pullDownCurrent : Infinity,
    weakestPath: networkElements(path),
    basis: 'saturation currents at full drive, |VGS| = |VDS| = VDD, through the weakest single evaluation path',
  };
}

/** Worst-case leakage of an off network: parallel branches add, a series branch leaks as its leakiest member (the others on). */
export function networkLeakage(input: Pick<NetworkContext, 'cell' | 'corner' | 'elements'>, network: Network): number {
  if (network.kind === 'leaf') {
    const el = input.elements[network.element];
    if (!isMosElement(el)) return Infinity;
    const m = input.cell.mosfets.at(el);
    const p = m.polarity === 'n' ? input.corner.nmos : input.corner.pmos;
    return p.leakPerUm * m.w * m.m * PER_UM;
  }
  const parts = network.children.map((c) => networkLeakage(input, c));
  return network.kind === 'parallel' ? parts.reduce((s, x) => s + x, 0) : Math.max(...parts);
}

export interface HoldBudget {
  capacitance: number;
  leakage: number;
  allowedDrop: number;
  holdTime: number;
  period: number;
  /** holdTime ≥ period. */
  holds: boolean;
}

/** How long the node keeps its level with no keeper, against the slowest clock period. */
export function holdBudget(
  input: Pick<NetworkContext, 'cell' | 'corner' | 'elements' | 'alias'>,
  node: number,
  evaluation: Network,
  allowedDrop: number,
  period: number,
): HoldBudget {
  const capacitance = nodeCapacitance(input.cell, node, input.corner, input.alias).total;
  const leakage = networkLeakage(input, evaluation);
  const t = holdTime(capacitance, allowedDrop, leakage);
  return { capacitance, leakage, allowedDrop, holdTime: t, period, holds: t >= period };
}
