import { z } from 'zod';
import { defineRule } from '../types';
import { elementName, levelIn, dynamicNodesOf } from '../recognition/dynamic';
import { describeTiming, timingOf, UNKNOWN } from '../recognition/timing';
import { netOf, nodeDevices, nodeLabel } from '../recognition/report';
import { cellIndex } from '../recognition/context';
import type { Network } from '../electrical/network';
import { isMosElement } from '../stages';

const HALF = ['low', 'high'] as const;

export default defineRule({
  meta: {
    id: 'dynamic.phase-mismatch',
    title: 'Precharge and evaluation not on one clock phase',
    area: 'dynamic',
    rationale:
      'A dynamic stage works only if its precharge device and its footer take turns: the precharge conducts in one half of the clock, the footer in the other. ' +
      'Driving the footer from the complementary clock, or from another clock, lets both conduct at once (a path from supply to ground and a node that is never properly precharged) ' +
      'or neither (a node that never evaluates). A footless stage has no footer to protect it: if an input can be high while the node precharges, the same fight happens through the evaluation network.',
    fix: 'Gate the precharge device and the footer with the same clock net (a p-channel precharge and an n-channel footer then alternate by themselves); for a footless stage, drive its inputs only from signals that are low during precharge (the outputs of other domino stages of the same phase), or add a footer.',
    defaultSeverity: 'error',
  },
  params: z.object({}),
  check(ctx, _p, report) {
    for (const d of dynamicNodesOf(ctx)) {
      if (d.unknown.length) continue;
      const timing = timingOf(d.ctx).timing;
      const index = cellIndex(d.ctx);
      const cell = d.ctx.cell;
      const pre = d.clockTiming;
      const nEval = d.style === 'n-evaluate';
      const problems: string[] = [];
      const devices = new Set(nodeDevices(d));
      const nets = new Set([d.name, netOf(d, d.clock)]);
      for (const e of d.footers) {
        const el = d.stage.elements[e];
        const g = index.alias[cell.mosfets.gate[el]];
        if (g === d.clock) continue;
        const t = timing[g];
        const name = elementName(cell, d.stage, e);
        nets.add(netOf(d, g));
        if (!pre || !t || pre.phase !== t.phase) {
          problems.push(
            `footer ${name} is gated by ${netOf(d, g)}${t ? ` (${describeTiming(t)})` : ''}, not by the precharge clock ${netOf(d, d.clock)}${pre ? ` (${describeTiming(pre)})` : ''}: ` +
              `nothing guarantees that the two take turns`,
          );
          continue;
        }
        // Footer conducts when its gate is high (n-channel footer) or low (p-channel).
        const footerOn = nEval ? 1 : 0;
        const h = d.prechargeHalf;
        if (h === null) continue;
        const inPrecharge = levelIn(t, pre.phase, h);
        const inEvaluation = levelIn(t, pre.phase, (1 - h) as 0 | 1);
        if (inPrecharge === footerOn) {
          problems.push(
            `footer ${name} on ${netOf(d, g)} conducts while ${pre.phase} is ${HALF[h]}, the half in which ${netOf(d, d.clock)} precharges the node: ` +
              `precharge and footer are on together (the footer is driven by the complementary clock)`,
          );
        } else if (inEvaluation !== UNKNOWN && inEvaluation !== footerOn) {
          problems.push(`footer ${name} on ${netOf(d, g)} is off in both halves of ${pre.phase}: the node can never evaluate`);
        }
      }
      if (d.prechargeHalf !== null && pre) {
        // The evaluation network must be off throughout precharge: every path needs a device known off in that half
        // (a footer on the precharge clock, or an input low then).
        const h = d.prechargeHalf;
        const offLevel = nEval ? 0 : 1;
        const risky = new Set<number>();
        const mayConduct = (n: Network): number[] | null => {
          if (n.kind === 'leaf') {
            const el = d.stage.elements[n.element];
            if (!isMosElement(el)) return [];
            const g = index.alias[cell.mosfets.gate[el]];
            const r = index.railOf(g);
            if (r) return (r === 'power') === nEval ? [] : null;
            return levelIn(timing[g], pre.phase, h) === offLevel ? null : [g];
          }
          const parts = n.children.map(mayConduct);
          if (n.kind === 'series') return parts.some((x) => x === null) ? null : (parts as number[][]).flat();
          const open = parts.filter((x): x is number[] => x !== null);
          return open.length ? open.flat() : null;
        };
        for (const g of mayConduct(d.evaluation) ?? []) risky.add(g);
        if (risky.size) {
          const names = [...risky].map((g) => netOf(d, g));
          for (const n of names) nets.add(n);
          const shown = names.length > 8 ? `${names.slice(0, 8).join(', ')} and ${names.length - 8} more` : names.join(', ');
          const what = d.footers.length ? 'a branch of its evaluation network has no footer and' : 'the stage is footless and its evaluation network';
          problems.push(
            `${what} can conduct while ${pre.phase} is ${HALF[h]} (the precharge half): ` +
              `no device on the path through ${shown} is known to be off then, and an input ${nEval ? 'high' : 'low'} during precharge fights the precharge device`,
          );
        }
      }
      if (!problems.length) continue;
      report({
        message: `${nodeLabel(d)}: ${problems.join('; ')}.`,
        loc: d.anchor,
        nets: [...nets],
        devices: [...devices],
      });
    }
  },
});
