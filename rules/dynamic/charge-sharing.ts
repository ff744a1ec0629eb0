import { z } from 'zod';
import { defineRule } from '../types';
import { dynamicBudgets } from '../recognition/budgets';
import { dynamicNodesOf } from '../recognition/dynamic';
import { allowedSwing, budgetPlot, f, netOf, nodeDevices, nodeLabel, thresholdText, v, worstBy } from '../recognition/report';

export default defineRule({
  meta: {
    id: 'dynamic.charge-sharing',
    title: 'Charge sharing takes the node past its receiver’s threshold',
    area: 'dynamic',
    rationale:
      'When evaluation connects discharged stack nodes to a precharged node without completing the path to ground, the node’s charge spreads over them and its level drops by ' +
      'ΔV = VDD·Cint/(Cint + Cnode). If the drop reaches the receiving stage’s switching region the output glitches, and the dynamic node, which does not regenerate, ' +
      'cannot win its level back before the next precharge.',
    fix: 'Precharge the stack nodes too (small devices on the clock), move the inputs that switch late next to the rail, add capacitance to the node, or strengthen the keeper.',
    defaultSeverity: 'error',
  },
  params: z.object({
    // Rule of thumb of the trade: keep a tenth of a volt between the shared level and the receiver's threshold.
    margin: z.number().min(0).max(2).default(0.1).meta({ unit: 'V', label: 'Margin kept beyond the receiver’s threshold' }),
  }),
  check(ctx, p, report) {
    for (const d of dynamicNodesOf(ctx)) {
      if (d.unknown.length) continue;
      const per = dynamicBudgets(d).map((b) => ({ b, drop: b.chargeSharingDrop, allowed: allowedSwing(d, b, p.margin) }));
      const worst = worstBy(per, (x) => x.allowed - x.drop);
      if (worst.drop <= worst.allowed) continue;
      const b = worst.b;
      const cs = b.chargeSharing;
      const shared = cs.sharedNets.map((n) => netOf(d, n));
      const high = cs.highInputs.map((n) => netOf(d, n));
      report({
        message:
          `${nodeLabel(d)}: with ${high.length ? `${high.join(', ')} high` : 'the clock alone'} and no path to the rail, the node shares its charge with ${shared.join(', ')} ` +
          `(${f(cs.cShared)} against ${f(b.capacitance)} on the node) and drops by ${v(worst.drop)} at corner ${b.corner}; ` +
          `${v(worst.allowed)} is allowed before ${thresholdText(d, b)} less ${v(p.margin)}.${cs.exhaustive ? '' : ' (Worst case found by a greedy search over many inputs.)'}`,
        loc: d.anchor,
        nets: [d.name, ...shared],
        devices: nodeDevices(d),
        measured: { value: worst.drop, unit: 'V' },
        limit: { value: worst.allowed, unit: 'V' },
        corner: b.corner,
        plot: budgetPlot(per.map((x) => ({ label: `charge-sharing drop, ${x.b.corner}`, measured: { value: x.drop, unit: 'V' }, limit: { value: x.allowed, unit: 'V' }, sense: 'max' }))),
      });
    }
  },
});
