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

import type { Network } from '../electrical/network';
import type { Stage } from '../stages';
import type { CellContext } from '../types';
import { cellIndex, designMemo, portsAreLocal, RESTORING_KINDS } from './context';
import { timingOf } from './timing';
import type { Corner } from '../../shared/deck';
import { thresholdVoltage } from '../electrical/mos';
import { ModelResolver } from '../electrical/parameters';
import { netCapacitance } from './budgets';
import { networkElements } from '../electrical/network';

export interface PassEdge {
  stage: Stage;
  /** The two nets it joins. */
  a: number;
  b: number;
  /** Devices in series along its longest branch. */
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

function depthOf(n: Network): number {
  if (n.kind === 'leaf') return 1;
  if (n.kind === 'series') return n.children.reduce((s, c) => s + depthOf(c), 0);
  return Math.max(...n.children.map(depthOf));
}

function degrades(n: Network, polarityOf: (e: number) => string, stops: 'n' | 'p'): boolean {
  if (n.kind === 'leaf') return polarityOf(n.element) === stops;
  if (n.kind === 'series') return n.children.some((c) => degrades(c, polarityOf, stops));
  return n.children.every((c) => degrades(c, polarityOf, stops));
}

/** Pass edges of a context, per net. */
export function passEdgesOf(ctx: CellContext): { edges: PassEdge[]; at: Map<number, PassEdge[]> } {
  return ctx.memo('recognition.pass-edges', () => {
    const index = cellIndex(ctx);
    const cell = ctx.cell;
    const edges: PassEdge[] = [];
    const at = new Map<number, PassEdge[]>();
    for (const s of index.stages.stages) {
      if (s.kind !== 'pass' || s.terminals.length !== 2 || !s.channel) continue;
      const polarityOf = (e: number) => (s.elements[e].kind === 'mos' ? cell.mosfets[s.elements[e].index].polarity : 'r');
      const edge: PassEdge = {
        stage: s,
        a: s.terminals[0],
        b: s.terminals[1],
        depth: depthOf(s.channel),
        degradesHigh: degrades(s.channel, polarityOf, 'n'),
        degradesLow: degrades(s.channel, polarityOf, 'p'),
      };
      edges.push(edge);
      for (const x of [edge.a, edge.b]) {
        const list = at.get(x);
        if (list) list.push(edge);
        else at.set(x, [edge]);
      }
    }
    return { edges, at };
  });
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
      if (index.isPort[net]) return 'port';
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
    const chains: PassChain[] = [];
    for (const receiver of at.keys()) {
      const receivers = receiversOf(receiver);
      if (!receivers.length && !(local && index.isPort[receiver])) continue;
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
    for (const e of networkElements(s.channel!)) {
      const el = s.elements[e];
      if (el.kind !== 'mos') continue;
      const m = cell.mosfets[el.index];
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
  const req = (n: Network, s: Stage): number => {
    if (n.kind === 'leaf') {
      const el = s.elements[n.element];
      if (el.kind !== 'mos') return cell.others[el.index].kind === 'res' ? (cell.others[el.index] as { value: number }).value : 0;
      const m = cell.mosfets[el.index];
      const model = r.get(m.polarity, m.model).model;
      const vgt = Math.max(vdd - model.vt0, 1e-3);
      const vmin = model.kind === 'velocity-saturated' ? Math.min(vgt, model.vdsat) : vgt;
      const idsat = ((model.kPrime * m.w * m.m) / m.l) * (vgt * vmin - (vmin * vmin) / 2) * (1 + model.lambda * vdd);
      return ((0.75 * vdd) / idsat) * (1 - (7 / 9) * model.lambda * vdd);
    }
    if (n.kind === 'series') return n.children.reduce((sum, c) => sum + req(c, s), 0);
    return 1 / n.children.reduce((sum, c) => sum + 1 / Math.max(req(c, s), 1e-30), 0);
  };
  let resistance = 0;
  let tau = 0;
  for (const st of chain.steps) {
    resistance += req(st.edge.stage.channel!, st.edge.stage);
    tau += resistance * netCapacitance(ctx, st.to, corner);
  }
  return tau;
}
