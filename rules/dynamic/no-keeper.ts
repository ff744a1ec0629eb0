import { z } from 'zod';
import { defineRule } from '../types';
import { dynamicBudgets } from '../recognition/budgets';
import { dynamicNodesOf } from '../recognition/dynamic';
import { allowedSwing, budgetPlot, f, a, nodeDevices, nodeLabel, s, thresholdText, v, worstBy } from '../recognition/report';
import { holdTime } from '../electrical/charge';

export default defineRule({
  meta: {
    id: 'dynamic.no-keeper',
    title: 'Dynamic node without a keeper',
    area: 'dynamic',
    rationale:
      'Between precharge and evaluation a dynamic node holds its level only as charge, and the off evaluation network leaks it away. ' +
      'A node is not regenerative: once leakage or noise has taken it past its receiver’s threshold, nothing restores it until the next precharge. ' +
      'Without a keeper the node survives only if the slowest clock (a scan or test clock, a stopped clock) comes back before the charge is gone.',
    fix: 'Add a weak keeper: a p-channel device from the supply to the node, gated by the node’s output inverter (a half keeper), sized to a small fraction of the evaluation path.',
    defaultSeverity: 'error',
  },
  params: z.object({
    // Rule of thumb of the trade: leave a tenth of a volt between the decayed level and the receiver's threshold.
    margin: z.number().min(0).max(2).default(0.1).meta({ unit: 'V', label: 'Margin kept above the receiver’s threshold' }),
    // A team that accepts unkept nodes with a long hold time (precharged bit lines read within one cycle, say) sets this;
    // leakage figures per µm are good to an order of magnitude, so ten periods is a sensible value then.
    acceptHoldRatio: z
      .number()
      .min(0)
      .max(1e6)
      .default(0)
      .meta({ unit: 'ratio', label: 'Accept an unkept node that holds this many slowest clock periods (0: report every unkept node)' }),
  }),
  check(ctx, p, report) {
    const period = ctx.deck.slowestClockPeriod;
    for (const d of dynamicNodesOf(ctx)) {
      if (d.keepers.length || d.unknown.length) continue;
      const budgets = dynamicBudgets(d).map((b) => {
        const allowed = allowedSwing(d, b, p.margin);
        return { b, allowed, hold: holdTime(b.capacitance, allowed, b.leakage) };
      });
      const worst = worstBy(budgets, (x) => x.hold);
      if (p.acceptHoldRatio > 0 && worst.hold >= p.acceptHoldRatio * period) continue;
      const b = worst.b;
      const verdict =
        worst.hold < period
          ? `shorter than the slowest clock period of ${s(period)}: the node decays before the clock returns`
          : p.acceptHoldRatio > 0
            ? `only ${(worst.hold / period).toPrecision(2)} times the slowest clock period of ${s(period)}, short of the ${p.acceptHoldRatio}× the deck asks of a node with no keeper`
            : `against the slowest clock period of ${s(period)}, with nothing to hold it against noise`;
      report({
        message:
          `${nodeLabel(d)} has no keeper. At corner ${b.corner} it holds for ${s(worst.hold)} ` +
          `(C = ${f(b.capacitance)}, ${a(b.leakage)} leaking through the off evaluation network, ${v(worst.allowed)} allowed before ${thresholdText(d, b)} less ${v(p.margin)}), ${verdict}.`,
        loc: d.anchor,
        nets: [d.name],
        devices: nodeDevices(d),
        measured: Number.isFinite(worst.hold) ? { value: worst.hold, unit: 's' } : null,
        limit: { value: period, unit: 's' },
        corner: b.corner,
        plot: budgetPlot(budgets.filter((x) => Number.isFinite(x.hold)).map((x) => ({ label: `hold time, ${x.b.corner}`, measured: { value: x.hold, unit: 's' }, limit: { value: period, unit: 's' }, sense: 'min' }))),
      });
    }
  },
});
