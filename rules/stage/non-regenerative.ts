import { z } from 'zod';
import { defineRule } from '../types';
import { heldText, sourcesText, stageAnalysesOf, stageDeviceNames, stageLabel, transferPlot, volts } from '../stages';

export default defineRule({
  meta: {
    id: 'stage.non-regenerative',
    title: 'Stage does not restore levels',
    area: 'stage',
    rationale:
      'A stage pushes a disturbed level back towards the rails only if the magnitude of its gain at its switching threshold exceeds one. ' +
      'Below that, noise passed through a chain of such stages grows or settles mid-rail instead of dying out, and the logic fails.',
    fix: 'Replace the load with a complementary or properly ratioed pull-up, or follow the stage with a restoring (CMOS) stage before the next logic input.',
    defaultSeverity: 'error',
  },
  params: z.object({
    minGain: z
      .number()
      .min(0)
      .max(100)
      .default(1)
      .meta({ unit: 'V/V', label: 'Smallest gain magnitude at the switching threshold' }),
  }),
  // One finding per static stage, for its weakest input, case and corner; anchored at the stage's first device line in netlist order.
  check(ctx, p, report) {
    const cell = ctx.cell;
    for (const a of stageAnalysesOf(ctx)) {
      const weakest = a.weakestGain();
      if (!weakest || weakest.value > p.minGain) continue;
      const { corner, input } = weakest;
      const st = a.stage;
      const r = corner.weakestGain.result;
      const held = heldText(cell, corner.weakestGain.held);
      report({
        message:
          `${stageLabel(cell, st)} has gain ${r.gainAtVm.toFixed(2)} V/V at its switching threshold ${volts(r.vm)} ` +
          `(input ${cell.nets[input]}${held ? `, ${held}` : ''}; corner ${corner.corner}), at or below ${p.minGain} in magnitude: ` +
          `a disturbed level is not restored. Device values: ${sourcesText(corner)}.`,
        loc: st.anchor,
        nets: [...(st.output === null ? [] : [cell.nets[st.output]]), ...st.inputs.map((n) => cell.nets[n])],
        devices: stageDeviceNames(cell, st),
        measured: { value: weakest.value, unit: 'V/V' },
        limit: { value: p.minGain, unit: 'V/V' },
        corner: corner.corner,
        plot: transferPlot(r),
      });
    }
  },
});
