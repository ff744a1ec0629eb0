// The hook through which stage classification learns which nets carry a clock.
//
// Classification already calls a stage dynamic when its precharge device shares its
// gate with a footer; the hint only matters for footless stages. For now the hint
// matches net names against the deck's clock roots. Clock tracing (rules/recognition)
// refines it: give its answer to `stagesOf` through `STAGE_CLOCK_HINT_KEY` in the
// cell's memo before the stages are first asked for, or pass `isClock` to
// `extractStages` directly.

import { globMatcher } from '../../shared/deck';
import type { CellContext } from '../types';

export type ClockHint = (net: number) => boolean;

/** Memo key under which a clock tracer may leave a better hint for this cell. */
export const STAGE_CLOCK_HINT_KEY = 'stages.clock-hint';

/** Deck clock-root patterns, and the same names with an inverted-phase suffix. */
export function clockHintFromNames(ctx: Pick<CellContext, 'cell' | 'deck'>): ClockHint {
  const roots = globMatcher(ctx.deck.clocks.roots.map((r) => r.pattern));
  const suffixes = ctx.deck.clocks.invertedSuffixes.map((s) => s.toLowerCase());
  const names = ctx.cell.nets;
  const cache = new Map<number, boolean>();
  return (net) => {
    let hit = cache.get(net);
    if (hit === undefined) {
      const name = names[net] ?? '';
      const lower = name.toLowerCase();
      hit = roots(name) || suffixes.some((s) => lower.endsWith(s) && lower.length > s.length && roots(name.slice(0, -s.length)));
      cache.set(net, hit);
    }
    return hit;
  };
}
