// The frame every plot shares: a linear map from volts (or any value) to SVG user units,
// round tick values, and the axes drawn with their numbers and titles. Ticks carry their
// value in `data-tick` so a reader (or a test) can recover the mapping from the picture.

import { ink } from '../../design/palette';

export interface Scale {
  (value: number): number;
  domain: [number, number];
  range: [number, number];
}

export function linearScale(domain: [number, number], range: [number, number]): Scale {
  const [d0, d1] = domain;
  const [r0, r1] = range;
  const k = d1 === d0 ? 0 : (r1 - r0) / (d1 - d0);
  const f = ((value: number) => r0 + (value - d0) * k) as Scale;
  f.domain = domain;
  f.range = range;
  return f;
}

/** A step of 1, 2 or 5 × 10ⁿ giving about `target` intervals over `span`. */
export function niceStep(span: number, target = 5): number {
  if (!(span > 0)) return 1;
  const raw = span / target;
  const magnitude = 10 ** Math.floor(Math.log10(raw));
  const norm = raw / magnitude;
  const factor = norm < 1.5 ? 1 : norm < 3 ? 2 : norm < 7 ? 5 : 10;
  return factor * magnitude;
}

/** Multiples of a nice step from `min` to `max` inclusive (within rounding). */
export function niceTicks(min: number, max: number, target = 5): number[] {
  const step = niceStep(max - min, target);
  const first = Math.ceil(min / step - 1e-9);
  const out: number[] = [];
  for (let i = first; i * step <= max + step * 1e-9; i++) out.push(Number((i * step).toPrecision(12)));
  return out;
}

export function tickLabel(value: number): string {
  return String(Number(value.toPrecision(6)));
}

/** Plot area inside a viewBox of `width` × `height`, with room for tick numbers and titles. */
export interface Frame {
  width: number;
  height: number;
  left: number;
  right: number;
  top: number;
  bottom: number;
}

export function plotFrame(width: number, height: number, margins = { left: 52, right: 16, top: 14, bottom: 46 }): Frame {
  return { width, height, left: margins.left, right: width - margins.right, top: margins.top, bottom: height - margins.bottom };
}

export function Axes({ frame, x, y, xTitle, yTitle, xTicks, yTicks, grid = true }: {
  frame: Frame;
  x: Scale;
  y: Scale;
  xTitle: string;
  yTitle: string;
  xTicks: number[];
  yTicks: number[];
  grid?: boolean;
}) {
  const { left, right, top, bottom } = frame;
  return (
    <g className="kw-plot-axes" fontSize="12" fill={ink[700]}>
      {grid && (
        <g stroke={ink[200]} strokeWidth="1">
          {xTicks.map((t) => (
            <line key={`gx${t}`} x1={x(t)} x2={x(t)} y1={top} y2={bottom} />
          ))}
          {yTicks.map((t) => (
            <line key={`gy${t}`} x1={left} x2={right} y1={y(t)} y2={y(t)} />
          ))}
        </g>
      )}
      <rect x={left} y={top} width={right - left} height={bottom - top} fill="none" stroke={ink[500]} strokeWidth="1" />
      <g data-axis="x">
        {xTicks.map((t) => (
          <g key={`tx${t}`} data-tick={t} data-position={x(t)}>
            <line x1={x(t)} x2={x(t)} y1={bottom} y2={bottom + 4} stroke={ink[600]} />
            <text x={x(t)} y={bottom + 16} textAnchor="middle">
              {tickLabel(t)}
            </text>
          </g>
        ))}
        <text x={(left + right) / 2} y={bottom + 36} textAnchor="middle" fontWeight="600" fill={ink[800]}>
          {xTitle}
        </text>
      </g>
      <g data-axis="y">
        {yTicks.map((t) => (
          <g key={`ty${t}`} data-tick={t} data-position={y(t)}>
            <line x1={left - 4} x2={left} y1={y(t)} y2={y(t)} stroke={ink[600]} />
            <text x={left - 7} y={y(t) + 4} textAnchor="end">
              {tickLabel(t)}
            </text>
          </g>
        ))}
        <text
          x={0}
          y={0}
          transform={`translate(${left - 38} ${(top + bottom) / 2}) rotate(-90)`}
          textAnchor="middle"
          fontWeight="600"
          fill={ink[800]}
        >
          {yTitle}
        </text>
      </g>
    </g>
  );
}

/** An SVG path through points, for curves. */
export function polylinePath(xs: readonly number[], ys: readonly number[]): string {
  let d = '';
  for (let i = 0; i < xs.length; i++) d += `${i ? 'L' : 'M'}${xs[i].toFixed(2)} ${ys[i].toFixed(2)}`;
  return d;
}

/** Linear interpolation of a sampled curve y(x), x increasing; clamped at the ends. */
export function interpolate(xs: readonly number[], ys: readonly number[], at: number): number {
  const n = xs.length;
  if (n === 0) return NaN;
  if (at <= xs[0]) return ys[0];
  if (at >= xs[n - 1]) return ys[n - 1];
  let lo = 0;
  let hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (xs[mid] <= at) lo = mid;
    else hi = mid;
  }
  const t = (at - xs[lo]) / (xs[hi] - xs[lo] || 1);
  return ys[lo] + t * (ys[hi] - ys[lo]);
}
