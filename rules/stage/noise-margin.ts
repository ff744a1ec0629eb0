import { z } from 'zod';
import { defineRule } from '../types';
import { heldText, sourcesText, stageAnalysesOf, stageDeviceNames, stageLabel, transferPlot, volts } from '../stages';

export default defineRule({
  meta: {
    id: 'stage.noise-margin',
    title: 'Noise margin too small',
    area: 'stage',
    rationale:
      'The noise margins NMH = VOH − VIH and NML = VIL − VOL are how much noise a level can pick up between two stages and still be read correctly. ' +
      'A stage with a small margin flips on coupling, supply bounce or a weak previous stage.',
    fix: 'Resize the pull-up against the pull-down to centre the switching threshold, shorten series stacks, or drive the input from a stronger stage.',
    defaultSeverity: 'warning',
  },
  params: z.object({
    // Rule of thumb of the trade: keep each noise margin above about a tenth of the supply.
    minFraction: z
      .number()
      .min(0)
      .max(0.5)
      .default(0.1)
      .meta({ unit: 'ratio', label: 'Smallest noise margin as a fraction of VDD' }),
  }),
  // One finding per static stage, for its worst input, case and corner; anchored at the stage's first device line in netlist order.
  // Stages without unity-gain points have no margins at all; stage.non-regenerative reports those.
  check(ctx, p, report) {
    const cell = ctx.cell;
    for (const a of stageAnalysesOf(ctx)) {
      const narrowest = a.smallestMargin();
      if (!narrowest || narrowest.value >= p.minFraction) continue;
      const { corner, input, value: fraction } = narrowest;
      const st = a.stage;
      const r = corner.worstMargin.result;
      const high = r.nmh! < r.nml!;
      const margin = high ? r.nmh! : r.nml!;
      const held = heldText(cell, corner.worstMargin.held);
      const which = high ? `NMH = VOH − VIH = ${volts(r.voh)} − ${volts(r.vih!)}` : `NML = VIL − VOL = ${volts(r.vil!)} − ${volts(r.vol)}`;
      report({
        message:
          `${stageLabel(cell, st)}: ${which} = ${volts(margin)}, ${(100 * fraction).toFixed(1)} % of VDD ` +
          `(input ${cell.nets[input]}${held ? `, ${held}` : ''}; corner ${corner.corner}), below ${(100 * p.minFraction).toFixed(1)} %. ` +
          `Device values: ${sourcesText(corner)}.`,
        loc: st.anchor,
        nets: [...(st.output === null ? [] : [cell.nets[st.output]]), ...st.inputs.map((n) => cell.nets[n])],
        devices: stageDeviceNames(cell, st),
        measured: { value: margin, unit: 'V' },
        limit: { value: p.minFraction * corner.vdd, unit: 'V' },
        corner: corner.corner,
        plot: transferPlot(r),
      });
    }
  },
});
