// The contract every rule module follows.
//
// A rule is one module: metadata a designer reads, a parameter schema a methodology
// owner tunes in the deck (zod, with units and ranges in `.meta`), and a `check`
// that looks at one cell through the shared analysis context and reports findings.

import type { z } from 'zod';
import type { Deck, Severity } from '../shared/deck';
import type { FindingPlot, Quantity } from '../shared/findings';
import type { Cell, Design, RailKind, SourceLoc } from '../grammar/design';
import type { Timing } from './recognition/timing';

/** What a parent tells a child about one of its ports beyond its rail: the clock phase or domino timing the parent's net has. */
export type PortSignal = Timing;

export type RuleArea = 'dynamic' | 'stage' | 'chain' | 'net' | 'device';

export interface RuleMeta {
  /** `area.kebab-name`; part of the deck and of every output format. */
  id: string;
  title: string;
  area: RuleArea;
  /** Why a designer should care, in two or three sentences. */
  rationale: string;
  /** What usually fixes it. */
  fix: string;
  defaultSeverity: Severity;
}

export interface RawFinding {
  message: string;
  /** Anchor: the device or element line the finding points at. */
  loc: SourceLoc;
  nets: string[];
  devices: string[];
  measured?: Quantity | null;
  limit?: Quantity | null;
  corner?: string | null;
  plot?: FindingPlot | null;
}

/** What a rule sees: one cell (per distinct port context), the deck, and lazily computed analyses. */
export interface CellContext {
  design: Design;
  cell: Cell;
  deck: Deck;
  /** Occurrences of this cell (in this context) in the flattened design. */
  instances: number;
  /** Rail of each net of the cell, local evidence and port context combined. */
  rails: (RailKind | undefined)[];
  /** Timing of each port (aligned with `cell.ports`) as the parents of this context feed it; absent for roots. */
  signals?: readonly (PortSignal | undefined)[];
  /** The cell's ports are local nets here (a root of the design, or a synthetic cell built by recognition). Default: the cell is a root. */
  root?: boolean;
  /** Shared, memoised analyses (stages, clocks, dynamic nodes, …) keyed by name. */
  memo<T>(key: string, compute: () => T): T;
}

export interface RuleModule<S extends z.ZodObject = z.ZodObject> {
  meta: RuleMeta;
  /** Every field has a default, a range and `.meta({ unit, label })`. */
  params: S;
  check(ctx: CellContext, params: z.output<S>, report: (finding: RawFinding) => void): void;
}

export function defineRule<S extends z.ZodObject>(rule: RuleModule<S>): RuleModule<S> {
  return rule;
}
