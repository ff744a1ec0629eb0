import { z } from 'zod';
import { defineRule } from '../types';
import { networkElements } from '../electrical/network';
import { analyseStage, stageDeviceNames, stageLabel, stagesOf, transferPlot, volts } from '../stages';
import { stageLogic } from '../stages/classify';
import { stageEnvironmentOf } from '../recognition/context';
import { timingOf } from '../recognition/timing';

export default defineRule({
  meta: {
    id: 'stage.ratioed-logic',
    title: 'Ratioed (pseudo-n-channel or pseudo-p-channel) stage',
    area: 'stage',
    rationale:
      'A ratioed stage replaces one network with an always-on load, so its output level on one side is set by a fight between the load and the driving network: ' +
      'it never reaches the rail, it draws static current whenever the driving network conducts, and its margins depend on device ratios rather than on logic. ' +
      'It is a deliberate style in some places (wide NORs, sense circuits); this finding makes each one visible for review, and it is not a dynamic node.',
    fix: 'Confirm the stage is meant to be ratioed and that its static current is budgeted; otherwise replace the load with a complementary network.',
    defaultSeverity: 'info',
  },
  params: z.object({
    reportAboveFraction: z
      .number()
      .min(0)
      .max(1)
      .default(0)
      .meta({ unit: 'ratio', label: 'Report only when the fought-over output level is farther than this fraction of VDD from its rail (0: every ratioed stage)' }),
  }),
  check(ctx, p, report) {
    timingOf(ctx);
    const env = stageEnvironmentOf(ctx);
    for (const st of stagesOf(ctx).stages) {
      if (st.kind !== 'ratioed' || !st.pullUp || !st.pullDown) continue;
      const a = analyseStage(env, st);
      const logic = stageLogic(st, ctx.cell, env.railOf, env.alias);
      // Which side is the always-on load: the fought-over level is the low one for a pull-up load, the high one for a pull-down load.
      const loadUp = logic.allAlwaysOn(networkElements(st.pullUp));
      let worst: { level: number; gap: number; corner: string; vdd: number; r: (typeof a.inputs)[number]['corners'][number]['cases'][number]['result'] } | null = null;
      for (const inp of a.inputs) {
        for (const c of inp.corners) {
          for (const x of c.cases) {
            const level = loadUp ? x.result.vol : x.result.voh;
            const gap = loadUp ? level : c.vdd - level;
            if (!worst || gap / c.vdd > worst.gap / worst.vdd) worst = { level, gap, corner: c.corner, vdd: c.vdd, r: x.result };
          }
        }
      }
      if (worst && worst.gap / worst.vdd <= p.reportAboveFraction && p.reportAboveFraction > 0) continue;
      const loadNames = networkElements(loadUp ? st.pullUp : st.pullDown).map((e) => stageDeviceNames(ctx.cell, st)[e]);
      const level = worst
        ? `; its ${loadUp ? 'low' : 'high'} level is ${volts(worst.level)} at corner ${worst.corner}, ${volts(worst.gap)} from the rail, with static current flowing whenever it is ${loadUp ? 'low' : 'high'}`
        : '';
      report({
        message: `${stageLabel(ctx.cell, st)}: ${loadNames.join(', ')} ${loadNames.length > 1 ? 'are' : 'is'} an always-on ${loadUp ? 'pull-up' : 'pull-down'} load (${loadUp ? 'pseudo-n-channel' : 'pseudo-p-channel'} style)${level}. Not a dynamic node.`,
        loc: st.anchor,
        nets: [...(st.output === null ? [] : [ctx.cell.nets[st.output]]), ...st.inputs.map((n) => ctx.cell.nets[n])],
        devices: stageDeviceNames(ctx.cell, st),
        measured: worst ? { value: worst.gap, unit: 'V' } : null,
        limit: worst ? { value: p.reportAboveFraction * worst.vdd, unit: 'V' } : null,
        corner: worst?.corner ?? null,
        plot: worst ? transferPlot(worst.r) : null,
      });
    }
  },
});
