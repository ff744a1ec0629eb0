// A stage's DC transfer curve Vout(Vin) with the points the noise-margin and regeneration
// rules reason about: the switching threshold VM (where the curve meets Vout = Vin) and the
// unity-gain points VIL and VIH (where the slope is ±1, drawn as short tangents). Each point
// has its own shape and its name beside it, so the picture reads in grey-scale print.

import type { z } from 'zod';
import type { transferPlotSchema } from '../../../shared/findings';
import { copper, ink, well } from '../../design/palette';
import { formatVolts } from '../findings/quantity';
import { Axes, interpolate, linearScale, niceTicks, plotFrame, polylinePath } from './axes';
import { MarkerGlyph, type MarkerShape } from './markers';

export type TransferPlotData = z.infer<typeof transferPlotSchema>;

const WIDTH = 356;
const HEIGHT = 350;

interface Point {
  key: 'vm' | 'vil' | 'vih';
  name: string;
  shape: MarkerShape;
  vin: number;
  vout: number;
  /** Label offset from the point, in user units. */
  dx: number;
  dy: number;
  anchor: 'start' | 'end';
}

/** The marked points of a transfer curve, in volts. Exported for the figure's text and for tests. */
export function transferPoints(plot: TransferPlotData): Point[] {
  const points: Point[] = [{ key: 'vm', name: 'VM', shape: 'disc', vin: plot.vm, vout: plot.vm, dx: 9, dy: -8, anchor: 'start' }];
  const inverting = plot.gainAtVm < 0;
  if (plot.vil !== null) {
    const vout = interpolate(plot.vin, plot.vout, plot.vil);
    points.push({ key: 'vil', name: 'VIL', shape: 'square', vin: plot.vil, vout, dx: inverting ? -9 : 9, dy: inverting ? 16 : -8, anchor: inverting ? 'end' : 'start' });
  }
  if (plot.vih !== null) {
    const vout = interpolate(plot.vin, plot.vout, plot.vih);
    points.push({ key: 'vih', name: 'VIH', shape: 'diamond', vin: plot.vih, vout, dx: inverting ? 9 : -9, dy: inverting ? -8 : 16, anchor: inverting ? 'start' : 'end' });
  }
  return points;
}

export function TransferPlot({ plot, title = 'Transfer curve' }: { plot: TransferPlotData; title?: string }) {
  const frame = plotFrame(WIDTH, HEIGHT);
  const x = linearScale([0, plot.vdd], [frame.left, frame.right]);
  const y = linearScale([0, plot.vdd], [frame.bottom, frame.top]);
  const ticks = niceTicks(0, plot.vdd);
  const points = transferPoints(plot);
  const slopeSign = plot.gainAtVm < 0 ? -1 : 1;
  const tangentHalf = 0.09 * plot.vdd;
  const nmh = plot.vih === null ? null : plot.voh - plot.vih;
  const nml = plot.vil === null ? null : plot.vil - plot.vol;
  const restores = Math.abs(plot.gainAtVm) > 1;
  const summary =
    `Transfer curve over 0 to ${formatVolts(plot.vdd)}: VM ${formatVolts(plot.vm)}, gain at VM ${plot.gainAtVm.toFixed(2)}` +
    (plot.vil !== null && plot.vih !== null ? `, VIL ${formatVolts(plot.vil)}, VIH ${formatVolts(plot.vih)}` : ', no unity-gain points');

  return (
    <figure className="kw-plot" aria-label={title}>
      <svg viewBox={`0 0 ${WIDTH} ${HEIGHT}`} className="h-auto w-full max-w-[28rem]" role="img" aria-label={summary} data-plot="transfer" fontFamily="IBM Plex Sans, sans-serif">
        <Axes frame={frame} x={x} y={y} xTitle="Vin (V)" yTitle="Vout (V)" xTicks={ticks} yTicks={ticks} />
        <line
          data-series="diagonal"
          x1={x(0)}
          y1={y(0)}
          x2={x(plot.vdd)}
          y2={y(plot.vdd)}
          stroke={ink[500]}
          strokeWidth="1.2"
          strokeDasharray="5 4"
        />
        <text x={x(0.97 * plot.vdd)} y={y(0.9 * plot.vdd)} textAnchor="end" fontSize="11.5" fill={ink[600]} paintOrder="stroke" stroke="white" strokeWidth="3">
          Vout = Vin
        </text>
        <path data-series="curve" d={polylinePath(plot.vin.map(x), plot.vout.map(y))} fill="none" stroke={well[800]} strokeWidth="2.2" strokeLinejoin="round" />
        {points
          .filter((p) => p.key !== 'vm')
          .map((p) => (
            <line
              key={`tangent-${p.key}`}
              data-tangent={p.key}
              x1={x(p.vin - tangentHalf)}
              y1={y(p.vout - slopeSign * tangentHalf)}
              x2={x(p.vin + tangentHalf)}
              y2={y(p.vout + slopeSign * tangentHalf)}
              stroke={copper[600]}
              strokeWidth="1.4"
              strokeDasharray="2 2"
            />
          ))}
        {points.map((p) => (
          <g key={p.key} data-marker={p.key} transform={`translate(${x(p.vin).toFixed(2)} ${y(p.vout).toFixed(2)})`}>
            <line x1={0} y1={0} x2={0} y2={frame.bottom - y(p.vout)} stroke={ink[400]} strokeWidth="1" strokeDasharray="1 3" />
            <MarkerGlyph shape={p.shape} />
            <text x={p.dx} y={p.dy} textAnchor={p.anchor} fontSize="12.5" fontWeight="600" fill={ink[900]} paintOrder="stroke" stroke="white" strokeWidth="3">
              {p.name} {formatVolts(p.vin)}
            </text>
          </g>
        ))}
      </svg>
      <figcaption className="mt-2 text-xs leading-5 text-ink-700">
        <PlotKey
          items={[
            { glyph: 'line', label: 'stage curve' },
            { glyph: 'dashed', label: 'Vout = Vin' },
            ...points.map((p) => ({ glyph: p.shape, label: p.key === 'vm' ? 'VM: switching threshold' : `${p.name}: slope ${slopeSign < 0 ? '−1' : '+1'} (unity gain)` })),
          ]}
        />
        <p className="mt-2">
          Gain at VM {plot.gainAtVm.toFixed(2)} V/V: {restores ? '|gain| > 1, the stage restores a disturbed level.' : '|gain| ≤ 1, the stage does not restore a disturbed level.'}
        </p>
        <dl className="mt-1 grid grid-cols-[auto_1fr_auto_1fr] gap-x-3 gap-y-0.5 tabular-nums">
          <dt className="text-ink-500">VM</dt>
          <dd>{formatVolts(plot.vm)}</dd>
          <dt className="text-ink-500">VOL / VOH</dt>
          <dd>
            {formatVolts(plot.vol)} / {formatVolts(plot.voh)}
          </dd>
          <dt className="text-ink-500">VIL</dt>
          <dd>{plot.vil === null ? 'none' : formatVolts(plot.vil)}</dd>
          <dt className="text-ink-500">VIH</dt>
          <dd>{plot.vih === null ? 'none' : formatVolts(plot.vih)}</dd>
          <dt className="text-ink-500">NML</dt>
          <dd title="VIL − VOL">{nml === null ? '—' : formatVolts(nml)}</dd>
          <dt className="text-ink-500">NMH</dt>
          <dd title="VOH − VIH">{nmh === null ? '—' : formatVolts(nmh)}</dd>
        </dl>
      </figcaption>
    </figure>
  );
}

export type KeyGlyph = MarkerShape | 'line' | 'dashed' | 'dotted' | 'staircase';

/** A legend row: each entry its line style or marker shape and its words. */
export function PlotKey({ items }: { items: { glyph: KeyGlyph; label: string }[] }) {
  return (
    <ul className="flex flex-wrap gap-x-4 gap-y-1" aria-label="Key">
      {items.map((item) => (
        <li key={item.label} className="inline-flex items-center gap-1.5">
          <svg viewBox="-12 -6 24 12" width="24" height="12" aria-hidden="true">
            {item.glyph === 'line' && <line x1={-11} x2={11} y1={0} y2={0} stroke={well[800]} strokeWidth="2.2" />}
            {item.glyph === 'dashed' && <line x1={-11} x2={11} y1={0} y2={0} stroke={ink[500]} strokeWidth="1.4" strokeDasharray="5 3" />}
            {item.glyph === 'dotted' && <line x1={-11} x2={11} y1={0} y2={0} stroke={ink[500]} strokeWidth="1.4" strokeDasharray="1.5 2.5" />}
            {item.glyph === 'staircase' && <path d="M-11 4H-3V-4H5V4H11" fill="none" stroke={copper[600]} strokeWidth="2" />}
            {item.glyph !== 'line' && item.glyph !== 'dashed' && item.glyph !== 'dotted' && item.glyph !== 'staircase' && <MarkerGlyph shape={item.glyph} />}
          </svg>
          {item.label}
        </li>
      ))}
    </ul>
  );
}
