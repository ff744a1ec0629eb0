import { z } from 'zod';
import { defineRule } from '../types';
import { elmoreDelay, passChainsOf, stepDevice, type PassChain } from '../recognition/pass';
import { chainFigure } from '../recognition/chain-report';
import { formatSi } from '../units';

/** Receivers whose chain lies inside a longer reported chain are not reported again. */
function maximal(chains: PassChain[], limit: number): PassChain[] {
  const over = chains.filter((c) => c.length > limit).sort((x, y) => y.length - x.length || x.receiver - y.receiver);
  const covered = new Set<number>();
  const out: PassChain[] = [];
  for (const c of over) {
    if (covered.has(c.receiver)) continue;
    out.push(c);
    for (const st of c.steps) {
      covered.add(st.from);
      covered.add(st.to);
    }
  }
  return out;
}

export default defineRule({
  meta: {
    id: 'chain.non-restoring',
    title: 'Too many pass devices in series before a restoring stage',
    area: 'chain',
    rationale:
      'A pass device or transmission gate only connects; it restores nothing. A signal crossing several of them in series reaches the receiver with every disturbance picked up on the way, ' +
      'and the chain is a distributed RC line whose delay grows with the square of its length (Elmore). ' +
      'A restoring stage (an inverter, a static gate) every few devices gives the level back its full swing and cuts the delay.',
    fix: 'Insert a restoring stage (a buffer, or an inverter and invert the sense) within the allowed number of series devices, or restructure the mux tree into fewer levels.',
    defaultSeverity: 'warning',
  },
  params: z.object({
    // Rule of thumb of the trade: no more than three or four pass devices in series before restoring the level.
    maxSeries: z.number().int().min(1).max(64).default(3).meta({ unit: 'count', label: 'Most series pass devices before a restoring stage' }),
  }),
  check(ctx, p, report) {
    const corner = ctx.deck.corners[0];
    for (const c of maximal(passChainsOf(ctx), p.maxSeries)) {
      const cell = ctx.cell;
      const devices = c.steps.flatMap((st) => st.edge.elements.map((e) => stepDevice(cell, st, e).name));
      // Anchor at the first device past the limit, counted from the driver: where a restoring stage has to go.
      let count = 0;
      let anchorStep = c.steps[c.steps.length - 1];
      for (const st of c.steps) {
        count += st.edge.depth;
        if (count > p.maxSeries) {
          anchorStep = st;
          break;
        }
      }
      const tau = elmoreDelay(ctx, c, corner);
      const path = [c.source, ...c.steps.map((st) => st.to)].map((n) => cell.nets[n]).join(' → ');
      const end = c.receivers.length ? `the restoring stage${c.receivers.length > 1 ? 's' : ''} on ${cell.nets[c.receiver]}` : `port ${cell.nets[c.receiver]}, unrestored`;
      const figure = chainFigure(ctx, c, corner);
      report({
        message:
          `${c.length} pass devices in series from ${c.sourceKind === 'stage' ? 'the driver of' : c.sourceKind === 'port' ? 'port' : 'instance pin'} ${cell.nets[c.source]} to ${end} (${path}), ` +
          `more than ${p.maxSeries}; Elmore delay of the chain about ${formatSi(tau, 's')} at corner ${corner.name}.`,
        loc: stepDevice(cell, anchorStep, anchorStep.edge.elements[0]).loc,
        nets: [cell.nets[c.source], ...c.steps.map((st) => cell.nets[st.to])],
        devices: [...new Set(devices)],
        measured: { value: c.length, unit: 'count' },
        limit: { value: p.maxSeries, unit: 'count' },
        corner: corner.name,
        plot: figure,
      });
    }
  },
});
