// The shape of a stage, shared by extraction, classification, analysis and the
// recognition rules that build on them.

import type { SourceLoc } from '../../grammar/design';
import type { ElementRef } from '../electrical/element';
import type { Network } from '../electrical/network';

export { POWER_END, GROUND_END } from '../electrical/network';

export type StageKind =
  /** One input, complementary single-device (or parallel-finger) pull-up and pull-down. */
  | 'inverter'
  /** Static complementary gate: p-channel pull-up and n-channel pull-down, exactly one conducting for every input combination. */
  | 'complementary'
  /** One network always on (resistor, diode-connected device, grounded-gate p-channel or tied-high n-channel) fighting the other. */
  | 'ratioed'
  /** Clocked or tri-state stage: both networks gated by inputs, with input combinations that leave the output floating. */
  | 'clocked'
  /** Precharged node evaluated through the other network. */
  | 'dynamic'
  /** Pass device or transmission gate between observed nets, touching no rail. */
  | 'pass'
  | 'other';

/** A channel element of a stage, as one number (see `ElementRef`): networks and rules refer to a stage's elements by position. */
export type StageElement = ElementRef;
export { elementIndex, isMosElement, mosElement, resistorElement } from '../electrical/element';

export interface AuxiliaryDevice {
  /** Index into `Stage.elements`. */
  element: number;
  /** The internal node the device ties to a rail (secondary precharge of a stack node, for example). */
  node: number;
  rail: 'power' | 'ground';
}

export interface DynamicInfo {
  /** 'n-evaluate': p-channel precharge high, n-channel evaluation; 'p-evaluate' the mirror. */
  style: 'n-evaluate' | 'p-evaluate';
  /** Net gating the precharge device(s). */
  clock: number;
  /** `Stage.elements` indices of the precharge device(s). */
  precharge: number[];
  /** `Stage.elements` indices of evaluation-network devices gated by the same net (the footer). */
  footer: number[];
  /** Whether the clock hint (not only the shared gate) made this a dynamic stage. */
  clockByName: boolean;
}

export interface Stage {
  /** Index in the cell's stage list. */
  id: number;
  /** Channel-connected component the stage was split from (pass devices are split from the drivers they join). */
  component: number;
  kind: StageKind;
  /** The driven net; null for pass stages and for structures without a recognisable output. */
  output: number | null;
  /** Observed nets the stage joins: [output] for driving stages, both ends for a pass stage. */
  terminals: number[];
  /** Gate nets from outside the stage, in netlist order of first use. */
  inputs: number[];
  /** Gate nets inside the stage (diode connections, internal feedback). */
  feedback: number[];
  /** Every channel element of the stage, in netlist order. Networks refer to these by index. */
  elements: StageElement[];
  /** Nets of the stage other than its terminals (stack nodes). */
  internal: number[];
  /** Output to power (end a = output, b = POWER_END), as a series/parallel tree; null when absent or not series/parallel. */
  pullUp: Network | null;
  /** Output to ground (end a = output, b = GROUND_END). */
  pullDown: Network | null;
  /** A pass stage's network between terminals[0] (a) and terminals[1] (b). */
  channel: Network | null;
  auxiliary: AuxiliaryDevice[];
  dynamic: DynamicInfo | null;
  /** Where findings on this stage point: its first element in netlist order. */
  anchor: SourceLoc;
  notes: string[];
}

export interface CellStages {
  stages: Stage[];
  /** Net → id of the stage that drives it (driving stages only). */
  driverOf: Map<number, number>;
  /** Nets merged by zero-ohm ties: net → representative net. */
  alias: Int32Array;
}

export interface StageOptions {
  /** Clock hint: nets a clock tracer (or the deck's clock names) says carry a clock. */
  isClock?: (net: number) => boolean;
  /** Order of files in the design, so anchors follow netlist order across files. */
  fileRank?: (file: string) => number;
}
