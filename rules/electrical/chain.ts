// Regeneration through a chain of stages: a disturbed level is passed stage by stage
// and compared, after each stage, with the level that stage gives for a clean rail
// input of the same logic value. A chain of stages whose gain magnitude at the
// switching threshold exceeds one restores the level; one below one lets it settle at
// the curve's fixed point (near the switching threshold) and never restores it.

import type { z } from 'zod';
import type { chainPlotSchema } from '../../shared/findings';
import type { TransferResult } from './transfer';

export type TransferFunction = (vin: number) => number;

export interface ChainOptions {
  vdd: number;
  /** Logic value the disturbed start level stands for. */
  startLogic: 0 | 1;
  /** Restored when within this many volts of the clean level; default 5 % of VDD. */
  tolerance?: number;
}

export interface ChainResult {
  /** Start level, then the level after each stage. */
  levels: number[];
  /** Clean level after each stage (the stage's output for an ideal rail input). */
  targets: number[];
  /** Number of stages after which the level is first within tolerance of the clean level; null if never. */
  restoredAfter: number | null;
  /** restored; settled (stopped moving short of the clean level); drifting (still moving at the end of the chain). */
  outcome: 'restored' | 'settled' | 'drifting';
  tolerance: number;
}

/** Passes `start` through `stages` in order. */
export function propagateLevel(stages: readonly TransferFunction[], start: number, options: ChainOptions): ChainResult {
  const { vdd } = options;
  const tolerance = options.tolerance ?? 0.05 * vdd;
  const levels = [start];
  const targets: number[] = [];
  let logic = options.startLogic;
  let restoredAfter: number | null = null;
  for (let i = 0; i < stages.length; i++) {
    const f = stages[i];
    const inverting = f(0) > f(vdd);
    const clean = f(logic ? vdd : 0);
    const level = f(levels[levels.length - 1]);
    levels.push(level);
    targets.push(clean);
    logic = (inverting ? 1 - logic : logic) as 0 | 1;
    if (restoredAfter === null && Math.abs(level - clean) <= tolerance) restoredAfter = i + 1;
  }
  let outcome: ChainResult['outcome'] = 'restored';
  if (restoredAfter === null) {
    // Settled when the level repeats itself two stages apart (an inverting pair maps the fixed point to itself).
    const n = levels.length;
    const still = n >= 3 && Math.abs(levels[n - 1] - levels[n - 3]) <= 1e-3 * vdd;
    outcome = still ? 'settled' : 'drifting';
  }
  return { levels, targets, restoredAfter, outcome, tolerance };
}

/** A chain of `count` copies of one stage. */
export function repeatStage(f: TransferFunction, count: number, start: number, options: ChainOptions): ChainResult {
  return propagateLevel(new Array<TransferFunction>(count).fill(f), start, options);
}

/** The chain plot: a stage's curve (the client mirrors it) and the staircase of levels. */
export function chainPlot(curve: Pick<TransferResult, 'vdd' | 'vin' | 'vout'>, chain: ChainResult): z.infer<typeof chainPlotSchema> {
  return {
    kind: 'chain',
    vdd: curve.vdd,
    vin: curve.vin.slice(),
    vout: curve.vout.slice(),
    levels: chain.levels.slice(),
    restoredAfter: chain.restoredAfter,
    tolerance: chain.tolerance,
  };
}
