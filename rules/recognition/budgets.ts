// Electrical budgets of a dynamic node, at every corner of the deck: its capacitance,
// the threshold of the stage that reads it, worst-case charge sharing, each keeper's
// strength against the weakest evaluation path, and the leakage that empties it.
//
// The formulas are those of rules/electrical/charge.ts. They are evaluated on the
// node's neighbourhood — its stage, every device with a terminal on the node or on a
// stack node of its stage, and the capacitors there — copied into a small cell, so
// that a flat netlist of a million devices costs what its distinct neighbourhoods
// cost: results are memoised by the neighbourhood's structural signature.

import type { Cell, RailKind } from '../../grammar/design';
import type { Corner } from '../../shared/deck';
import {
  keeperRatio,
  networkLeakage,
  nodeCapacitance,
  worstChargeSharing,
  type ChargeSharingResult,
  type ElementRef,
  type KeeperRatio,
} from '../electrical/charge';
import type { Network } from '../electrical/network';
import { ModelResolver } from '../electrical/parameters';
import { analyseStage, isMosElement, elementIndex, mosElement, resistorElement, type StageElement } from '../stages';
import type { CellContext } from '../types';
import { cellIndex, childContext, designMemo, stageEnvironmentOf } from './context';
import { lowerCaseModel, modelCode, NumberKey, NumberKeyTable } from '../signature-key';
import type { DynamicNode, Keeper } from './dynamic';

export interface Threshold {
  /** VIH of the most sensitive receiver for a precharged-high node, VIL for a pre-discharged one; VDD/2 when no receiver has one. */
  value: number;
  source: 'receiver' | 'assumed';
  /** Receiving stage id, when there is one. */
  stage: number | null;
}

export interface CornerBudget {
  corner: string;
  vdd: number;
  /** Node capacitance (F): junctions, gates and explicit capacitors on the node. */
  capacitance: number;
  threshold: Threshold;
  chargeSharing: ChargeSharingResult;
  /** Drop (V) once stack nodes that a secondary precharge keeps charged are counted with the node. */
  chargeSharingDrop: number;
  /** One per keeper of the node, in order. */
  keepers: KeeperRatio[];
  /** Worst-case leakage (A) of the off evaluation network. */
  leakage: number;
}

/** The node's budgets at every deck corner. */
export function dynamicBudgets(d: DynamicNode): CornerBudget[] {
  // Keyed by net number in a map of the context's own: a flat netlist asks for a hundred thousand nodes, several times each.
  const byNode = d.ctx.memo('recognition.budgets', () => new Map<number, CornerBudget[]>());
  const known = byNode.get(d.node);
  if (known) return known;
  const budgets = computeBudgets(d);
  byNode.set(d.node, budgets);
  return budgets;
}

function computeBudgets(d: DynamicNode): CornerBudget[] {
  const hood = neighbourhood(d);
  encodeNeighbourhood(d, hood, hoodKey);
  const table = designMemo(d.ctx.design, d.ctx.deck, 'dynamic-budgets', () => new NumberKeyTable<ElectricalBudget[]>());
  const electrical = table.getOrCompute(hoodKey, () => solve(d, hood));
  const thresholds = receiverThresholds(d);
  // Named field by field: spreading each corner's budget was the costliest line here on a flat netlist (a copy per node and corner).
  return electrical.map(
    (e, i): CornerBudget => ({
      corner: e.corner,
      vdd: e.vdd,
      capacitance: e.capacitance,
      chargeSharing: e.chargeSharing,
      chargeSharingDrop: e.chargeSharingDrop,
      keepers: e.keepers,
      leakage: e.leakage,
      threshold: thresholds[i],
    }),
  );
}

/** The node's stage, every device with a terminal on the node or on a stack node of its stage, and the capacitors there. */
interface Neighbourhood {
  /** The context's devices, and the index there of each device of the neighbourhood. */
  cellMosfets: Cell['mosfets'];
  mosSource: number[];
  others: Cell['others'];
  /** The stage's elements, indexing `mosfets` and `others`. */
  elements: ElementRef[];
  /** Stack nodes a secondary precharge device holds at the node's precharge level. */
  precharged: Set<number>;
  /** Role of a net in the signature: P supply, G ground, N the node, then 0, 1, … in order of first sight. */
  role(net: number): number;
}

const ROLE_POWER = -1;
const ROLE_GROUND = -2;
const ROLE_NODE = -3;
const hoodKey = new NumberKey();
const KEEPER_CODES: Record<Keeper['kind'], number> = { half: 0, full: 1, 'always-on': 2 };

function neighbourhood(d: DynamicNode): Neighbourhood {
  const { ctx, stage } = d;
  const index = cellIndex(ctx);
  const cell = ctx.cell;
  const mosMap = new Map<number, number>();
  const otherMap = new Map<number, number>();
  const mosSource: number[] = [];
  const others: Cell['others'] = [];
  const addMos = (i: number) => {
    if (!mosMap.has(i)) {
      mosMap.set(i, mosSource.length);
      mosSource.push(i);
    }
  };
  const addOther = (i: number) => {
    if (!otherMap.has(i)) {
      otherMap.set(i, others.length);
      others.push(cell.others[i]);
    }
  };
  for (const el of stage.elements) (isMosElement(el) ? addMos : addOther)(elementIndex(el));
  const gather = (x: number) => {
    const channel = index.channel.of(x);
    for (let k = 0; k < channel.length; k++) addMos(channel[k]);
    const gates = index.gates.of(x);
    for (let k = 0; k < gates.length; k++) addMos(gates[k]);
    const os = index.others.of(x);
    for (let k = 0; k < os.length; k++) if (cell.others[os[k]].kind === 'cap') addOther(os[k]);
  };
  gather(d.node);
  for (const x of stage.internal) gather(x);
  const elements: StageElement[] = stage.elements.map((el) => (isMosElement(el) ? mosElement(mosMap.get(el)!) : resistorElement(otherMap.get(elementIndex(el))!)));
  const alias = index.alias;
  const roles = new Map<number, number>();
  const role = (net: number): number => {
    if (net < 0) return net === -1 ? ROLE_POWER : ROLE_GROUND;
    const x = alias[net];
    const r = index.railOf(x);
    if (r) return r === 'power' ? ROLE_POWER : ROLE_GROUND;
    if (x === d.node) return ROLE_NODE;
    let v = roles.get(x);
    if (v === undefined) roles.set(x, (v = roles.size));
    return v;
  };
  const precharged = new Set<number>();
  for (const a of stage.auxiliary) {
    if ((a.rail === 'power') === (d.style === 'n-evaluate')) precharged.add(alias[a.node]);
  }
  return { cellMosfets: cell.mosfets, mosSource, others, elements, precharged, role };
}

/**
 * Structural signature of a neighbourhood: the style, each device (polarity, W, L, multiplier, model and the roles of
 * its nets), capacitors and resistors, the shapes of the evaluation network and the keepers, the footers and the
 * precharged stack nodes. Every list is preceded by its length, so that no two neighbourhoods share a key.
 */
function encodeNeighbourhood(d: DynamicNode, hood: Neighbourhood, key: NumberKey): void {
  const { cellMosfets: mos, mosSource, others, elements, role } = hood;
  key.reset();
  key.push(d.style === 'n-evaluate' ? 0 : 1);
  key.push(mosSource.length);
  for (const i of mosSource) {
    key.push(mos.isN(i) ? 0 : 1);
    key.push(mos.w[i]);
    key.push(mos.l[i]);
    key.push(mos.m[i]);
    key.push(modelCode(mos.models[i]));
    key.push(role(mos.drain[i]));
    key.push(role(mos.gate[i]));
    key.push(role(mos.source[i]));
    key.push(role(mos.bulk[i]));
  }
  let passive = 0;
  for (const o of others) if (o.kind === 'cap' || o.kind === 'res') passive++;
  key.push(passive);
  for (const o of others) {
    if (o.kind !== 'cap' && o.kind !== 'res') continue;
    key.push(o.kind === 'cap' ? 0 : 1);
    key.push(o.value);
    key.push(role(o.a));
    key.push(role(o.b));
  }
  const shape = (n: Network): void => {
    if (n.kind === 'leaf') {
      key.push(0);
      key.push(isMosElement(elements[n.element]) ? 0 : 1);
      key.push(elementIndex(elements[n.element]));
      return;
    }
    key.push(n.kind === 'series' ? 1 : 2);
    key.push(n.children.length);
    for (const c of n.children) shape(c);
  };
  shape(d.evaluation);
  key.push(d.keepers.length);
  for (const k of d.keepers) {
    key.push(KEEPER_CODES[k.kind]);
    shape(k.network);
  }
  key.push(d.footers.length);
  for (const e of d.footers) key.push(elementIndex(elements[e]));
  key.push(hood.precharged.size);
  for (const x of hood.precharged) key.push(role(x));
}

/** The neighbourhood as a small cell of its own: the node's nets, and only its devices. */
function neighbourhoodCell(cell: Cell, hood: Neighbourhood): Cell {
  return { ...cell, mosfets: hood.cellMosfets.subset(hood.mosSource), others: hood.others };
}

/** Per keeper: the devices and shapes of the keeper and of the evaluation network, all that its ratio depends on. */
function keeperSignatures(d: DynamicNode, hood: Neighbourhood): string[] {
  const { cellMosfets: mos, mosSource, elements, role } = hood;
  const deviceOf = (n: Network): string => {
    if (n.kind !== 'leaf') return `${n.kind[0]}(${n.children.map(deviceOf).join(' ')})`;
    const el = elements[n.element];
    if (!isMosElement(el)) return 'r';
    const i = mosSource[el];
    return `${mos.polarityOf(i)}${mos.w[i]},${mos.l[i]},${mos.m[i]},${lowerCaseModel(mos.models[i])},${role(mos.bulk[i])}`;
  };
  const evalSig = deviceOf(d.evaluation);
  return d.keepers.map((k) => `${d.style}|${deviceOf(k.network)}|${evalSig}`);
}

/**
 * Level of each footer's gate during evaluation (true: high): on, as the stage is meant to work. A footer on the wrong
 * phase is dynamic.phase-mismatch's finding; charge sharing is judged for the stage as intended.
 */
function footerLevels(d: DynamicNode): boolean[] {
  return d.footers.map(() => d.style === 'n-evaluate');
}

type ElectricalBudget = Omit<CornerBudget, 'threshold'>;

function solve(d: DynamicNode, hood: Neighbourhood): ElectricalBudget[] {
  const { ctx } = d;
  const cell = neighbourhoodCell(ctx.cell, hood);
  const keeperKeys = keeperSignatures(d, hood);
  const index = cellIndex(ctx);
  const railOf = (net: number): RailKind | undefined => index.railOf(net);
  const held = new Map<number, boolean>();
  const levels = footerLevels(d);
  d.footers.forEach((e, i) => {
    const el = d.stage.elements[e];
    held.set(index.alias[ctx.cell.mosfets.gate[el]], levels[i]);
  });
  return ctx.deck.corners.map((corner) => {
    const base = { cell, corner, elements: hood.elements, railOf, alias: index.alias };
    const capacitance = nodeCapacitance(cell, d.node, corner, index.alias).total;
    const chargeSharing = worstChargeSharing({ ...base, node: d.node, network: d.evaluation, held });
    let drop = chargeSharing.drop;
    if (hood.precharged.size) {
      let cPre = 0;
      for (const x of chargeSharing.sharedNets) if (hood.precharged.has(x)) cPre += nodeCapacitance(cell, x, corner, index.alias).total;
      const cDischarged = Math.max(chargeSharing.cShared - cPre, 0);
      const total = capacitance + cPre + cDischarged;
      drop = total > 0 ? (corner.vdd * cDischarged) / total : 0;
    }
    const drive = { ...base, models: ctx.design.models, useNetlistModels: ctx.deck.useNetlistModels };
    // The keeper's strength depends only on the keeper and the evaluation devices: memoised on those alone.
    const keepers = d.keepers.map((k, i) =>
      designMemo(ctx.design, ctx.deck, `keeper-ratio|${corner.name}|${keeperKeys[i]}`, () => keeperRatio(drive, k.network, d.evaluation)),
    );
    const leakage = networkLeakage(base, d.evaluation);
    return { corner: corner.name, vdd: corner.vdd, capacitance, chargeSharing, chargeSharingDrop: drop, keepers, leakage };
  });
}

/** Threshold of the most sensitive static receiver of the node, per corner. Only the receivers are analysed (memoised by signature). */
export function receiverThresholds(d: DynamicNode): Threshold[] {
  const high = d.style === 'n-evaluate';
  const env = d.receivers.length ? stageEnvironmentOf(d.ctx) : null;
  const inputs = env ? d.receivers.map((r) => analyseStage(env, r).input(d.node)) : [];
  return d.ctx.deck.corners.map((corner, ci) => {
    let best: Threshold | null = null;
    inputs.forEach((inp, i) => {
      const c = inp?.corners[ci];
      if (!c) return;
      for (const x of c.cases) {
        const v = high ? x.result.vih : x.result.vil;
        if (v === null) continue;
        if (!best || (high ? v > best.value : v < best.value)) best = { value: v, source: 'receiver', stage: d.receivers[i].id };
      }
    });
    return best ?? { value: corner.vdd / 2, source: 'assumed', stage: null };
  });
}

/** Capacitance of any net of a context (junctions, gates, capacitors counted as grounded), from the context's index. */
export function netCapacitance(ctx: CellContext, net: number, corner: Corner): number {
  const index = cellIndex(ctx);
  const cell = ctx.cell;
  const x = index.alias[net];
  let c = 0;
  const mos = cell.mosfets;
  for (const i of index.channel.of(x)) c += (mos.isN(i) ? corner.nmos : corner.pmos).cjPerUm * mos.w[i] * mos.m[i] * 1e6;
  for (const i of index.gates.of(x)) c += (mos.isN(i) ? corner.nmos : corner.pmos).cgPerUm * mos.w[i] * mos.m[i] * 1e6;
  for (const i of index.others.of(x)) {
    const o = cell.others[i];
    if (o.kind === 'cap' && index.alias[o.a] !== index.alias[o.b]) c += o.value;
  }
  return c;
}

/** Capacitance of a net including what it reaches inside child instances, at any depth (memoised per child port). */
export function hierarchicalCapacitance(ctx: CellContext, net: number, corner: Corner): number {
  const index = cellIndex(ctx);
  const x = index.alias[net];
  let c = netCapacitance(ctx, x, corner);
  const insts = index.pinInstances.of(x);
  const ports = index.pinPorts.of(x);
  for (let k = 0; k < insts.length; k++) {
    const inst = ctx.cell.instances[insts[k]];
    const child = childContext(ctx.design, ctx.deck, inst.cell, inst.pins.map((p) => ctx.rails[p]));
    if (!child) continue;
    const port = ports[k];
    c += child.memo(`recognition.port-capacitance.${port}.${corner.name}`, () => hierarchicalCapacitance(child, child.cell.ports[port], corner));
  }
  return c;
}

/** Zero-bias threshold magnitude of a device at a corner, from its `.model` card when the deck reads them. */
export function thresholdOf(ctx: CellContext, polarity: 'n' | 'p', model: string, corner: Corner): number {
  const resolver = designMemo(ctx.design, ctx.deck, `resolver|${corner.name}`, () => new ModelResolver(corner, ctx.design.models, ctx.deck.useNetlistModels));
  return resolver.get(polarity, model).model.vt0;
}
