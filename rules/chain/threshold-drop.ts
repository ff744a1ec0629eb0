import { z } from 'zod';
import { defineRule } from '../types';
import { passChainsOf, passedLevels, stepDevice } from '../recognition/pass';
import { chainFigure, receiverLevels } from '../recognition/chain-report';
import { formatSi } from '../units';

const volts = (x: number) => formatSi(x, 'V');

export default defineRule({
  meta: {
    id: 'chain.threshold-drop',
    title: 'Pass device cannot deliver the level its receiver needs',
    area: 'chain',
    rationale:
      'An n-channel pass device stops conducting a high level once its source is a threshold below its gate, and the body effect raises that threshold as the level rises: ' +
      'a high arrives as VDD − VT at best. A p-channel device likewise stops a low at |VT|. ' +
      'If that is short of the receiving gate’s VIH (VIL), the receiver is never fully switched: it draws static current and its output is not a clean level.',
    fix: 'Use a transmission gate (add the complementary device), add a level-restoring pull-up (a weak p-channel device fed back from the receiver’s output), or raise the pass device’s gate above VDD.',
    defaultSeverity: 'error',
  },
  params: z.object({
    margin: z.number().min(0).max(2).default(0).meta({ unit: 'V', label: 'Margin the passed level must keep beyond VIH (VIL)' }),
  }),
  check(ctx, p, report) {
    const cell = ctx.cell;
    for (const c of passChainsOf(ctx)) {
      if ((!c.degradesHigh && !c.degradesLow) || !c.receivers.length) continue;
      let worst: { slack: number; high: boolean; level: number; need: number; device: string; corner: string; stage: number } | null = null;
      ctx.deck.corners.forEach((corner, ci) => {
        const levels = passedLevels(ctx, c, corner);
        for (const r of receiverLevels(ctx, c, ci)) {
          if (c.degradesHigh && r.vih !== null) {
            const slack = levels.high - (r.vih + p.margin);
            if (!worst || slack < worst.slack) worst = { slack, high: true, level: levels.high, need: r.vih + p.margin, device: levels.highDevice ?? '', corner: corner.name, stage: r.stage.id };
          }
          if (c.degradesLow && r.vil !== null) {
            const slack = r.vil - p.margin - levels.low;
            if (!worst || slack < worst.slack) worst = { slack, high: false, level: levels.low, need: r.vil - p.margin, device: levels.lowDevice ?? '', corner: corner.name, stage: r.stage.id };
          }
        }
      });
      const w = worst as { slack: number; high: boolean; level: number; need: number; device: string; corner: string; stage: number } | null;
      if (!w || w.slack >= 0) continue;
      const corner = ctx.deck.corners.find((k) => k.name === w.corner)!;
      const devices = c.steps.flatMap((st) => st.edge.elements.map((e) => stepDevice(cell, st, e).name));
      const step = c.steps.find((st) => st.edge.elements.some((e) => stepDevice(cell, st, e).name === w.device)) ?? c.steps[0];
      const kind = w.high ? 'n-channel' : 'p-channel';
      report({
        message:
          `${kind} pass device ${w.device} delivers ${w.high ? 'a high' : 'a low'} of only ${volts(w.level)} to ${cell.nets[c.receiver]} at corner ${w.corner} ` +
          `(${w.high ? 'VDD − VT' : '|VT|'} with the body effect), ${w.high ? 'below' : 'above'} the receiving stage's ${w.high ? 'VIH' : 'VIL'} ` +
          `${p.margin ? `${w.high ? 'plus' : 'minus'} ${volts(p.margin)} ` : ''}(${volts(w.need)}).`,
        loc: stepDevice(cell, step, step.edge.elements.find((e) => stepDevice(cell, step, e).name === w.device) ?? step.edge.elements[0]).loc,
        nets: [cell.nets[c.source], ...c.steps.map((st) => cell.nets[st.to])],
        devices: [...new Set(devices)],
        measured: { value: w.level, unit: 'V' },
        limit: { value: w.need, unit: 'V' },
        corner: w.corner,
        plot: chainFigure(ctx, c, corner, w.high),
      });
    }
  },
});
