// A disturbed level passed stage by stage through a chain, drawn as a staircase between the
// stage's curve Vout = f(Vin) and its mirror Vin = f(Vout). From the start level on the Vin
// axis the path rises to the curve (the first stage's output), runs across to the mirror (that
// output read as the next stage's input), rises or falls to the curve again, and so on: with
// |gain| > 1 at the switching threshold the steps widen out to the rails (the level is
// restored); with |gain| < 1 they close in on the crossing near VM and never come back.

import type { z } from 'zod';
import type { chainPlotSchema } from '../../../shared/findings';
import { copper, ink, well } from '../../design/palette';
import { formatVolts } from '../findings/quantity';
import { Axes, interpolate, linearScale, niceTicks, plotFrame, polylinePath } from './axes';
import { PlotKey } from './TransferPlot';

export type ChainPlotData = z.infer<typeof chainPlotSchema>;

const WIDTH = 356;
const HEIGHT = 350;
const LABELLED_STEPS = 8;

export type StepKind = 'curve' | 'mirror' | 'pass';

export interface StairCorner {
  /** The stage whose output level this corner shows (1 = after the first stage). */
  stage: number;
  on: StepKind;
  vin: number;
  vout: number;
}

/** Whether the step from `from` to `to` is the plotted curve's own output for that input. */
function followsCurve(plot: ChainPlotData, from: number, to: number): boolean {
  return Math.abs(interpolate(plot.vin, plot.vout, from) - to) <= 0.02 * plot.vdd;
}

/**
 * The staircase, in volts. When every stage is the plotted one (each level is the curve's
 * output for the one before), corner k sits on the curve (L_k, L_k+1) for even k and on the
 * mirror (L_k+1, L_k) for odd k, starting from (L0, 0) on the input axis. When some steps are
 * other elements (pass devices before a receiver, whose curve is the one plotted), the level
 * moves along Vout = Vin through those, and up or down to the curve and back to the diagonal
 * through the plotted stage.
 */
export function staircase(plot: ChainPlotData): { mode: 'mirror' | 'diagonal'; path: [number, number][]; corners: StairCorner[] } {
  const L = plot.levels;
  const steps = L.slice(1).map((to, k) => followsCurve(plot, L[k], to));
  if (L.length < 2 || steps.every(Boolean)) {
    const corners: StairCorner[] = [];
    for (let k = 0; k + 1 < L.length; k++) {
      if (k % 2 === 0) corners.push({ stage: k + 1, on: 'curve', vin: L[k], vout: L[k + 1] });
      else corners.push({ stage: k + 1, on: 'mirror', vin: L[k + 1], vout: L[k] });
    }
    return { mode: 'mirror', path: [[L[0], 0], ...corners.map((c): [number, number] => [c.vin, c.vout])], corners };
  }
  const corners: StairCorner[] = [];
  const path: [number, number][] = [[L[0], L[0]]];
  for (let k = 0; k + 1 < L.length; k++) {
    if (steps[k]) {
      corners.push({ stage: k + 1, on: 'curve', vin: L[k], vout: L[k + 1] });
      path.push([L[k], L[k + 1]]);
      if (k + 2 < L.length) path.push([L[k + 1], L[k + 1]]);
    } else {
      corners.push({ stage: k + 1, on: 'pass', vin: L[k + 1], vout: L[k + 1] });
      path.push([L[k + 1], L[k + 1]]);
    }
  }
  return { mode: 'diagonal', path, corners };
}

export function chainOutcome(plot: ChainPlotData): string {
  const stages = plot.levels.length - 1;
  if (plot.restoredAfter !== null)
    return `Restored after stage ${plot.restoredAfter} of ${stages}: the level is within ${formatVolts(plot.tolerance)} of the clean level.`;
  const last = plot.levels[plot.levels.length - 1];
  return `Not restored after ${stages} stage${stages === 1 ? '' : 's'}: the level ends at ${formatVolts(last)}, more than ${formatVolts(plot.tolerance)} from the clean level.`;
}

export function ChainPlot({ plot, title = 'Level through the chain' }: { plot: ChainPlotData; title?: string }) {
  const frame = plotFrame(WIDTH, HEIGHT);
  const x = linearScale([0, plot.vdd], [frame.left, frame.right]);
  const y = linearScale([0, plot.vdd], [frame.bottom, frame.top]);
  const ticks = niceTicks(0, plot.vdd);
  const stairs = staircase(plot);
  const corners = stairs.corners;
  const start = plot.levels[0];
  const startY = stairs.mode === 'mirror' ? 0 : start;
  const outcome = chainOutcome(plot);

  return (
    <figure className="kw-plot" aria-label={title}>
      <svg viewBox={`0 0 ${WIDTH} ${HEIGHT}`} className="h-auto w-full max-w-[28rem]" role="img" aria-label={`${title}. ${outcome}`} data-plot="chain" fontFamily="IBM Plex Sans, sans-serif">
        <Axes frame={frame} x={x} y={y} xTitle="Stage input (V)" yTitle="Stage output (V)" xTicks={ticks} yTicks={ticks} />
        <line x1={x(0)} y1={y(0)} x2={x(plot.vdd)} y2={y(plot.vdd)} stroke={ink[400]} strokeWidth="1" strokeDasharray="1.5 2.5" />
        <path data-series="curve" d={polylinePath(plot.vin.map(x), plot.vout.map(y))} fill="none" stroke={well[800]} strokeWidth="2.2" />
        {stairs.mode === 'mirror' && <path data-series="mirror" d={polylinePath(plot.vout.map(x), plot.vin.map(y))} fill="none" stroke={ink[500]} strokeWidth="1.6" strokeDasharray="6 4" />}
        <path
          data-series="staircase"
          d={polylinePath(
            stairs.path.map(([vin]) => x(vin)),
            stairs.path.map(([, vout]) => y(vout)),
          )}
          fill="none"
          stroke={copper[600]}
          strokeWidth="2"
          strokeLinejoin="round"
        />
        <g data-marker="start" transform={`translate(${x(start).toFixed(2)} ${y(startY).toFixed(2)})`}>
          <path d="M0 -1L5 8H-5Z" fill={copper[600]} />
          <text
            x={stairs.mode === 'mirror' ? 0 : -8}
            y={stairs.mode === 'mirror' ? -6 : start > 0.8 * plot.vdd ? 14 : -6}
            textAnchor={stairs.mode === 'mirror' ? 'middle' : 'end'}
            fontSize="11.5"
            fontWeight="600"
            fill={ink[900]}
            paintOrder="stroke"
            stroke="white"
            strokeWidth="3"
          >
            start {formatVolts(start)}
          </text>
        </g>
        {corners.map((c) => (
          <g key={c.stage} data-step={c.stage} data-on={c.on} transform={`translate(${x(c.vin).toFixed(2)} ${y(c.vout).toFixed(2)})`}>
            {c.on === 'pass' ? <rect x={-3} y={-3} width={6} height={6} fill="white" stroke={copper[700]} strokeWidth="1.6" /> : <circle r="3" fill="white" stroke={copper[700]} strokeWidth="1.6" />}
            {c.stage <= LABELLED_STEPS && (
              <text x={c.on === 'mirror' ? -6 : 6} y={c.on === 'mirror' ? 12 : -5} textAnchor={c.on === 'mirror' ? 'end' : 'start'} fontSize="11" fill={ink[800]} paintOrder="stroke" stroke="white" strokeWidth="3">
                {c.stage}
              </text>
            )}
          </g>
        ))}
      </svg>
      <figcaption className="mt-2 text-xs leading-5 text-ink-700">
        <p className="mb-1.5 font-medium text-ink-900">{outcome}</p>
        <PlotKey
          items={
            stairs.mode === 'mirror'
              ? [
                  { glyph: 'line', label: 'stage curve' },
                  { glyph: 'dashed', label: 'its mirror' },
                  { glyph: 'staircase', label: 'the level, stage by stage (numbers: stages passed)' },
                ]
              : [
                  { glyph: 'line', label: 'curve of the last stage' },
                  { glyph: 'dotted', label: 'Vout = Vin' },
                  { glyph: 'staircase', label: 'the level: along Vout = Vin through elements that keep its sense (squares), through the curve at the stage plotted (circles)' },
                ]
          }
        />
        <table className="mt-2 w-full max-w-sm text-left tabular-nums">
          <caption className="sr-only">Level after each stage</caption>
          <thead className="text-ink-500">
            <tr>
              <th scope="col" className="py-0.5 pr-3 font-medium">
                Stage
              </th>
              <th scope="col" className="py-0.5 pr-3 font-medium">
                Input
              </th>
              <th scope="col" className="py-0.5 pr-3 font-medium">
                Output
              </th>
              {stairs.mode === 'diagonal' && (
                <th scope="col" className="py-0.5 font-medium">
                  Through
                </th>
              )}
            </tr>
          </thead>
          <tbody>
            {plot.levels.slice(1).map((level, i) => (
              <tr key={i} data-level-row={i + 1} className={plot.restoredAfter === i + 1 ? 'font-semibold text-ok' : ''}>
                <td className="py-0.5 pr-3">
                  {i + 1}
                  {plot.restoredAfter === i + 1 && <span> ✓ restored</span>}
                </td>
                <td className="py-0.5 pr-3">{formatVolts(plot.levels[i])}</td>
                <td className="py-0.5 pr-3">{formatVolts(level)}</td>
                {stairs.mode === 'diagonal' && <td className="py-0.5">{corners[i].on === 'curve' ? 'the plotted stage' : 'an element not plotted'}</td>}
              </tr>
            ))}
          </tbody>
        </table>
      </figcaption>
    </figure>
  );
}
