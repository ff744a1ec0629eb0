import { z } from 'zod';
import { defineRule } from '../types';
import { dynamicBudgets } from '../recognition/budgets';
import { dynamicNodesOf } from '../recognition/dynamic';
import { a, budgetPlot, keeperNames, nodeDevices, nodeLabel } from '../recognition/report';

const KIND_TEXT = { half: 'half keeper', full: 'full (cross-coupled) keeper', 'always-on': 'always-on pull-up' } as const;

export default defineRule({
  meta: {
    id: 'dynamic.keeper-ratio',
    title: 'Keeper strength outside its window',
    area: 'dynamic',
    rationale:
      'A keeper replaces the charge a dynamic node loses to leakage, charge sharing and coupling, so it must be strong enough to hold the node against them. ' +
      'It also fights the evaluation network every time the node should fall, so it must stay weak enough for the weakest evaluation path to win quickly: ' +
      'a keeper as strong as the evaluation path stalls the node half-way, and the receiver sees a level that is neither high nor low.',
    fix: 'Resize the keeper (its width, or a longer channel) until its on-current is a small fraction of the weakest evaluation path’s; a strong keeper can be split into a weak feedback device in series with a clocked one.',
    defaultSeverity: 'warning',
  },
  params: z.object({
    // Rules of thumb of the trade: a keeper carries about a tenth of the evaluation current; below a few per cent it no longer holds the node against noise, above about a third it slows evaluation badly.
    minRatio: z.number().min(0).max(10).default(0.03).meta({ unit: 'ratio', label: 'Weakest keeper, as a fraction of the weakest evaluation path’s current' }),
    maxRatio: z.number().min(0).max(10).default(0.3).meta({ unit: 'ratio', label: 'Strongest keeper, as a fraction of the weakest evaluation path’s current' }),
  }),
  check(ctx, p, report) {
    for (const d of dynamicNodesOf(ctx)) {
      if (!d.keepers.length || d.unknown.length) continue;
      const budgets = dynamicBudgets(d);
      d.keepers.forEach((k, i) => {
        const per = budgets.map((b) => ({ b, r: b.keepers[i] }));
        const weakest = per.reduce((w, x) => (x.r.ratio < w.r.ratio ? x : w));
        const strongest = per.reduce((w, x) => (x.r.ratio > w.r.ratio ? x : w));
        const tooWeak = weakest.r.ratio < p.minRatio;
        const tooStrong = strongest.r.ratio > p.maxRatio;
        if (!tooWeak && !tooStrong) return;
        const pick = tooStrong ? strongest : weakest;
        const r = pick.r;
        const names = keeperNames(d, k);
        const verdict = tooStrong
          ? `above ${p.maxRatio}: evaluation has to overpower the keeper${r.ratio >= 1 ? ', and at this ratio it cannot pull the node below the middle of the swing' : ' and slows down'}`
          : `below ${p.minRatio}: too weak to hold the node against leakage, charge sharing and coupling`;
        report({
          message:
            `${nodeLabel(d)}: ${KIND_TEXT[k.kind]} ${names.join(', ')} carries ${a(r.keeperCurrent)} against ${a(r.pullDownCurrent)} through the weakest evaluation path ` +
            `at corner ${pick.b.corner}, a ratio of ${r.ratio.toFixed(3)}, ${verdict}. (${r.basis}.)`,
          loc: d.anchor,
          nets: [d.name],
          devices: [...new Set([...nodeDevices(d), ...names])],
          measured: { value: r.ratio, unit: 'ratio' },
          limit: { value: tooStrong ? p.maxRatio : p.minRatio, unit: 'ratio' },
          corner: pick.b.corner,
          plot: budgetPlot(
            per.map((x) => ({
              label: `keeper / evaluation, ${x.b.corner}`,
              measured: { value: x.r.ratio, unit: 'ratio' },
              limit: { value: tooStrong ? p.maxRatio : p.minRatio, unit: 'ratio' },
              sense: tooStrong ? 'max' : 'min',
            })),
          ),
        });
      });
    }
  },
});
