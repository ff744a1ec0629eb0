import { z } from 'zod';
import { defineRule } from '../types';
import { dynamicNodesOf, type LoadKind } from '../recognition/dynamic';
import { budgetPlot, nodeDevices, nodeLabel } from '../recognition/report';

const BAD: Partial<Record<LoadKind, [string, string]>> = {
  'pass-gate': ['pass-device gate', 'pass-device gates'],
  diffusion: ['device channel leading to an undriven net (sharing the node’s charge)', 'device channels leading to undriven nets (sharing the node’s charge)'],
  'other-gate': ['gate of a device in no recognised stage', 'gates of devices in no recognised stage'],
};

export default defineRule({
  meta: {
    id: 'dynamic.output-load',
    title: 'Dynamic node drives more than its output stage',
    area: 'dynamic',
    rationale:
      'A dynamic node holds its level only as charge, so everything it drives is a liability: a pass device or a diffusion shares that charge (and lets noise in from the far side), ' +
      'and every extra gate adds capacitance the evaluation must discharge and wire that picks up coupling. ' +
      'The node should drive static gate inputs only, and few of them: its output inverter, and the keeper that inverter controls.',
    fix: 'Buffer the node with its output inverter and drive everything else from the inverter’s output.',
    defaultSeverity: 'warning',
  },
  params: z.object({
    // Rule of thumb of the trade: a domino node drives its output inverter and at most one more gate.
    maxReceivers: z.number().int().min(1).max(64).default(2).meta({ unit: 'count', label: 'Most stages a dynamic node may drive' }),
  }),
  check(ctx, p, report) {
    for (const d of dynamicNodesOf(ctx)) {
      if (d.unknown.length) continue;
      const bad = d.loads.filter((l) => BAD[l.kind]);
      const receivers = new Set(d.loads.filter((l) => l.stage !== null && (l.kind === 'static-gate' || l.kind === 'evaluation')).map((l) => l.stage));
      const tooMany = receivers.size > p.maxReceivers;
      if (!bad.length && !tooMany) continue;
      const parts: string[] = [];
      for (const kind of Object.keys(BAD) as LoadKind[]) {
        const of = bad.filter((l) => l.kind === kind);
        if (!of.length) continue;
        const names = of.slice(0, 6).map((l) => l.device).join(', ') + (of.length > 6 ? ` and ${of.length - 6} more` : '');
        parts.push(`it reaches ${of.length} ${BAD[kind]![of.length > 1 ? 1 : 0]}: ${names}`);
      }
      if (tooMany) parts.push(`it drives ${receivers.size} stages, more than ${p.maxReceivers}`);
      report({
        message: `${nodeLabel(d)}: ${parts.join('; ')}. Only static gate inputs of its output stage belong on a dynamic node.`,
        loc: d.anchor,
        nets: [d.name],
        devices: [...new Set([...nodeDevices(d), ...bad.map((l) => l.device)])].slice(0, 50),
        measured: { value: bad.length ? bad.length : receivers.size, unit: 'count' },
        limit: { value: bad.length ? 0 : p.maxReceivers, unit: 'count' },
        plot: tooMany
          ? budgetPlot([{ label: `stages driven by ${d.name}`, measured: { value: receivers.size, unit: 'count' }, limit: { value: p.maxReceivers, unit: 'count' }, sense: 'max' }])
          : null,
      });
    }
  },
});
