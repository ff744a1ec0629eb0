import { z } from 'zod';
import type { Mosfet } from '../../grammar/design';
import { defineRule } from '../types';
import { formatSi } from '../units';

const MAX_LISTED = 50;

export default defineRule({
  meta: {
    id: 'device.implausible-size',
    title: 'Transistor size outside physical sense',
    area: 'device',
    rationale:
      'A channel width or length far outside what any process draws almost always means the netlist was read with the wrong scale ' +
      '(for example widths written for `.option scale=1e-6` read as metres). Every electrical measurement on such devices is meaningless.',
    fix: 'Give the netlist its scale (`.option scale=…`, the deck\u2019s default scale or the command line\u2019s --scale), or correct the size.',
    defaultSeverity: 'error',
  },
  params: z.object({
    // Rule of thumb of the trade: drawn widths run from tens of nanometres to a few hundred micrometres per device.
    minWidth: z.number().min(1e-10).max(1e-5).default(1e-8).meta({ unit: 'm', label: 'Smallest plausible width' }),
    maxWidth: z.number().min(1e-6).max(1).default(1e-3).meta({ unit: 'm', label: 'Largest plausible width' }),
    minLength: z.number().min(1e-10).max(1e-5).default(5e-9).meta({ unit: 'm', label: 'Smallest plausible length' }),
    maxLength: z.number().min(1e-6).max(1).default(1e-4).meta({ unit: 'm', label: 'Largest plausible length' }),
  }),
  check(ctx, p, report) {
    const { w, l, length } = ctx.cell.mosfets;
    const bad: Mosfet[] = [];
    for (let i = 0; i < length; i++) {
      if (!(w[i] >= p.minWidth && w[i] <= p.maxWidth && l[i] >= p.minLength && l[i] <= p.maxLength)) bad.push(ctx.cell.mosfets.at(i));
    }
    if (bad.length === 0) return;
    const first = bad[0];
    const widthBad = !(first.w >= p.minWidth && first.w <= p.maxWidth);
    const value = widthBad ? first.w : first.l;
    const limit = widthBad ? (first.w > p.maxWidth ? p.maxWidth : p.minWidth) : first.l > p.maxLength ? p.maxLength : p.minLength;
    const what = widthBad ? 'width' : 'length';
    const others = bad.length > 1 ? ` (and ${bad.length - 1} more device${bad.length > 2 ? 's' : ''} of this cell)` : '';
    report({
      message: `${first.name} has ${what} ${formatSi(value, 'm')}, outside ${formatSi(widthBad ? p.minWidth : p.minLength, 'm')}…${formatSi(widthBad ? p.maxWidth : p.maxLength, 'm')}${others}; is the netlist scale missing?`,
      loc: first.loc,
      nets: [],
      devices: bad.slice(0, MAX_LISTED).map((m) => m.name),
      measured: { value, unit: 'm' },
      limit: { value: limit, unit: 'm' },
    });
  },
});
