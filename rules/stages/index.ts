// Stages of a cell for rules: extraction and analysis, memoised per cell context.

import type { RailKind } from '../../grammar/design';
import type { CellContext } from '../types';
import { analyseStage, type StageAnalysis, type StageEnvironment } from './analyse';
import { clockHintFromNames, STAGE_CLOCK_HINT_KEY, type ClockHint } from './clock-hint';
import { extractStages } from './extract';
import type { CellStages } from './stage';

export * from './stage';
export { extractStages } from './extract';
export { classifyStage, stageLogic, outputValue } from './classify';
export { reduceSeriesParallel } from './series-parallel';
export * from './analyse';
export { clockHintFromNames, STAGE_CLOCK_HINT_KEY, type ClockHint } from './clock-hint';

export function stageEnvironment(ctx: CellContext, stages: CellStages): StageEnvironment {
  const { alias } = stages;
  // A net tied to a rail by a zero-ohm resistor is that rail.
  const railOfRoot: (RailKind | undefined)[] = new Array(alias.length);
  for (let i = 0; i < alias.length; i++) if (ctx.rails[i]) railOfRoot[alias[i]] = ctx.rails[i];
  return { design: ctx.design, cell: ctx.cell, deck: ctx.deck, alias, railOf: (net) => railOfRoot[alias[net]] };
}

export function stagesOf(ctx: CellContext): CellStages {
  return ctx.memo('stages', () => {
    const isClock = ctx.memo<ClockHint>(STAGE_CLOCK_HINT_KEY, () => clockHintFromNames(ctx));
    const files = new Map(ctx.design.files.map((f, i) => [f.path, i]));
    return extractStages(ctx.cell, ctx.rails, { isClock, fileRank: (f) => files.get(f) ?? files.size });
  });
}

export function stageAnalysesOf(ctx: CellContext): StageAnalysis[] {
  return ctx.memo('stages.analysis', () => {
    const stages = stagesOf(ctx);
    const env = stageEnvironment(ctx, stages);
    return stages.stages.map((s) => analyseStage(env, s));
  });
}
export * from './report';
