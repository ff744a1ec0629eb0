// Measured values and limits as designers read them: engineering prefixes on SI units
// (rules/units.ts, the one formatter the messages use too), plain numbers for ratios and counts.

import type { Quantity } from '../../../shared/findings';
import { formatSi } from '../../../rules/units';

/** Units that read as bare numbers. */
const UNITLESS = new Set(['ratio', '', 'V/V']);

export function formatQuantity(q: Quantity | null | undefined, digits = 3): string {
  if (!q) return '—';
  if (q.unit === 'count') return Number.isInteger(q.value) ? String(q.value) : q.value.toFixed(1);
  if (UNITLESS.has(q.unit)) return `${Number(q.value.toPrecision(digits))}${q.unit === 'V/V' ? ' V/V' : ''}`;
  return formatSi(q.value, q.unit, digits);
}

/** Volts with engineering prefixes, for plot annotations: 1.25 → "1.25 V", 0.0123 → "12.3 mV". */
export function formatVolts(value: number, digits = 3): string {
  return formatSi(value, 'V', digits);
}

/** Whether a measurement is on the failing side of its limit. */
export function exceeds(measured: number, limit: number, sense: 'max' | 'min'): boolean {
  return sense === 'max' ? measured > limit : measured < limit;
}
