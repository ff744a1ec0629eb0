// Classifies a driving stage from its networks and the logic they implement.
//
// Written without callbacks on the per-stage path: the server runs under tsx, which
// names every closure it creates, and a flat netlist has hundreds of thousands of stages.

import type { Cell, RailKind } from '../../grammar/design';
import type { Network } from '../electrical/network';
import { networkElements } from '../electrical/network';
import type { Stage } from './stage';
import { isMosElement } from './stage';

/** Beyond this many inputs, truth tables give way to structural checks. */
export const MAX_TRUTH_TABLE_INPUTS = 14;

const ALWAYS = 0;
const NEVER = 1;
const INPUT = 2;

/** Gate state of a stage's elements under assignments of its inputs (bit i of a mask = inputs[i] high). */
export class StageLogic {
  // Plain arrays: a stage has a handful of elements, and small typed arrays cost more to allocate than they save.
  private readonly state: number[];
  private readonly bit: number[];
  private readonly nChannel: number[];
  private readonly tiedToRail: number[];
  /** Gate net of each element (after zero-ohm ties), −1 for resistors. */
  readonly gate: number[];
  /** 'n', 'p' or 'r' per element. */
  readonly polarity: ('n' | 'p' | 'r')[];

  constructor(stage: Stage, cell: Cell, railOf: (net: number) => RailKind | undefined, alias?: Int32Array) {
    this.state = [];
    this.bit = [];
    this.nChannel = [];
    this.tiedToRail = [];
    this.gate = [];
    this.polarity = [];
    this.load(stage, cell, railOf, alias);
  }

  /**
   * Fills the tables for `stage`, index by index from 0, so that a new instance's tables have one entry per element.
   * Classification reloads one instance for every stage and never hands it out: its tables keep the length of the
   * largest stage so far (setting an array's length costs more than the stage's work).
   */
  load(stage: Stage, cell: Cell, railOf: (net: number) => RailKind | undefined, alias?: Int32Array): this {
    const k = stage.elements.length;
    const { state, bit, nChannel, tiedToRail, gate, polarity } = this;
    for (let i = 0; i < k; i++) {
      const el = stage.elements[i];
      bit[i] = 0;
      nChannel[i] = 0;
      tiedToRail[i] = 0;
      if (!isMosElement(el)) {
        state[i] = ALWAYS;
        gate[i] = -1;
        polarity[i] = 'r';
        continue;
      }
      const mos = cell.mosfets;
      const d = el;
      const g = alias ? alias[mos.gate[d]] : mos.gate[d];
      const isN = mos.isN(d);
      gate[i] = g;
      polarity[i] = isN ? 'n' : 'p';
      nChannel[i] = isN ? 1 : 0;
      const r = railOf(g);
      if (r) {
        state[i] = (r === 'power') === isN ? ALWAYS : NEVER;
        tiedToRail[i] = 1;
        continue;
      }
      const b = stage.inputs.indexOf(g);
      // A gate inside the stage (diode connection, feedback from the output) is taken as conducting.
      if (b < 0) state[i] = ALWAYS;
      else {
        state[i] = INPUT;
        bit[i] = b;
      }
    }
    return this;
  }

  on(element: number, mask: number): boolean {
    const s = this.state[element];
    if (s === ALWAYS) return true;
    if (s === NEVER) return false;
    return ((mask >> this.bit[element]) & 1) === 1 ? this.nChannel[element] === 1 : this.nChannel[element] === 0;
  }

  /** Whether the element's gate is one of the stage inputs. */
  inputGated(element: number): boolean {
    return this.state[element] === INPUT;
  }

  /** Whether the element's gate is tied to a rail (a constant input, as when a parent ties a gate high or low). */
  gateTied(element: number): boolean {
    return this.tiedToRail[element] === 1;
  }

  /** Whether the element conducts whatever the inputs are. */
  alwaysOn(element: number): boolean {
    return this.state[element] === ALWAYS;
  }

  allAlwaysOn(elements: readonly number[]): boolean {
    for (const e of elements) if (this.state[e] !== ALWAYS) return false;
    return true;
  }

  anyInputGated(elements: readonly number[]): boolean {
    for (const e of elements) if (this.state[e] === INPUT) return true;
    return false;
  }
}

export function stageLogic(stage: Stage, cell: Cell, railOf: (net: number) => RailKind | undefined, alias?: Int32Array): StageLogic {
  return new StageLogic(stage, cell, railOf, alias);
}

/** Whether a network conducts under one input assignment. */
export function conductsFor(n: Network, logic: StageLogic, mask: number): boolean {
  switch (n.kind) {
    case 'leaf':
      return logic.on(n.element, mask);
    case 'series':
      for (const c of n.children) if (!conductsFor(c, logic, mask)) return false;
      return true;
    case 'parallel':
      for (const c of n.children) if (conductsFor(c, logic, mask)) return true;
      return false;
  }
}

export type OutputValue = 0 | 1 | 'Z' | 'X';

/** Output value for one input assignment; a network of always-on elements is a ratioed load that the other network overrides. */
export function outputValue(stage: Stage, logic: StageLogic, mask: number): OutputValue {
  const pu = stage.pullUp ? conductsFor(stage.pullUp, logic, mask) : false;
  const pd = stage.pullDown ? conductsFor(stage.pullDown, logic, mask) : false;
  if (pu && !pd) return 1;
  if (pd && !pu) return 0;
  if (!pu && !pd) return 'Z';
  if (stage.pullUp && logic.allAlwaysOn(networkElements(stage.pullUp))) return 0;
  if (stage.pullDown && logic.allAlwaysOn(networkElements(stage.pullDown))) return 1;
  return 'X';
}

/** Direct children of a network that are single devices (the precharge position next to the output). */
function directLeaves(n: Network): number[] {
  if (n.kind === 'leaf') return [n.element];
  const out: number[] = [];
  if (n.kind === 'parallel') for (const c of n.children) if (c.kind === 'leaf') out.push(c.element);
  return out;
}

/** Every element of the given polarity and gated by an input or by a rail (a constant). */
function allOf(logic: StageLogic, elements: readonly number[], polarity: 'n' | 'p'): boolean {
  for (const e of elements) if (logic.polarity[e] !== polarity || !(logic.inputGated(e) || logic.gateTied(e))) return false;
  return true;
}

/** The gate tables classification fills for each stage and never keeps (a flat netlist has hundreds of thousands of stages); null while in use, so that a nested call makes its own. */
let idleLogic: StageLogic | null = null;

export function classifyStage(
  stage: Stage,
  cell: Cell,
  railOf: (net: number) => RailKind | undefined,
  isClock: (net: number) => boolean,
  alias?: Int32Array,
): void {
  const { pullUp, pullDown } = stage;
  if (!pullUp || !pullDown) {
    stage.kind = 'other';
    if (!pullUp && !pullDown) stage.notes.push('no series/parallel path to either rail');
    else stage.notes.push(pullUp ? 'drives only towards the supply' : 'drives only towards ground');
    return;
  }
  const logic = idleLogic ? idleLogic.load(stage, cell, railOf, alias) : new StageLogic(stage, cell, railOf, alias);
  idleLogic = null;
  classifyNetworks(stage, pullUp, pullDown, logic, networkElements(pullUp), networkElements(pullDown), isClock);
  idleLogic = logic;
}

function classifyNetworks(
  stage: Stage,
  pullUp: Network,
  pullDown: Network,
  logic: StageLogic,
  up: readonly number[],
  down: readonly number[],
  isClock: (net: number) => boolean,
): void {
  const k = stage.inputs.length;
  const exhaustive = k <= MAX_TRUTH_TABLE_INPUTS;

  // Static complementary: p-channel up, n-channel down, gated by inputs (or tied to a rail), and exactly one network
  // conducting for every input combination.
  if (k >= 1 && allOf(logic, up, 'p') && allOf(logic, down, 'n')) {
    let complementary = true;
    if (exhaustive) {
      for (let mask = 0; mask < 1 << k && complementary; mask++) {
        complementary = conductsFor(pullUp, logic, mask) !== conductsFor(pullDown, logic, mask);
      }
    } else {
      // Without the truth table, at least the necessary condition: a complementary gate's pull-up is the dual of its
      // pull-down over the same inputs, so every input gates devices in both networks (a precharge device does not).
      const inUp = new Set<number>();
      const inDown = new Set<number>();
      for (const e of up) inUp.add(logic.gate[e]);
      for (const e of down) inDown.add(logic.gate[e]);
      for (const x of stage.inputs) if (!inUp.has(x) || !inDown.has(x)) complementary = false;
      if (complementary) stage.notes.push(`complementary by structure only (${k} inputs, truth table not enumerated)`);
    }
    if (complementary) {
      stage.kind = k === 1 ? 'inverter' : 'complementary';
      return;
    }
  }

  const upLoad = logic.allAlwaysOn(up);
  const downLoad = logic.allAlwaysOn(down);
  if ((upLoad && logic.anyInputGated(down)) || (downLoad && logic.anyInputGated(up))) {
    stage.kind = 'ratioed';
    return;
  }

  // Dynamic: a precharge device next to the output, gated by a net that also gates the evaluation network (a footer) or that the clock hint names.
  for (let side = 0; side < 2; side++) {
    const pre = side === 0 ? pullUp : pullDown;
    const evalElements = side === 0 ? down : up;
    const prePolarity = side === 0 ? 'p' : 'n';
    const direct = directLeaves(pre);
    for (const e of direct) {
      if (logic.polarity[e] !== prePolarity || !logic.inputGated(e)) continue;
      const clock = logic.gate[e];
      const footer: number[] = [];
      let otherLogic = false;
      for (const x of evalElements) {
        if (logic.gate[x] === clock) footer.push(x);
        else if (logic.inputGated(x)) otherLogic = true;
      }
      const byName = isClock(clock);
      // Beside the precharge device only keepers, gated from outside the evaluation network; a device of
      // the same side gated by an evaluation input is the complementary half of a static or clocked gate.
      let keepersOnly = true;
      for (const x of side === 0 ? up : down) {
        if (logic.gate[x] === clock || !logic.inputGated(x)) continue;
        for (const y of evalElements) if (logic.gate[y] === logic.gate[x]) keepersOnly = false;
      }
      if ((footer.length || byName) && otherLogic && keepersOnly) {
        const precharge: number[] = [];
        for (const x of direct) if (logic.gate[x] === clock) precharge.push(x);
        stage.kind = 'dynamic';
        stage.dynamic = { style: side === 0 ? 'n-evaluate' : 'p-evaluate', clock, precharge, footer, clockByName: byName && !footer.length };
        return;
      }
    }
  }

  if (logic.anyInputGated(up) && logic.anyInputGated(down) && exhaustive) {
    for (let mask = 0; mask < 1 << k; mask++) {
      if (outputValue(stage, logic, mask) === 'Z') {
        stage.kind = 'clocked';
        return;
      }
    }
  }
  stage.kind = 'other';
  stage.notes.push('not a recognised static, ratioed, clocked or dynamic structure');
}
