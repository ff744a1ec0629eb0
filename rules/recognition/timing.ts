// Clock tracing: which nets carry a clock, of which phase and polarity, and which
// levels other nets are known to have in each half of a clock's period.
//
// Every traced net gets a timing: a phase (a clock root) and its level while that
// root is low and while it is high, each 0, 1 or unknown. A root clock is (0, 1), its
// inverted copy (1, 0). Timings flow forward through static stages by three-valued
// evaluation of the stage's logic: an inverter or buffer keeps both levels (a clock
// stays a clock, polarity flipping per inversion), a NAND with a clock input is known
// only in the half where the clock decides it (a gated clock, here (1, ?)). A dynamic
// node takes its precharge level in the half its precharge device conducts, (1, ?)
// for a node precharged while the clock is low, and its inverted output (0, ?): the
// monotonic signal domino logic relies on.
//
// Across the hierarchy, a child's port gets the timing its parent's net has (the
// engine passes timings into children as part of the port context), and a parent
// learns what a child does with a timed input from the child's port relation: the
// child traced on its own with that port as a clock of a placeholder phase, whose
// levels at the other ports the parent maps onto the real phase.
//
// Roots are ports with a timing from the parent, nets driven by a periodic source,
// and nets named by the deck's clock patterns; a named net that turns out to be
// driven by a traced clock stage takes the traced timing. A precharge device whose
// gate no trace reaches still defines a phase of its own (an enable), so that its
// node and its footer can be compared with each other.

import { classifyStage, stageLogic, outputValue, STAGE_CLOCK_HINT_KEY, type ClockHint, type DynamicInfo, type Stage, isMosElement } from '../stages';
import type { StageLogic } from '../stages/classify';
import type { CellContext } from '../types';
import { cellIndex, childContext, pinRails, type CellIndex } from './context';
import { clockNamer, sourcedClocks } from './roots';
import { networkElements, type Network } from '../electrical/network';

/** 0 low, 1 high, 2 unknown. */
export type Level = 0 | 1 | 2;
export const UNKNOWN: Level = 2;

export type TimingKind =
  /** A clock root, or a copy of one through inverters and buffers. */
  | 'clock'
  /** A clock through a gating stage (a NAND or NOR with other inputs). */
  | 'gated'
  /** The gate of a precharge device that no trace reached, standing for a phase of its own. */
  | 'enable'
  /** A precharged (or pre-discharged) node. */
  | 'dynamic'
  /** A signal derived from dynamic nodes through static stages (a domino output). */
  | 'domino';

export interface Timing {
  /** Phase name (a clock root, lower case). */
  phase: string;
  /** Level while the phase's root clock is low. */
  low: Level;
  /** Level while the phase's root clock is high. */
  high: Level;
  kind: TimingKind;
}

export function isClockTiming(t: Timing | undefined): boolean {
  return !!t && (t.kind === 'clock' || t.kind === 'gated');
}

export function timingSignature(t: Timing | undefined): string {
  return t ? `${t.phase}:${t.low}${t.high}${t.kind[0]}` : '';
}

/** `timingSignature(a) === timingSignature(b)`, without building the strings (clock tracing compares on every assignment). */
function sameSignature(a: Timing, b: Timing): boolean {
  return a.phase === b.phase && a.low === b.low && a.high === b.high && a.kind[0] === b.kind[0];
}

export function describeTiming(t: Timing): string {
  const polarity = t.low === 0 && t.high === 1 ? 'true' : t.low === 1 && t.high === 0 ? 'inverted' : null;
  const levels = `${t.low === UNKNOWN ? '?' : t.low} while ${t.phase} is low, ${t.high === UNKNOWN ? '?' : t.high} while high`;
  switch (t.kind) {
    case 'clock':
      return `clock ${t.phase}, ${polarity ?? 'derived'} polarity`;
    case 'gated':
      return `gated clock of ${t.phase} (${levels})`;
    case 'enable':
      return `enable ${t.phase}`;
    case 'dynamic':
      return `dynamic node of phase ${t.phase}`;
    case 'domino':
      return `domino signal of phase ${t.phase} (${levels})`;
  }
}

export interface TimingResult {
  /** Timing of each net (by alias root). */
  timing: (Timing | undefined)[];
  /** Dynamic information of every dynamic stage, including the footless stages recognised here (by stage id). */
  dynamic: Map<number, DynamicInfo>;
  /** Stage ids whose kind tracing changed from clocked to dynamic (footless stages with a traced or enable precharge). */
  refined: number[];
}

const STATIC_EVALUATED: ReadonlySet<Stage['kind']> = new Set(['inverter', 'complementary', 'ratioed', 'clocked']);
const MAX_UNKNOWN_INPUTS = 10;
/** Times a derived timing may be recomputed before it stays as it is (feedback loops). */
const MAX_CHANGES = 3;
/** Placeholder phase of a port relation. */
const RELATION_PHASE = '#';

interface Seed {
  net: number;
  timing: Timing;
  /** A name-only root, which a traced timing replaces. */
  named: boolean;
}

/** The clock hint stage extraction uses: ports the parent says carry a clock, periodic sources and clock names. */
export function clockHint(ctx: CellContext): ClockHint {
  const namer = clockNamer(ctx.deck, ctx.cell);
  const fromPorts = new Set<number>();
  ctx.cell.ports.forEach((net, i) => {
    if (isClockTiming(ctx.signals?.[i])) fromPorts.add(net);
  });
  for (const net of sourcedClocks(ctx.cell, (x) => ctx.rails[x]).keys()) fromPorts.add(net);
  const names = ctx.cell.nets;
  const cache = new Map<number, boolean>();
  return (net) => {
    let hit = cache.get(net);
    if (hit === undefined) {
      hit = fromPorts.has(net) || (!ctx.rails[net] && namer(names[net] ?? '') !== null);
      cache.set(net, hit);
    }
    return hit;
  };
}

/** Sets the stage clock hint of an engine context before its stages are first extracted. */
export function primeClockHint(ctx: CellContext): void {
  ctx.memo<ClockHint>(STAGE_CLOCK_HINT_KEY, () => clockHint(ctx));
}

/** Timings of an engine context; stages recognised as dynamic here are updated in place, before any analysis reads them. */
export function timingOf(ctx: CellContext): TimingResult {
  return ctx.memo('recognition.timing', () => {
    const index = cellIndex(ctx);
    const seeds: Seed[] = [];
    const alias = index.alias;
    ctx.cell.ports.forEach((net, i) => {
      const t = ctx.signals?.[i];
      if (t) seeds.push({ net: alias[net], timing: t, named: false });
    });
    for (const [net, phase] of sourcedClocks(ctx.cell, (x) => ctx.rails[x])) {
      seeds.push({ net: alias[net], timing: { phase, low: 0, high: 1, kind: 'clock' }, named: false });
    }
    const namer = clockNamer(ctx.deck, ctx.cell);
    const first = rootInitials(ctx);
    const names = ctx.cell.nets;
    for (let net = 0; net < names.length; net++) {
      if (alias[net] !== net) continue;
      const name = names[net];
      if (first && !first[(name.charCodeAt(0) | 0x20) & 0xffff]) continue;
      if (index.railOf(net)) continue;
      if (index.gates.count(net) === 0 && index.pinInstances.count(net) === 0 && !index.isPort[net]) continue;
      const root = namer(name);
      if (root) seeds.push({ net, timing: { phase: root.phase, low: root.inverted ? 1 : 0, high: root.inverted ? 0 : 1, kind: 'clock' }, named: true });
    }
    const result = propagate(ctx, index, seeds, false);
    // Copies replace the refined stages in this context's own list (another context may share the originals).
    for (const id of result.refined) {
      index.stages.stages[id] = { ...index.stages.stages[id], kind: 'dynamic', dynamic: result.dynamic.get(id)! };
    }
    return result;
  });
}

/** Lower-case first characters (as a table by UTF-16 unit) every clock-root pattern must start with, or null when some pattern starts with a wildcard. */
function rootInitials(ctx: CellContext): Uint8Array | null {
  const table = new Uint8Array(0x10000);
  for (const r of ctx.deck.clocks.roots) {
    if (r.pattern[0] === '*' || r.pattern[0] === '?') return null;
    table[(r.pattern.charCodeAt(0) | 0x20) & 0xffff] = 1;
  }
  return table;
}

/**
 * What a child does with a timed input: the child traced with port `port` as a clock of a placeholder phase.
 * Returns, per port of the child, its timing relative to that input (low: level when the input is low).
 */
export function portRelation(ctx: CellContext, instance: number, port: number): (Timing | undefined)[] {
  const inst = ctx.cell.instances[instance];
  const child = childContext(ctx.design, ctx.deck, inst.cell, pinRails(ctx, inst.pins));
  if (!child) return [];
  return child.memo(`recognition.relation.${port}`, () => {
    const index = cellIndex(child);
    const net = index.alias[child.cell.ports[port]];
    if (index.railOf(net)) return [];
    const r = propagate(child, index, [{ net, timing: { phase: RELATION_PHASE, low: 0, high: 1, kind: 'clock' }, named: false }], true);
    return child.cell.ports.map((p, j) => (j === port ? undefined : r.timing[index.alias[p]]?.phase === RELATION_PHASE ? r.timing[index.alias[p]] : undefined));
  });
}

/** The timing a parent net gets from a child port, given the child's relation and the timing of the input pin. */
export function composeRelation(input: Timing, relation: Timing): Timing | undefined {
  const map = (v: Level): Level => (v === 0 ? relation.low : v === 1 ? relation.high : UNKNOWN);
  const low = map(input.low);
  const high = map(input.high);
  if ((low === UNKNOWN && high === UNKNOWN) || (low === high && low !== UNKNOWN)) return undefined;
  let kind: TimingKind;
  if (relation.kind === 'dynamic') kind = 'dynamic';
  else if (relation.kind === 'domino' || input.kind === 'dynamic' || input.kind === 'domino') kind = 'domino';
  else if (input.kind === 'enable') kind = 'enable';
  else if (relation.kind === 'gated' || input.kind === 'gated') kind = 'gated';
  else kind = 'clock';
  return { phase: input.phase, low, high, kind };
}

function propagate(ctx: CellContext, index: CellIndex, seeds: readonly Seed[], summary: boolean): TimingResult {
  const cell = ctx.cell;
  const stages = index.stages.stages;
  const n = cell.nets.length;
  const timing: (Timing | undefined)[] = new Array(n);
  const named = new Uint8Array(n);
  const dynamic = new Map<number, DynamicInfo>();
  // The same by stage id, for the lookup on every visit of a stage.
  const dynamicOf: (DynamicInfo | undefined)[] = new Array(stages.length);
  const setDynamic = (id: number, info: DynamicInfo) => {
    dynamic.set(id, info);
    dynamicOf[id] = info;
  };
  const refined: number[] = [];
  for (const s of stages) {
    if (s.kind !== 'dynamic' || !s.dynamic || s.output === null) continue;
    // Classification takes the first precharge-side device that shares its gate with the evaluation side; a full
    // keeper (fed back from the node's inverter to both sides) looks like that too. The precharge is then another one.
    const info = drivenFromNode(index, s.dynamic.clock, s.output) ? reselectPrecharge(ctx, index, s) : s.dynamic;
    if (!info) continue;
    setDynamic(s.id, info);
    if (info !== s.dynamic) refined.push(s.id);
  }
  const logics = new Map<number, StageLogic>();
  const logicOf = (s: Stage) => {
    let l = logics.get(s.id);
    if (!l) logics.set(s.id, (l = stageLogic(s, cell, index.railOf, index.alias)));
    return l;
  };
  let queue: number[] = [];
  for (const seed of seeds) {
    if (timing[seed.net] && !named[seed.net]) continue;
    timing[seed.net] = seed.timing;
    named[seed.net] = seed.named ? 1 : 0;
    queue.push(seed.net);
  }

  // A derived timing replaces a name-only root, and a derived timing is recomputed when its inputs change (a root that
  // a trace replaced, say), a bounded number of times so that feedback loops settle.
  const hard = new Uint8Array(n);
  const changes = new Uint8Array(n);
  for (const seed of seeds) if (!seed.named) hard[seed.net] = 1;
  const assign = (net: number, t: Timing | undefined) => {
    if (!t || index.railOf(net) || hard[net]) return;
    const old = timing[net];
    if (old && sameSignature(old, t)) {
      named[net] = 0;
      return;
    }
    if (old && !named[net] && changes[net] >= MAX_CHANGES) return;
    if (old) changes[net]++;
    timing[net] = t;
    named[net] = 0;
    queue.push(net);
  };

  const nodeTiming = (info: DynamicInfo, gate: Timing): Timing | undefined => {
    // The precharge device conducts where its gate is low (p-channel) or high (n-channel pre-discharge).
    const on: Level = info.style === 'n-evaluate' ? 0 : 1;
    const level: Level = info.style === 'n-evaluate' ? 1 : 0;
    const low = gate.low === on ? level : UNKNOWN;
    const high = gate.high === on ? level : UNKNOWN;
    if (low === UNKNOWN && high === UNKNOWN) return undefined;
    return { phase: gate.phase, low, high, kind: 'dynamic' };
  };

  const visitStage = (s: Stage, from: number) => {
    const t = timing[from]!;
    const info = dynamicOf[s.id];
    if (info) {
      if (info.clock === from && s.output !== null) assign(s.output, nodeTiming(info, t));
      return;
    }
    if (s.kind === 'clocked' && s.output !== null && (isClockTiming(t) || t.kind === 'enable')) {
      const found = footlessDynamic(ctx, index, s, from);
      if (found) {
        setDynamic(s.id, found);
        refined.push(s.id);
        assign(s.output, nodeTiming(found, t));
        return;
      }
    }
    if (!STATIC_EVALUATED.has(s.kind) || s.output === null) return;
    if (s.kind === 'inverter') {
      // One input, one complementary pair: the complement, kind kept (a clock stays a clock).
      const flip = (v: Level): Level => (v === UNKNOWN ? UNKNOWN : v === 0 ? 1 : 0);
      const kind = t.kind === 'dynamic' ? 'domino' : t.kind;
      assign(s.output, { phase: t.phase, low: flip(t.low), high: flip(t.high), kind });
      return;
    }
    assign(s.output, evaluateStatic(s, logicOf(s), timing, t.phase));
  };

  // Whether anything here besides pin `pin` of instance `instance` touches the net: a device, another pin (of another
  // instance or of the same one) or, in a relation summary, a port.
  const usedBesides = (net: number, instance: number, pin: number) => {
    if (index.gates.count(net) > 0 || index.channel.count(net) > 0 || index.others.count(net) > 0) return true;
    if (summary && index.isPort[net]) return true;
    const insts = index.pinInstances.of(net);
    const ports = index.pinPorts.of(net);
    for (let k = 0; k < insts.length; k++) if (insts[k] !== instance || ports[k] !== pin) return true;
    return false;
  };

  const visitPins = (net: number) => {
    const insts = index.pinInstances.of(net);
    const ports = index.pinPorts.of(net);
    for (let k = 0; k < insts.length; k++) {
      const inst = cell.instances[insts[k]];
      // Only ask the child when the net of some other pin is used here besides that pin: the relation costs a trace of
      // the whole child, and a net that only the child touches learns nothing here that the child's own trace lacks.
      let wanted = false;
      for (let j = 0; j < inst.pins.length && !wanted; j++) {
        const m = index.alias[inst.pins[j]];
        if (j !== ports[k] && m !== net && !index.railOf(m) && (!timing[m] || named[m]) && usedBesides(m, insts[k], j)) wanted = true;
      }
      if (!wanted) continue;
      const relation = portRelation(ctx, insts[k], ports[k]);
      relation.forEach((r, j) => {
        if (!r) return;
        const m = index.alias[inst.pins[j]];
        if (m !== net) assign(m, composeRelation(timing[net]!, r));
      });
    }
  };

  const drain = () => {
    while (queue.length) {
      const batch = queue;
      queue = [];
      for (const net of batch) {
        const users = index.inputOf.of(net);
        for (let k = 0; k < users.length; k++) visitStage(stages[users[k]], net);
        if (index.pinInstances.count(net)) visitPins(net);
      }
    }
  };
  drain();

  // Precharge gates no trace reached define a phase of their own; footless stages gated by such an enable are dynamic too.
  if (!summary) {
    for (const s of stages) {
      if (s.output === null) continue;
      let info = dynamicOf[s.id];
      if (!info && s.kind === 'clocked') {
        for (const g of s.inputs) {
          if (timing[g]) continue;
          const found = footlessDynamic(ctx, index, s, g);
          if (found) {
            info = found;
            setDynamic(s.id, found);
            refined.push(s.id);
            break;
          }
        }
      }
      if (!info || timing[info.clock]) continue;
      timing[info.clock] = { phase: cell.nets[info.clock].toLowerCase(), low: 0, high: 1, kind: 'enable' };
      queue.push(info.clock);
    }
    drain();
  }
  return { timing, dynamic, refined };
}

/** Three-valued evaluation of a static stage in each half of `phase`. */
function evaluateStatic(s: Stage, logic: StageLogic, timing: readonly (Timing | undefined)[], phase: string): Timing | undefined {
  const k = s.inputs.length;
  if (k > 30) return undefined;
  let anyDynamic = false;
  let anyEnable = false;
  let allClock = true;
  for (const x of s.inputs) {
    const t = timing[x];
    if (!t || t.phase !== phase) continue;
    if (t.kind === 'dynamic' || t.kind === 'domino') anyDynamic = true;
    else if (t.kind === 'enable') anyEnable = true;
    if (t.kind !== 'clock') allClock = false;
  }
  const levels: Level[] = [UNKNOWN, UNKNOWN];
  for (let half = 0; half < 2; half++) {
    let fixed = 0;
    const free: number[] = [];
    for (let i = 0; i < k; i++) {
      const t = timing[s.inputs[i]];
      const v = t && t.phase === phase ? (half === 0 ? t.low : t.high) : UNKNOWN;
      if (v === UNKNOWN) free.push(i);
      else if (v === 1) fixed |= 1 << i;
    }
    if (free.length > MAX_UNKNOWN_INPUTS) continue;
    let seen = 0;
    for (let m = 0; m < 1 << free.length && seen !== 3; m++) {
      let mask = fixed;
      for (let b = 0; b < free.length; b++) if ((m >> b) & 1) mask |= 1 << free[b];
      const v = outputValue(s, logic, mask);
      seen |= v === 0 ? 1 : v === 1 ? 2 : 3;
    }
    levels[half] = seen === 1 ? 0 : seen === 2 ? 1 : UNKNOWN;
  }
  const [low, high] = levels;
  if ((low === UNKNOWN && high === UNKNOWN) || (low === high && low !== UNKNOWN)) return undefined;
  const kind: TimingKind = anyDynamic ? 'domino' : anyEnable ? 'enable' : allClock && low !== UNKNOWN && high !== UNKNOWN && k === 1 ? 'clock' : 'gated';
  return { phase, low, high, kind };
}

/**
 * A clocked stage that is a footless dynamic stage with `gate` as its precharge: classified again with `gate` as the clock,
 * and accepted only when its precharge-side network holds nothing but the precharge device and keepers (always-on, or gated
 * by a stage that the node itself drives), and its evaluation network has devices of one polarity only.
 */
function footlessDynamic(ctx: CellContext, index: CellIndex, s: Stage, gate: number): DynamicInfo | null {
  const copy: Stage = { ...s, kind: 'other', dynamic: null, notes: [] };
  classifyStage(copy, ctx.cell, index.railOf, (x) => x === gate, index.alias);
  if (copy.kind !== 'dynamic' || !copy.dynamic || copy.dynamic.clock !== gate) return null;
  const info = copy.dynamic;
  const node = s.output!;
  // A precharge gate that the node itself drives is feedback (a cross-coupled pair, a latch), not a clock or an enable.
  if (drivenFromNode(index, gate, node)) return null;
  const pre = info.style === 'n-evaluate' ? s.pullUp! : s.pullDown!;
  const evaluation = info.style === 'n-evaluate' ? s.pullDown! : s.pullUp!;
  const prePolarity = info.style === 'n-evaluate' ? 'p' : 'n';
  const evalPolarity = info.style === 'n-evaluate' ? 'n' : 'p';
  const cell = ctx.cell;
  const polarityOf = (e: number) => (isMosElement(s.elements[e]) ? cell.mosfets.polarityOf(s.elements[e]) : 'r');
  for (const e of networkElements(evaluation)) {
    if (polarityOf(e) !== evalPolarity) return null;
    if (drivenFromNode(index, index.alias[cell.mosfets.gate[s.elements[e]]], node)) return null;
  }
  const branches: Network[] = pre.kind === 'parallel' ? pre.children : [pre];
  for (const b of branches) {
    if (b.kind === 'leaf' && info.precharge.includes(b.element)) continue;
    for (const e of networkElements(b)) {
      if (polarityOf(e) !== prePolarity) return null;
      const g = index.alias[cell.mosfets.gate[s.elements[e]]];
      if (index.railOf(g) || g === s.output) continue;
      if (!drivenFromNode(index, g, s.output!)) return null;
    }
  }
  return info;
}

/** A dynamic stage's precharge chosen among the direct precharge-side devices whose gate the node does not drive. */
function reselectPrecharge(ctx: CellContext, index: CellIndex, s: Stage): DynamicInfo | null {
  const old = s.dynamic!;
  const nEval = old.style === 'n-evaluate';
  const pre = nEval ? s.pullUp! : s.pullDown!;
  const evaluation = nEval ? s.pullDown! : s.pullUp!;
  const gateOf = (e: number) => (isMosElement(s.elements[e]) ? index.alias[ctx.cell.mosfets.gate[s.elements[e]]] : -1);
  const direct = pre.kind === 'leaf' ? [pre.element] : pre.kind === 'parallel' ? pre.children.filter((c) => c.kind === 'leaf').map((c) => (c as { element: number }).element) : [];
  for (const e of direct) {
    const g = gateOf(e);
    if (g < 0 || index.railOf(g) || drivenFromNode(index, g, s.output!)) continue;
    if (ctx.cell.mosfets.isN(s.elements[e]) === nEval) continue;
    return {
      style: old.style,
      clock: g,
      precharge: direct.filter((x) => gateOf(x) === g),
      footer: networkElements(evaluation).filter((x) => gateOf(x) === g),
      clockByName: false,
    };
  }
  return null;
}

/** Whether `net` is the output of a stage that has `node` among its inputs (the feedback a keeper's gate takes). */
export function drivenFromNode(index: CellIndex, net: number, node: number): boolean {
  const d = index.stages.driverOf.get(net);
  if (d === undefined) return false;
  return index.stages.stages[d].inputs.includes(node);
}
