// Pass devices, transmission gates and the series chains they form.
//
// Stage extraction already splits pass devices from the stages they join: a pass
// stage is a channel network between two observed nets that touches no rail (one n-
// or p-channel device, a transmission gate, or a series string through unobserved
// nodes). Here pass stages become edges of a graph over nets, weighted by how many
// devices a signal crosses in series. A chain runs from a driver (a net a restoring
// stage drives, a port, an instance pin) through pass edges, and through dynamic
// nodes on the way (a Manchester carry chain), to a receiver: a net that gates a
// restoring or dynamic stage, where the level is restored. Each receiver's chain is
// its longest shortest path back to a driver.
//
// An edge passes a full high level only if some parallel branch of it is p-channel
// all the way (an n-channel device stops a high one threshold below its gate), and a
// full low only if some branch is n-channel: an n-only device "degrades high", a
// p-only one "degrades low", a transmission gate neither.

import type { Mosfet } from '../../grammar/design';
import type { Stage } from '../stages';
import type { CellContext } from '../types';
import { cellIndex, designMemo, portsAreLocal, RESTORING_KINDS } from './context';
import { timingOf } from './timing';
import type { Corner } from '../../shared/deck';
import { thresholdVoltage } from '../electrical/mos';
import { ModelResolver } from '../electrical/parameters';
import { netCapacitance } from './budgets';
import { isMosElement } from '../stages';

export interface PassEdge {
  stage: Stage;
  /** The two nets it joins. */
  a: number;
  b: number;
  /** `stage.elements` indices of the devices in parallel between a and b (one device, or the two halves of a transmission gate). */
  elements: number[];
  /** Devices in series (1: edges are single parallel groups). */
  depth: number;
  degradesHigh: boolean;
  degradesLow: boolean;
}

export interface ChainStep {
  edge: PassEdge;
  /** Net the step leaves from (towards the receiver) and arrives at. */
  from: number;
  to: number;
}

export interface PassChain {
  /** The receiving net, an input of `receivers`. */
  receiver: number;
  receivers: Stage[];
  /** The driver end of the chain, and what it is. */
  source: number;
  sourceKind: 'stage' | 'port' | 'instance';
  /** Steps from the source to the receiver. */
  steps: ChainStep[];
  /** Series devices from source to receiver. */
  length: number;
  degradesHigh: boolean;
  degradesLow: boolean;
}

/** Pass edges of a context, per net: each pass stage split into its groups of parallel devices (a series string gives one edge per device, with its stack nodes as nets of the graph). */
export function passEdgesOf(ctx: CellContext): { edges: PassEdge[]; at: Map<number, PassEdge[]> } {
  return ctx.memo('recognition.pass-edges', () => {
    const index = cellIndex(ctx);
    const cell = ctx.cell;
    const edges: PassEdge[] = [];
    const at = new Map<number, PassEdge[]>();
    for (const s of index.stages.stages) {
      if (s.kind !== 'pass') continue;
      const groups = new Map<string, PassEdge>();
      s.elements.forEach((el, e) => {
        if (!isMosElement(el)) return;
        const x = index.alias[cell.mosfets.drain[el]];
        const y = index.alias[cell.mosfets.source[el]];
        if (x === y) return;
        const [a, b] = x < y ? [x, y] : [y, x];
        const key = `${a},${b}`;
        let g = groups.get(key);
        if (!g) {
          g = { stage: s, a, b, elements: [], depth: 1, degradesHigh: true, degradesLow: true };
          groups.set(key, g);
          edges.push(g);
          for (const net of [a, b]) {
            const list = at.get(net);
            if (list) list.push(g);
            else at.set(net, [g]);
          }
        }
        g.elements.push(e);
        // A p-channel device passes a full high, an n-channel device a full low.
        if (!cell.mosfets.isN(el)) g.degradesHigh = false;
        else g.degradesLow = false;
      });
    }
    return { edges, at };
  });
}

/** The device of a chain step (a `stage.elements` index of the step's stage). */
export function stepDevice(cell: CellContext['cell'], step: ChainStep, element: number): Mosfet {
  return cell.mosfets.at(step.edge.stage.elements[element]);
}

/** Past this many nets a pass component is not searched from each receiver (a bus, not a chain). */
const MAX_COMPONENT = 4096;

/** Every receiver at the end of a pass chain, with its longest chain. */
export function passChainsOf(ctx: CellContext): PassChain[] {
  return ctx.memo('recognition.pass-chains', () => {
    const { at } = passEdgesOf(ctx);
    if (!at.size) return [];
    const index = cellIndex(ctx);
    timingOf(ctx); // footless dynamic stages are recognised before receivers are told apart
    const stages = index.stages.stages;
    const local = portsAreLocal(ctx);
    const sourceKind = (net: number): PassChain['sourceKind'] | null => {
      // Restoring stages drive a chain; a dynamic node does not (it floats while it evaluates), so a chain runs through it.
      const d = index.stages.driverOf.get(net);
      if (d !== undefined && RESTORING_KINDS.has(stages[d].kind)) return 'stage';
      // A port drives the chain from outside, unless a stage here drives it (a dynamic node brought out as a port).
      if (index.isPort[net] && d === undefined) return 'port';
      if (index.pinInstances.count(net)) return 'instance';
      return null;
    };
    const receiversOf = (net: number): Stage[] => {
      const out: Stage[] = [];
      for (const id of index.inputOf.of(net)) {
        const s = stages[id];
        if (RESTORING_KINDS.has(s.kind) || s.kind === 'dynamic') out.push(s);
      }
      return out;
    };
    const outputPorts = new Set<number>();
    ctx.cell.ports.forEach((p, i) => {
      if (ctx.cell.portDirections[i] === 'output') outputPorts.add(index.alias[p]);
    });
    const chains: PassChain[] = [];
    for (const receiver of at.keys()) {
      const receivers = receiversOf(receiver);
      // An output port of a root cell ends a chain too (it leaves the design unrestored); other ports drive chains.
      if (!receivers.length && !(local && outputPorts.has(receiver))) continue;
      // Shortest paths (in series devices) from the receiver back to every driver reachable through pass edges.
      const dist = new Map<number, number>([[receiver, 0]]);
      const via = new Map<number, ChainStep>();
      let frontier = [receiver];
      let visited = 1;
      const reached: number[] = [];
      while (frontier.length && visited < MAX_COMPONENT) {
        // Small integer weights: relax in rounds (Bellman–Ford on a sparse graph, which settles in a few rounds here).
        const next: number[] = [];
        for (const x of frontier) {
          const dx = dist.get(x)!;
          if (x !== receiver && sourceKind(x)) continue;
          for (const e of at.get(x) ?? []) {
            const y = e.a === x ? e.b : e.a;
            const dy = dx + e.depth;
            if (dy < (dist.get(y) ?? Infinity)) {
              if (!dist.has(y)) visited++;
              dist.set(y, dy);
              via.set(y, { edge: e, from: y, to: x });
              next.push(y);
            }
          }
        }
        frontier = next;
      }
      for (const [x] of dist) if (x !== receiver && sourceKind(x)) reached.push(x);
      if (!reached.length) continue;
      let source = reached[0];
      for (const x of reached) if (dist.get(x)! > dist.get(source)!) source = x;
      const steps: ChainStep[] = [];
      for (let x = source; x !== receiver; ) {
        const step = via.get(x)!;
        steps.push(step);
        x = step.to;
      }
      chains.push({
        receiver,
        receivers,
        source,
        sourceKind: sourceKind(source)!,
        steps,
        length: dist.get(source)!,
        degradesHigh: steps.some((st) => st.edge.degradesHigh),
        degradesLow: steps.some((st) => st.edge.degradesLow),
      });
    }
    return chains;
  });
}

// ---------------------------------------------------------------------------
// Levels a chain delivers, and an Elmore estimate of its delay.


function resolver(ctx: CellContext, corner: Corner): ModelResolver {
  return designMemo(ctx.design, ctx.deck, `resolver|${corner.name}`, () => new ModelResolver(corner, ctx.design.models, ctx.deck.useNetlistModels));
}

export interface PassedLevel {
  /** Highest level the chain delivers for a full high at its driver (V). */
  high: number;
  /** Lowest level for a full low (V). */
  low: number;
  /** Device that limits each, when one does. */
  highDevice: string | null;
  lowDevice: string | null;
}

/**
 * Levels through an n-only device with its gate at VDD: it stops conducting once its source is a threshold below
 * the gate, VOUT = VDD − VT(VSB = VOUT) with the body effect of a grounded bulk (a fixed point, found by iteration);
 * a p-only device with its gate at 0 V stops a low at VOUT = |VT|(VSB = VDD − VOUT). Transmission gates pass both.
 */
export function passedLevels(ctx: CellContext, chain: PassChain, corner: Corner): PassedLevel {
  const cell = ctx.cell;
  const index = cellIndex(ctx);
  const r = resolver(ctx, corner);
  const vdd = corner.vdd;
  let high = vdd;
  let low = 0;
  let highDevice: string | null = null;
  let lowDevice: string | null = null;
  for (const st of chain.steps) {
    const s = st.edge.stage;
    for (const e of st.edge.elements) {
      const el = s.elements[e];
      if (!isMosElement(el)) continue;
      const m = cell.mosfets.at(el);
      const model = r.get(m.polarity, m.model).model;
      const bulkRail = index.railOf(m.bulk);
      if (m.polarity === 'n' && st.edge.degradesHigh) {
        let out = vdd - model.vt0;
        for (let k = 0; k < 100; k++) out = vdd - thresholdVoltage(model, bulkRail === 'ground' ? Math.max(out, 0) : 0);
        if (out < high) {
          high = out;
          highDevice = m.name;
        }
      } else if (m.polarity === 'p' && st.edge.degradesLow) {
        let out = model.vt0;
        for (let k = 0; k < 100; k++) out = thresholdVoltage(model, bulkRail === 'power' ? Math.max(vdd - out, 0) : 0);
        if (out > low) {
          low = out;
          lowDevice = m.name;
        }
      }
    }
  }
  return { high, low, highDevice, lowDevice };
}

/**
 * Elmore delay of the chain (Elmore 1948): τ = Σᵢ Cᵢ · Σⱼ≤ᵢ Rⱼ over the nodes after each device, with each device's
 * equivalent resistance Req = ¾·VDD/IDSAT·(1 − 7/9·λVDD) (Rabaey et al., Digital Integrated Circuits, 2nd ed., §3.3,
 * recalled from memory), parallel branches of a transmission gate combined as conductances.
 */
export function elmoreDelay(ctx: CellContext, chain: PassChain, corner: Corner): number {
  const cell = ctx.cell;
  const r = resolver(ctx, corner);
  const vdd = corner.vdd;
  const req = (s: Stage, e: number): number => {
    const el = s.elements[e];
    if (!isMosElement(el)) return 0;
    const m = cell.mosfets.at(el);
    const model = r.get(m.polarity, m.model).model;
    const vgt = Math.max(vdd - model.vt0, 1e-3);
    const vmin = model.kind === 'velocity-saturated' ? Math.min(vgt, model.vdsat) : vgt;
    const idsat = ((model.kPrime * m.w * m.m) / m.l) * (vgt * vmin - (vmin * vmin) / 2) * (1 + model.lambda * vdd);
    return ((0.75 * vdd) / idsat) * (1 - (7 / 9) * model.lambda * vdd);
  };
  let resistance = 0;
  let tau = 0;
  for (const st of chain.steps) {
    // Parallel devices of one step (a transmission gate) combine as conductances.
    resistance += 1 / st.edge.elements.reduce((sum, e) => sum + 1 / Math.max(req(st.edge.stage, e), 1e-30), 0);
    tau += resistance * netCapacitance(ctx, st.to, corner);
  }
  return tau;
}
