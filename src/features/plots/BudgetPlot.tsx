// Budget bars for dynamic nodes: each measured value (charge-sharing drop, keeper ratio,
// glitch) as a bar against its limit, drawn as a tick across the bar. Each bar has its own
// scale, since their units differ. A failing bar is hatched and says so in words; a passing
// one is solid: the meaning never rests on colour.

import { useId } from 'react';
import type { z } from 'zod';
import type { budgetPlotSchema } from '../../../shared/findings';
import { ToneGlyph } from '../../design/severity';
import { ink, tone, well } from '../../design/palette';
import { exceeds, formatQuantity } from '../findings/quantity';
import { linearScale } from './axes';

export type BudgetPlotData = z.infer<typeof budgetPlotSchema>;

const WIDTH = 380;
const ROW = 66;
const LEFT = 8;
const RIGHT = WIDTH - 12;

export function budgetVerdict(bar: BudgetPlotData['bars'][number]): { failing: boolean; words: string } {
  const failing = exceeds(bar.measured.value, bar.limit.value, bar.sense);
  if (bar.sense === 'max') return { failing, words: failing ? 'over the limit' : 'within the limit' };
  return { failing, words: failing ? 'below the minimum' : 'above the minimum' };
}

export function BudgetPlot({ plot, title = 'Budget against limits' }: { plot: BudgetPlotData; title?: string }) {
  const hatchId = `kw-hatch-${useId().replace(/:/g, '')}`;
  const height = plot.bars.length * ROW + 8;
  const summary = plot.bars
    .map((b) => `${b.label}: ${formatQuantity(b.measured)} against ${b.sense === 'max' ? 'a limit of' : 'a minimum of'} ${formatQuantity(b.limit)}, ${budgetVerdict(b).words}`)
    .join('; ');

  return (
    <figure className="kw-plot" aria-label={title}>
      <svg viewBox={`0 0 ${WIDTH} ${height}`} className="h-auto w-full max-w-[30rem]" role="img" aria-label={`${title}. ${summary}`} data-plot="budget" fontFamily="IBM Plex Sans, sans-serif">
        <defs>
          <pattern id={hatchId} width="6" height="6" patternUnits="userSpaceOnUse" patternTransform="rotate(45)">
            <rect width="6" height="6" fill={tone.error.soft} />
            <line x1="0" y1="0" x2="0" y2="6" stroke={tone.error.fg} strokeWidth="2.4" />
          </pattern>
        </defs>
        {plot.bars.map((bar, i) => {
          const top = 4 + i * ROW;
          const span = Math.max(bar.measured.value, bar.limit.value, 0) * 1.25 || 1;
          const x = linearScale([0, span], [LEFT, RIGHT]);
          const verdict = budgetVerdict(bar);
          const barY = top + 20;
          return (
            <g key={bar.label} data-bar={bar.label} data-failing={verdict.failing}>
              <text x={LEFT} y={top + 12} fontSize="13" fontWeight="600" fill={ink[900]}>
                {bar.label}
              </text>
              <text x={RIGHT} y={top + 12} fontSize="12.5" textAnchor="end" fill={verdict.failing ? tone.error.fg : ink[700]} fontWeight={verdict.failing ? 600 : 400}>
                {formatQuantity(bar.measured)} · {verdict.words}
              </text>
              <rect x={LEFT} y={barY} width={RIGHT - LEFT} height={16} fill={ink[100]} />
              <rect
                data-measured={bar.measured.value}
                x={LEFT}
                y={barY}
                width={Math.max(0, x(Math.max(bar.measured.value, 0)) - LEFT)}
                height={16}
                fill={verdict.failing ? `url(#${hatchId})` : well[600]}
                stroke={verdict.failing ? tone.error.fg : well[800]}
                strokeWidth="1"
              />
              <g data-limit={bar.limit.value} transform={`translate(${x(bar.limit.value).toFixed(2)} 0)`}>
                <line x1={0} x2={0} y1={barY - 4} y2={barY + 20} stroke={ink[900]} strokeWidth="2.2" />
                <text x={0} y={barY + 32} fontSize="11.5" textAnchor="middle" fill={ink[800]}>
                  {bar.sense === 'max' ? 'limit' : 'minimum'} {formatQuantity(bar.limit)}
                </text>
              </g>
            </g>
          );
        })}
      </svg>
      <figcaption className="mt-2 text-xs leading-5 text-ink-700">
        <ul className="space-y-0.5">
          {plot.bars.map((bar) => {
            const verdict = budgetVerdict(bar);
            return (
              <li key={bar.label} className="flex items-center gap-1.5">
                <ToneGlyph tone={verdict.failing ? 'error' : 'ok'} size={11} />
                <span>
                  {bar.label}: {formatQuantity(bar.measured)} against {bar.sense === 'max' ? 'a limit of' : 'a minimum of'} {formatQuantity(bar.limit)}, {verdict.words}.
                </span>
              </li>
            );
          })}
        </ul>
      </figcaption>
    </figure>
  );
}
