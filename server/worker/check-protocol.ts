// Messages between a worker process and its check threads. A thread does only the
// pure computation (grammar/ and rules/); everything with I/O stays on the main
// thread, whose event loop keeps renewing the job's lock while a big design is checked.

import type { Deck } from '../../shared/deck';
import type { CheckSummary, Finding } from '../../shared/findings';
import type { RunDiagnostic } from '../../shared/api/runs';

export interface ThreadFile {
  path: string;
  content: Uint8Array;
}

interface BaseRequest {
  files: ThreadFile[];
  deck: Deck;
  top?: string;
}

/** Read the design; check it whole, or, at `splitMinCells` cells or more, plan parts of `cellsPerPart` cells. */
export interface PlanRequest extends BaseRequest {
  kind: 'plan';
  splitMinCells: number;
  cellsPerPart: number;
}

/** Read the design and check these cells only (one part of a split run). */
export interface PartRequest extends BaseRequest {
  kind: 'part';
  cells: string[];
}

export type CheckRequest = PlanRequest | PartRequest;

export type ThreadStage =
  | { type: 'stage'; stage: 'elaborating' }
  | { type: 'stage'; stage: 'checking'; done: number; total: number };

export type CheckOutcome =
  /** The input has errors: the run fails with these, and no retry can help. */
  | { kind: 'invalid'; diagnostics: RunDiagnostic[] }
  | {
      kind: 'checked';
      findings: Finding[];
      summary: Omit<CheckSummary, 'elapsedMs'>;
      /** Cell name → occurrences in the flattened design, for the cells checked. */
      cellCounts: Record<string, number>;
      diagnostics: RunDiagnostic[];
    }
  | {
      kind: 'split';
      /** Cell keys of each part, consecutive slices of the engine's parents-first order. */
      parts: string[][];
      /** Design-wide counts (cells is the number of cells to analyse); findings counts are zero until the merge. */
      summary: Omit<CheckSummary, 'elapsedMs'>;
      diagnostics: RunDiagnostic[];
    };

export type ThreadMessage = ThreadStage | { type: 'done'; outcome: CheckOutcome } | { type: 'error'; message: string; stack?: string };
