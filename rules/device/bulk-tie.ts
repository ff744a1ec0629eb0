import { z } from 'zod';
import type { Mosfet } from '../../grammar/design';
import { defineRule } from '../types';
import { cellIndex } from '../recognition/context';

const MAX_LISTED = 50;

type Problem = 'opposite-rail' | 'signal' | 'source';

const TEXT: Record<Problem, (m: Mosfet, net: string) => string> = {
  'opposite-rail': (m, net) =>
    `${m.polarity}-channel bulk on the ${m.polarity === 'n' ? 'supply' : 'ground'} rail ${net}: its source and drain junctions are forward-biased whenever they sit below (above) it`,
  signal: (m, net) => `${m.polarity}-channel bulk on ${net}, a signal net, not a rail: the threshold then moves with that signal and the junctions can forward-bias`,
  source: (m, net) =>
    `${m.polarity}-channel bulk tied to its own source ${net} rather than to ${m.polarity === 'n' ? 'ground' : 'the supply'}: only possible in a separate well, which the netlist must then say`,
};

export default defineRule({
  meta: {
    id: 'device.bulk-tie',
    title: 'Transistor body not tied to its rail',
    area: 'device',
    rationale:
      'In a bulk CMOS process every n-channel body is the substrate, at ground, and every p-channel body is its n-well, at the supply. ' +
      'A body on the opposite rail forward-biases junctions; a body on a signal net moves the threshold with that signal (body effect) and injects current into it. ' +
      'Either usually means a netlist or extraction mistake rather than a deliberate bias.',
    fix: 'Tie n-channel bodies to ground and p-channel bodies to the supply (or to the well-tap nets the deck names as rails).',
    defaultSeverity: 'warning',
  },
  params: z.object({
    acceptSourceTied: z.boolean().default(false).meta({ unit: '', label: 'Accept bodies tied to their own source (separate wells)' }),
  }),
  check(ctx, p, report) {
    const index = cellIndex(ctx);
    const cell = ctx.cell;
    const groups = new Map<string, { problem: Problem; net: number; devices: Mosfet[] }>();
    const mos = cell.mosfets;
    for (let i = 0; i < mos.length; i++) {
      const bulk = index.alias[mos.bulk[i]];
      const rail = index.railOf(bulk);
      let problem: Problem | null = null;
      if (rail) {
        if (mos.isN(i) !== (rail === 'ground')) problem = 'opposite-rail';
      } else if (bulk === index.alias[mos.source[i]] || bulk === index.alias[mos.drain[i]]) {
        if (!p.acceptSourceTied) problem = 'source';
      } else if (index.gates.count(bulk) > 0 || index.channel.count(bulk) > 0 || index.stages.driverOf.has(bulk)) {
        problem = 'signal';
      }
      // A body net that only reaches ports (a well tap left to the parent) is the parent's to tie.
      if (!problem) continue;
      const m = mos.at(i);
      const key = `${problem}|${m.polarity}|${bulk}`;
      const g = groups.get(key);
      if (g) g.devices.push(m);
      else groups.set(key, { problem, net: bulk, devices: [m] });
    }
    for (const g of groups.values()) {
      const first = g.devices[0];
      const more = g.devices.length > 1 ? ` (${g.devices.length} devices: ${g.devices.slice(0, 8).map((m) => m.name).join(', ')}${g.devices.length > 8 ? ', …' : ''})` : '';
      report({
        message: `${first.name}: ${TEXT[g.problem](first, cell.nets[g.net])}${more}.`,
        loc: first.loc,
        nets: [cell.nets[g.net]],
        devices: g.devices.slice(0, MAX_LISTED).map((m) => m.name),
      });
    }
  },
});
