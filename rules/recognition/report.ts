// Pieces the dynamic-node rules share: names, descriptions and plots of a node.

import type { z } from 'zod';
import type { budgetPlotSchema } from '../../shared/findings';
import { formatSi } from '../units';
import type { CornerBudget } from './budgets';
import { elementName, type DynamicNode } from './dynamic';
import { networkElements } from '../electrical/network';

export type BudgetBar = z.infer<typeof budgetPlotSchema>['bars'][number];

export function budgetPlot(bars: BudgetBar[]): z.infer<typeof budgetPlotSchema> {
  return { kind: 'budget', bars };
}

export const v = (x: number) => formatSi(x, 'V');
export const s = (x: number) => formatSi(x, 's');
export const f = (x: number) => formatSi(x, 'F');
export const a = (x: number) => formatSi(x, 'A');

export function prechargeNames(d: DynamicNode): string[] {
  return d.precharge.map((e) => elementName(d.ctx.cell, d.stage, e));
}

/** Devices of the node's stage, precharge first (the anchor), for the finding's device list. */
export function nodeDevices(d: DynamicNode): string[] {
  const names = prechargeNames(d);
  for (let e = 0; e < d.stage.elements.length; e++) {
    const n = elementName(d.ctx.cell, d.stage, e);
    if (!names.includes(n)) names.push(n);
  }
  return names;
}

export function keeperNames(d: DynamicNode, k: DynamicNode['keepers'][number]): string[] {
  const els = networkElements(k.network);
  if (k.partner) els.push(...networkElements(k.partner));
  return els.map((e) => elementName(d.ctx.cell, d.stage, e));
}

export function netOf(d: DynamicNode, net: number): string {
  return d.ctx.cell.nets[net] ?? `#${net}`;
}

/** "dynamic node x (precharged by MPRE on clk)" or, across the hierarchy, "… gathered from Xpre, Xbit0 …". */
export function nodeLabel(d: DynamicNode): string {
  const where = d.paths.length ? `, gathered across ${d.paths.length > 4 ? `${d.paths.slice(0, 4).join(', ')} and ${d.paths.length - 4} more instances` : d.paths.join(', ')}` : '';
  const kind = d.style === 'n-evaluate' ? 'precharged' : 'pre-discharged';
  return `dynamic node ${d.name} (${kind} by ${prechargeNames(d).join(', ')} on ${netOf(d, d.clock)}${where})`;
}

/** The most constraining corner of a list by a slack function (smallest slack first). */
export function worstBy<T>(items: readonly T[], slack: (x: T) => number): T {
  let best = items[0];
  let bestSlack = slack(best);
  for (const x of items) {
    const sx = slack(x);
    if (sx < bestSlack) {
      best = x;
      bestSlack = sx;
    }
  }
  return best;
}

/** Headroom between the node's precharge level and the receiver's switching point, less a margin (V); never below zero. */
export function allowedSwing(d: DynamicNode, b: CornerBudget, margin: number): number {
  const headroom = d.style === 'n-evaluate' ? b.vdd - b.threshold.value : b.threshold.value;
  return Math.max(headroom - margin, 0);
}

export function thresholdText(d: DynamicNode, b: CornerBudget): string {
  const name = d.style === 'n-evaluate' ? 'VIH' : 'VIL';
  return b.threshold.source === 'receiver' ? `the receiving stage's ${name} ${v(b.threshold.value)}` : `an assumed switching point of VDD/2 = ${v(b.threshold.value)} (no static receiver)`;
}
