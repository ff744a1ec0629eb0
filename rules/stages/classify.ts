// Classifies a driving stage from its networks and the logic they implement.

import type { Cell, RailKind } from '../../grammar/design';
import type { Network } from '../electrical/network';
import { networkElements } from '../electrical/network';
import type { Stage } from './stage';

/** Beyond this many inputs, truth tables give way to structural checks. */
export const MAX_TRUTH_TABLE_INPUTS = 14;

export interface StageLogic {
  /** Gate state of every element for one assignment of the stage inputs (bit i of `mask` = inputs[i] high). */
  on(element: number, mask: number): boolean;
  /** Whether the element's gate is one of the stage inputs (its state depends on the assignment). */
  inputGated(element: number): boolean;
  /** Whether the element conducts whatever the inputs are. */
  alwaysOn(element: number): boolean;
}

export function stageLogic(stage: Stage, cell: Cell, railOf: (net: number) => RailKind | undefined): StageLogic {
  const inputBit = new Map(stage.inputs.map((net, i) => [net, i]));
  type Gate = { kind: 'always' | 'never'; bit: 0; n: true } | { kind: 'input'; bit: number; n: boolean };
  const always: Gate = { kind: 'always', bit: 0, n: true };
  const never: Gate = { kind: 'never', bit: 0, n: true };
  const info = stage.elements.map((el): Gate => {
    if (el.kind === 'res') return always;
    const m = cell.mosfets[el.index];
    const g = m.gate;
    const r = railOf(g);
    if (r) return (r === 'power') === (m.polarity === 'n') ? always : never;
    const bit = inputBit.get(g);
    // A gate inside the stage (diode connection, feedback from the output) is taken as conducting.
    if (bit === undefined) return always;
    return { kind: 'input', bit, n: m.polarity === 'n' };
  });
  return {
    on(element, mask) {
      const x = info[element];
      if (x.kind === 'always') return true;
      if (x.kind === 'never') return false;
      return ((mask >> x.bit) & 1) === 1 ? x.n : !x.n;
    },
    inputGated: (element) => info[element].kind === 'input',
    alwaysOn: (element) => info[element].kind === 'always',
  };
}

/** `conducts` for one input assignment, without a closure per call. */
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
  if (stage.pullUp && networkElements(stage.pullUp).every((e) => logic.alwaysOn(e))) return 0;
  if (stage.pullDown && networkElements(stage.pullDown).every((e) => logic.alwaysOn(e))) return 1;
  return 'X';
}

function polarityOf(cell: Cell, stage: Stage, element: number): 'n' | 'p' | 'r' {
  const el = stage.elements[element];
  return el.kind === 'res' ? 'r' : cell.mosfets[el.index].polarity;
}

function gateOf(cell: Cell, stage: Stage, element: number): number {
  const el = stage.elements[element];
  return el.kind === 'res' ? -1 : cell.mosfets[el.index].gate;
}

/** Direct children of a network that are single devices (the precharge position next to the output). */
function directLeaves(n: Network): number[] {
  if (n.kind === 'leaf') return [n.element];
  if (n.kind === 'parallel') return n.children.filter((c) => c.kind === 'leaf').map((c) => (c as { element: number }).element);
  return [];
}

export function classifyStage(
  stage: Stage,
  cell: Cell,
  railOf: (net: number) => RailKind | undefined,
  isClock: (net: number) => boolean,
): void {
  const { pullUp, pullDown } = stage;
  if (!pullUp || !pullDown) {
    stage.kind = 'other';
    if (!pullUp && !pullDown) stage.notes.push('no series/parallel path to either rail');
    else stage.notes.push(pullUp ? 'drives only towards the supply' : 'drives only towards ground');
    return;
  }
  const logic = stageLogic(stage, cell, railOf);
  const up = networkElements(pullUp);
  const down = networkElements(pullDown);
  const k = stage.inputs.length;
  const exhaustive = k <= MAX_TRUTH_TABLE_INPUTS;

  // Static complementary: p-channel up, n-channel down, input-gated, and exactly one network conducting for every input combination.
  const shapeComplementary =
    up.every((e) => polarityOf(cell, stage, e) === 'p' && logic.inputGated(e)) &&
    down.every((e) => polarityOf(cell, stage, e) === 'n' && logic.inputGated(e));
  if (shapeComplementary) {
    let complementary = true;
    if (exhaustive) {
      for (let mask = 0; mask < 1 << k && complementary; mask++) {
        const pu = conductsFor(pullUp, logic, mask);
        const pd = conductsFor(pullDown, logic, mask);
        complementary = pu !== pd;
      }
    } else stage.notes.push(`complementary by structure only (${k} inputs, truth table not enumerated)`);
    if (complementary) {
      stage.kind = k === 1 ? 'inverter' : 'complementary';
      return;
    }
  }

  const upLoad = up.every((e) => logic.alwaysOn(e));
  const downLoad = down.every((e) => logic.alwaysOn(e));
  if ((upLoad && down.some((e) => logic.inputGated(e))) || (downLoad && up.some((e) => logic.inputGated(e)))) {
    stage.kind = 'ratioed';
    return;
  }

  // Dynamic: a precharge device next to the output, gated by a net that also gates the evaluation network (a footer) or that the clock hint names.
  for (const [pre, evaluate, style, prePolarity] of [
    [pullUp, pullDown, 'n-evaluate', 'p'],
    [pullDown, pullUp, 'p-evaluate', 'n'],
  ] as const) {
    const evalElements = networkElements(evaluate);
    for (const e of directLeaves(pre)) {
      if (polarityOf(cell, stage, e) !== prePolarity || !logic.inputGated(e)) continue;
      const clock = gateOf(cell, stage, e);
      const footer = evalElements.filter((x) => gateOf(cell, stage, x) === clock);
      const byName = isClock(clock);
      const otherLogic = evalElements.some((x) => logic.inputGated(x) && gateOf(cell, stage, x) !== clock);
      if ((footer.length || byName) && otherLogic) {
        stage.kind = 'dynamic';
        stage.dynamic = {
          style,
          clock,
          precharge: directLeaves(pre).filter((x) => gateOf(cell, stage, x) === clock),
          footer,
          clockByName: byName && !footer.length,
        };
        return;
      }
    }
  }

  const upGated = up.some((e) => logic.inputGated(e));
  const downGated = down.some((e) => logic.inputGated(e));
  if (upGated && downGated && exhaustive) {
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
