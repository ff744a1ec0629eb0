// What the chain rules show: the receiver's thresholds, and the staircase of a level
// passed through the chain and then through the receiver (its transfer curve).

import type { z } from 'zod';
import type { Corner } from '../../shared/deck';
import type { chainPlotSchema } from '../../shared/findings';
import { analyseStage, stageTransferFunction, type Stage, type TransferCase } from '../stages';
import { stageEnvironmentOf } from './context';
import type { CellContext } from '../types';
import { passedLevels, type PassChain } from './pass';

export interface ReceiverLevel {
  stage: Stage;
  vih: number | null;
  vil: number | null;
  /** The case with the highest VIH (and the lowest VIL) at this corner. */
  worst: TransferCase;
}

/** Thresholds of each static receiver of the chain at the corner with index `cornerIndex`. */
export function receiverLevels(ctx: CellContext, chain: PassChain, cornerIndex: number): ReceiverLevel[] {
  const env = stageEnvironmentOf(ctx);
  const out: ReceiverLevel[] = [];
  for (const r of chain.receivers) {
    // Only the receivers are analysed (memoised by stage signature), not every stage of the cell.
    const a = analyseStage(env, r);
    const inp = a.input(chain.receiver);
    const c = inp?.corners[cornerIndex];
    if (!c || !c.cases.length) continue;
    let vih: number | null = null;
    let vil: number | null = null;
    let worst = c.cases[0];
    for (const x of c.cases) {
      if (x.result.vih !== null && (vih === null || x.result.vih > vih)) {
        vih = x.result.vih;
        worst = x;
      }
      if (x.result.vil !== null && (vil === null || x.result.vil < vil)) vil = x.result.vil;
    }
    out.push({ stage: r, vih, vil, worst });
  }
  return out;
}

/** Levels after each pass device of the chain, then after its first static receiver, plotted over that receiver's transfer curve. */
export function chainFigure(ctx: CellContext, chain: PassChain, corner: Corner, high?: boolean): z.infer<typeof chainPlotSchema> | null {
  const ci = ctx.deck.corners.indexOf(corner);
  const receiver = receiverLevels(ctx, chain, ci < 0 ? 0 : ci)[0];
  if (!receiver) return null;
  const logicHigh = high ?? (chain.degradesHigh || !chain.degradesLow);
  const levels = [logicHigh ? corner.vdd : 0];
  for (let i = 0; i < chain.steps.length; i++) {
    const passed = passedLevels(ctx, { ...chain, steps: chain.steps.slice(0, i + 1) }, corner);
    levels.push(logicHigh ? passed.high : passed.low);
  }
  const env = stageEnvironmentOf(ctx);
  const f = stageTransferFunction(env, receiver.stage, chain.receiver, receiver.worst.held, corner);
  const out = f(levels[levels.length - 1]);
  const clean = f(logicHigh ? corner.vdd : 0);
  levels.push(out);
  const tolerance = 0.05 * corner.vdd;
  const r = receiver.worst.result;
  return {
    kind: 'chain',
    vdd: corner.vdd,
    vin: r.vin.slice(),
    vout: r.vout.slice(),
    levels,
    restoredAfter: Math.abs(out - clean) <= tolerance ? levels.length - 1 : null,
    tolerance,
  };
}
