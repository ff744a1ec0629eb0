import { z } from 'zod';
import { defineRule } from '../types';
import { dynamicNodesOf, levelIn, type DynamicNode } from '../recognition/dynamic';
import { describeTiming, timingOf } from '../recognition/timing';
import { netOf, nodeDevices, nodeLabel } from '../recognition/report';

const HALF = ['low', 'high'] as const;

export default defineRule({
  meta: {
    id: 'dynamic.cascade-monotonicity',
    title: 'Dynamic node drives an evaluation input directly',
    area: 'dynamic',
    rationale:
      'A dynamic stage may only see inputs that rise during evaluation, never fall: at the start of evaluation a precharged node is still high, so a second stage it drives directly ' +
      'turns its evaluation device on and starts to discharge before the first node has had time to fall. The second node cannot recover the charge it lost, ' +
      'and its output is wrong for the rest of the cycle. The inverter after each domino node exists to make the signals between stages monotonic.',
    fix: 'Drive the next stage from the node’s output inverter (domino), not from the node itself; or put the second stage on a later clock phase.',
    defaultSeverity: 'error',
  },
  params: z.object({}),
  check(ctx, _p, report) {
    const nodes = dynamicNodesOf(ctx);
    const byNode = new Map<string, DynamicNode>();
    for (const d of nodes) if (d.ctx === ctx) byNode.set(String(d.node), d);
    for (const d2 of nodes) {
      if (d2.unknown.length || d2.prechargeHalf === null || !d2.clockTiming) continue;
      const timing = timingOf(d2.ctx).timing;
      const phase = d2.clockTiming.phase;
      const h = d2.prechargeHalf;
      const e = (1 - h) as 0 | 1;
      const on = d2.style === 'n-evaluate' ? 1 : 0;
      for (const g of d2.inputs) {
        const t = timing[g];
        if (!t || t.phase !== phase) continue;
        // On when evaluation starts (its level in the precharge half), and not known to stay on through evaluation.
        if (levelIn(t, phase, h) !== on || levelIn(t, phase, e) === on) continue;
        const driver: DynamicNode | undefined = t.kind === 'dynamic' && d2.ctx === ctx ? byNode.get(String(g)) : undefined;
        const what =
          t.kind === 'dynamic'
            ? driver
              ? `${nodeLabel(driver)} drives evaluation input ${netOf(d2, g)} of the next stage directly, with no inverter between them`
              : `evaluation input ${netOf(d2, g)} carries a dynamic node of phase ${phase} from outside this cell, with no inverter between them`
            : `evaluation input ${netOf(d2, g)} (${describeTiming(t)}) is ${on ? 'high' : 'low'} when evaluation starts and may change during it`;
        report({
          message:
            `${what}; ${nodeLabel(d2)} evaluates while ${phase} is ${HALF[e]}, so its evaluation device on ${netOf(d2, g)} conducts from the start ` +
            `and discharges the node before the input settles: the lost charge never comes back.`,
          loc: driver ? driver.anchor : d2.anchor,
          nets: [...new Set([netOf(d2, g), d2.name])],
          devices: [...new Set([...(driver ? nodeDevices(driver) : []), ...nodeDevices(d2)])],
        });
      }
    }
  },
});
