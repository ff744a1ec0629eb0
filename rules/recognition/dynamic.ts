// Dynamic (precharged) nodes, their keepers, footers, evaluation inputs and loads.
//
// A dynamic node is the output of a stage that stage classification (or clock
// tracing, for footless stages) calls dynamic: a precharge device next to the node,
// gated by a clock or, failing a trace, by an enable, with the rest of the
// precharge side made only of keepers, and an evaluation network of the other device
// type. The mirrored form (an n-channel pre-discharge and a p-channel evaluation
// network) is handled alike. Keepers are the other branches of the precharge side:
//  - half keeper: gated by a stage the node itself drives (the usual output inverter);
//  - full keeper: a half keeper whose gate also drives a device of the evaluation type
//    from the node to the other rail (a cross-coupled inverter pair, which holds both levels);
//  - always-on: a weak device with its gate on the rail that turns it on.
// Evaluation devices gated by a clock are footers; the rest are evaluation inputs.
//
// A node that reaches into child instances is judged where it is local, on the
// synthetic cell of its hierarchical region (region.ts); a node that is a port of a
// cell with parents is left to the parents.

import type { Cell, SourceLoc } from '../../grammar/design';
import type { Network } from '../electrical/network';
import { networkElements } from '../electrical/network';
import type { DynamicInfo, Stage } from '../stages';
import type { CellContext } from '../types';
import { cellIndex, portsAreLocal, RESTORING_KINDS, type CellIndex } from './context';
import { buildRegion, channelPorts, prechargePorts, REGION_DRIVEN_KEY } from './region';
import { drivenFromNode, isClockTiming, portRelation, timingOf, UNKNOWN, type Level, type Timing } from './timing';
import { deviceName, isMosElement, elementIndex, resistorElement } from '../stages';

export type KeeperKind = 'half' | 'full' | 'always-on';

export interface Keeper {
  kind: KeeperKind;
  /** The keeper's branch of the precharge-side network, from the node to the rail. */
  network: Network;
  /** The full keeper's other half (evaluation type, node to the other rail). */
  partner: Network | null;
  /** Gate net of the feedback (null for always-on). */
  gate: number | null;
}

export type LoadKind =
  /** Gate of a restoring (static or clocked) stage. */
  | 'static-gate'
  /** Evaluation input of a dynamic stage. */
  | 'evaluation'
  /** Gate of a pass device or transmission gate. */
  | 'pass-gate'
  /** A device channel or resistor outside the node's own stage (a pass device, a diffusion). */
  | 'diffusion'
  /** Gate of a device in no recognised stage. */
  | 'other-gate'
  /** The node leaves the design through a port of a root cell. */
  | 'port';

export interface Load {
  kind: LoadKind;
  /** Device names (as the context names them). */
  device: string;
  stage: number | null;
}

export interface DynamicNode {
  /** Context holding the node's devices: the engine's, or the synthetic context of a hierarchical region. */
  ctx: CellContext;
  /** The node's name in the engine's cell. */
  name: string;
  node: number;
  stage: Stage;
  style: DynamicInfo['style'];
  /** Precharge gate net. */
  clock: number;
  /** `stage.elements` indices of the precharge devices. */
  precharge: number[];
  /** Evaluation-network elements gated by a clock (the precharge's own clock or another). */
  footers: number[];
  /** The evaluation network (a full keeper's partner removed), node (a) to rail (b). */
  evaluation: Network;
  /** Gate nets of evaluation devices other than footers. */
  inputs: number[];
  keepers: Keeper[];
  /** Elements on the precharge side that are neither precharge nor keeper (the node is then reported with a note only). */
  unknown: number[];
  nodeTiming: Timing | undefined;
  clockTiming: Timing | undefined;
  /** Levels the precharge device conducts in: the half of the clock's period the node precharges in (0: clock low, 1: high), null when unknown. */
  prechargeHalf: 0 | 1 | null;
  /** Where findings on the node point: its precharge device's line. */
  anchor: SourceLoc;
  /** Stages with the node among their inputs. */
  receivers: Stage[];
  loads: Load[];
  /** Instance paths when the node was gathered across the hierarchy. */
  paths: string[];
  /** The engine's context the node is judged in, and the net of that context a net of `ctx` stands for (itself, for a local node). */
  host: { ctx: CellContext; net(net: number): number | undefined };
}

export function elementName(cell: Cell, stage: Stage, element: number): string {
  return deviceName(cell, stage.elements[element]);
}

export function elementLoc(cell: Cell, stage: Stage, element: number): SourceLoc {
  const el = stage.elements[element];
  return isMosElement(el) ? cell.mosfets.loc(el) : cell.others[elementIndex(el)].loc;
}

/** Every dynamic node judged in this context (local ones, and those gathered across child instances). */
export function dynamicNodesOf(ctx: CellContext): DynamicNode[] {
  return ctx.memo('recognition.dynamic', () => {
    const timing = timingOf(ctx);
    const index = cellIndex(ctx);
    const local = portsAreLocal(ctx);
    const out: DynamicNode[] = [];
    const viaRegion = new Set<number>();
    const cell = ctx.cell;
    if (cell.instances.length) {
      // What the children do with each local net: reach a device channel, or could precharge it (one look per instance).
      const childChannel = new Uint8Array(cell.nets.length);
      const childPrecharge = new Uint8Array(cell.nets.length);
      cell.instances.forEach((inst, k) => {
        const channel = channelPorts(ctx, k);
        let any = false;
        inst.pins.forEach((p, j) => {
          if (channel[j]) {
            childChannel[index.alias[p]] = 1;
            any = true;
          }
        });
        if (!any) return;
        const precharge = prechargePorts(ctx, k);
        inst.pins.forEach((p, j) => {
          if (precharge[j]) childPrecharge[index.alias[p]] = 1;
        });
      });
      const seen = new Set<number>();
      for (const inst of cell.instances) {
        for (const p of inst.pins) {
          const net = index.alias[p];
          if (seen.has(net) || index.railOf(net) || (!local && index.isPort[net])) continue;
          seen.add(net);
          if (!regionCandidate(ctx, index, net, timing.dynamic, childChannel[net] === 1, childPrecharge[net] === 1)) continue;
          const region = buildRegion(ctx, net);
          if (!region) continue;
          viaRegion.add(net);
          for (const d of dynamicNodesOf(region.ctx)) {
            if (d.node !== region.node) continue;
            out.push({ ...d, name: cell.nets[net], paths: region.paths, host: { ctx, net: (x) => region.hostNet.get(x) } });
          }
        }
      }
    }
    for (const s of index.stages.stages) {
      const info = timing.dynamic.get(s.id);
      if (!info || s.output === null) continue;
      const node = s.output;
      if (viaRegion.has(node) || (!local && index.isPort[node])) continue;
      const d = recognise(ctx, index, s, info, timing.timing);
      if (d) out.push(d);
    }
    return out;
  });
}

/** A local net tied to child pins is judged as a region when it has a dynamic stage here, or a child could precharge it while no static stage here drives it. */
function regionCandidate(ctx: CellContext, index: CellIndex, net: number, dynamic: Map<number, DynamicInfo>, childChannel: boolean, childPrecharge: boolean): boolean {
  const d = index.stages.driverOf.get(net);
  if (d !== undefined && dynamic.has(d)) return true;
  if (!childChannel) return false;
  if (d !== undefined && RESTORING_KINDS.has(index.stages.stages[d].kind)) return false;
  if (childPrecharge) return true;
  // A precharge device here with the evaluation devices in children.
  const channel = index.channel.of(net);
  for (let k = 0; k < channel.length; k++) {
    const mos = ctx.cell.mosfets;
    const d = channel[k];
    const other = index.alias[mos.drain[d]] === net ? mos.source[d] : mos.drain[d];
    const rail = index.railOf(other);
    if (!index.railOf(mos.gate[d]) && (mos.isN(d) ? rail === 'ground' : rail === 'power')) return true;
  }
  return false;
}

function branchesOf(n: Network): Network[] {
  return n.kind === 'parallel' ? n.children : [n];
}

function recognise(ctx: CellContext, index: CellIndex, s: Stage, info: DynamicInfo, timing: readonly (Timing | undefined)[]): DynamicNode | null {
  const cell = ctx.cell;
  const node = s.output!;
  const nEval = info.style === 'n-evaluate';
  const preSide = nEval ? s.pullUp : s.pullDown;
  const evalSide = nEval ? s.pullDown : s.pullUp;
  if (!preSide || !evalSide || !info.precharge.length) return null;
  const prePolarity = nEval ? 'p' : 'n';
  const onRail = nEval ? 'ground' : 'power';
  const isMos = (e: number) => isMosElement(s.elements[e]);
  const gateOf = (e: number) => (isMos(e) ? index.alias[cell.mosfets.gate[s.elements[e]]] : -1);
  const polarityOf = (e: number) => (isMos(e) ? cell.mosfets.polarityOf(s.elements[e]) : undefined);

  const inverseOfNode = (g: number): boolean => {
    const d = index.stages.driverOf.get(g);
    if (d !== undefined) {
      const st = index.stages.stages[d];
      if ((st.kind === 'inverter' || st.kind === 'complementary') && st.inputs.includes(node)) return true;
    }
    // Driven by a child whose port relation from the node's pin is an inversion.
    const insts = index.pinInstances.of(node);
    const ports = index.pinPorts.of(node);
    for (let k = 0; k < insts.length; k++) {
      const inst = cell.instances[insts[k]];
      const j = inst.pins.findIndex((p) => index.alias[p] === g);
      if (j < 0) continue;
      const r = portRelation(ctx, insts[k], ports[k])[j];
      if (r && r.low === 1 && r.high === 0) return true;
    }
    return false;
  };

  const keepers: Keeper[] = [];
  const unknown: number[] = [];
  const precharge = info.precharge.slice();
  for (const b of branchesOf(preSide)) {
    if (b.kind === 'leaf' && precharge.includes(b.element)) continue;
    const elements = networkElements(b);
    if (elements.some((e) => polarityOf(e) !== prePolarity)) {
      unknown.push(...elements);
      continue;
    }
    // A second device on the precharge clock in parallel is a precharge device too.
    if (b.kind === 'leaf' && gateOf(b.element) === info.clock) {
      precharge.push(b.element);
      continue;
    }
    let kind: KeeperKind | null = null;
    let gate: number | null = null;
    for (const e of elements) {
      const g = gateOf(e);
      const r = index.railOf(g);
      if (r) {
        if (r === onRail && kind === null) kind = 'always-on';
        continue;
      }
      if (g === info.clock) continue; // a clocked keeper branch: the feedback device decides
      if (inverseOfNode(g)) {
        kind = 'half';
        gate = g;
      } else {
        kind = null;
        break;
      }
    }
    if (kind === null) unknown.push(...elements);
    else keepers.push({ kind, network: b, partner: null, gate });
  }

  // Evaluation network: a full keeper's partner branch comes out of it.
  let evaluation: Network = evalSide;
  const evalBranches = branchesOf(evalSide);
  if (evalBranches.length > 1) {
    const kept: Network[] = [];
    for (const b of evalBranches) {
      const keeper = b.kind === 'leaf' ? keepers.find((k) => k.kind === 'half' && k.gate === gateOf(b.element)) : undefined;
      if (keeper) {
        keeper.kind = 'full';
        keeper.partner = b;
      } else kept.push(b);
    }
    if (kept.length === 0) return null;
    evaluation = kept.length === 1 ? kept[0] : { ...evalSide, kind: 'parallel', children: kept } as Network;
  }
  const evalElements = networkElements(evaluation);
  const evalPolarity = nEval ? 'n' : 'p';
  if (evalElements.some((e) => polarityOf(e) !== evalPolarity)) return null;

  const footers: number[] = [];
  const inputs: number[] = [];
  for (const e of evalElements) {
    const g = gateOf(e);
    if (g < 0 || index.railOf(g)) continue;
    if (g === info.clock || isClockTiming(timing[g])) footers.push(e);
    else if (!inputs.includes(g)) inputs.push(g);
  }

  // Feedback from the node into its own precharge or evaluation inputs makes a latch or a cross-coupled pair (a level
  // shifter, a sense amplifier): regenerative, so not a dynamic node.
  if (drivenFromNode(index, info.clock, node) || inputs.some((g) => drivenFromNode(index, g, node))) return null;

  const clockTiming = timing[info.clock];
  const on: Level = nEval ? 0 : 1;
  const prechargeHalf = clockTiming ? (clockTiming.low === on ? 0 : clockTiming.high === on ? 1 : null) : null;

  const receivers: Stage[] = [];
  const users = index.inputOf.of(node);
  for (let k = 0; k < users.length; k++) receivers.push(index.stages.stages[users[k]]);

  const loads: Load[] = [];
  const own = new Set<number>();
  for (const el of s.elements) if (isMosElement(el)) own.add(el);
  const gated = index.gates.of(node);
  for (let k = 0; k < gated.length; k++) {
    const i = gated[k];
    const sid = index.stageOfMos[i];
    const st = sid >= 0 ? index.stages.stages[sid] : null;
    let kind: LoadKind;
    if (!st) kind = 'other-gate';
    else if (st.kind === 'pass') kind = 'pass-gate';
    else if (st.kind === 'dynamic') kind = 'evaluation';
    else if (RESTORING_KINDS.has(st.kind)) kind = 'static-gate';
    else kind = 'other-gate';
    loads.push({ kind, device: cell.mosfets.names[i], stage: sid >= 0 ? sid : null });
  }
  // Channels outside the node's own stage are loads, except devices that conduct only with the precharge (an equalizer
  // between two precharged lines) and devices to a net a restoring stage drives (a conditional evaluation path, such as
  // a bit cell's access device to its storage node).
  const drivenElsewhere = ctx.memo<Set<number>>(REGION_DRIVEN_KEY, () => new Set());
  const channel = index.channel.of(node);
  for (let k = 0; k < channel.length; k++) {
    const i = channel[k];
    if (own.has(i)) continue;
    const mos = cell.mosfets;
    const far = index.alias[mos.drain[i]] === node ? index.alias[mos.source[i]] : index.alias[mos.drain[i]];
    if (index.alias[mos.gate[i]] === info.clock) continue;
    const d = index.stages.driverOf.get(far);
    if ((d !== undefined && RESTORING_KINDS.has(index.stages.stages[d].kind)) || drivenElsewhere.has(far)) continue;
    loads.push({ kind: 'diffusion', device: mos.names[i], stage: index.stageOfMos[i] >= 0 ? index.stageOfMos[i] : null });
  }
  const os = index.others.of(node);
  for (let k = 0; k < os.length; k++) {
    const o = cell.others[os[k]];
    if (o.kind === 'res' && !s.elements.some((el) => el === resistorElement(os[k]))) loads.push({ kind: 'diffusion', device: o.name, stage: null });
  }
  // A port of a real root cell (not of a synthetic region) leaves the design.
  if (index.isPort[node] && ctx.design.cells.get(cell.key) === cell) loads.push({ kind: 'port', device: cell.nets[node], stage: null });

  const first = precharge.slice().sort((x, y) => compareLoc(locOf(cell, s, x), locOf(cell, s, y)))[0];
  return {
    ctx,
    name: cell.nets[node],
    node,
    stage: s,
    style: info.style,
    clock: info.clock,
    precharge,
    footers,
    evaluation,
    inputs,
    keepers,
    unknown,
    nodeTiming: timing[node],
    clockTiming,
    prechargeHalf,
    anchor: locOf(cell, s, first),
    receivers,
    loads,
    paths: [],
    host: { ctx, net: (x) => x },
  };
}

function locOf(cell: Cell, s: Stage, e: number): SourceLoc {
  return elementLoc(cell, s, e);
}

function compareLoc(a: SourceLoc, b: SourceLoc): number {
  return a.file === b.file ? a.line - b.line || a.column - b.column : a.file < b.file ? -1 : 1;
}

/** Level of a timed net in one half of its phase (unknown when the net has no timing of that phase). */
export function levelIn(t: Timing | undefined, phase: string | undefined, half: 0 | 1): Level {
  if (!t || t.phase !== phase) return UNKNOWN;
  return half === 0 ? t.low : t.high;
}
