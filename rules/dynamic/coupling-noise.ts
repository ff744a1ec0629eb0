import { z } from 'zod';
import { defineRule } from '../types';
import { dynamicBudgets, hierarchicalCapacitance, netCapacitance, thresholdOf } from '../recognition/budgets';
import { cellIndex } from '../recognition/context';
import { dynamicNodesOf, type DynamicNode } from '../recognition/dynamic';
import { allowedSwing, budgetPlot, f, netOf, nodeDevices, nodeLabel, thresholdText, v, worstBy, type BudgetBar } from '../recognition/report';
import { isMosElement } from '../stages';

interface Aggressor {
  net: number;
  capacitance: number;
  device: string;
}

/** Coupling capacitors (explicit `C` elements between signal nets) on a net of the node's context. */
function aggressorsOn(d: DynamicNode, net: number): Aggressor[] {
  const index = cellIndex(d.ctx);
  const cell = d.ctx.cell;
  const x = index.alias[net];
  const byNet = new Map<number, Aggressor>();
  for (const i of index.others.of(x)) {
    const o = cell.others[i];
    if (o.kind !== 'cap' || o.value <= 0) continue;
    const a = index.alias[o.a];
    const b = index.alias[o.b];
    const other = a === x ? b : a;
    if (other === x || index.railOf(other)) continue;
    const prev = byNet.get(other);
    if (prev) prev.capacitance += o.value;
    else byNet.set(other, { net: other, capacitance: o.value, device: o.name });
  }
  return [...byNet.values()];
}

export default defineRule({
  meta: {
    id: 'dynamic.coupling-noise',
    title: 'Coupling glitch on a dynamic node or a low evaluation input',
    area: 'dynamic',
    rationale:
      'A neighbouring wire that switches couples a glitch ΔV = Vswing·Cc/(Cc + Cvictim) onto a net through their coupling capacitance. ' +
      'On a precharged node a falling neighbour pulls the level down; on a low evaluation input a rising neighbour lifts it towards the evaluation device’s threshold. ' +
      'Either can turn the output stage and the keeper off, and a dynamic node does not regenerate: once the charge is gone it is gone for the rest of the cycle. ' +
      'All aggressors of a victim are taken to switch together, the worst case.',
    fix: 'Space or shield the neighbouring wire, add capacitance to the victim, strengthen the keeper, or drive the evaluation input from a stronger stage.',
    defaultSeverity: 'error',
  },
  params: z.object({
    // Rule of thumb of the trade: keep a tenth of a volt of margin against a coupling glitch.
    margin: z.number().min(0).max(2).default(0.1).meta({ unit: 'V', label: 'Margin kept beyond the threshold' }),
  }),
  check(ctx, p, report) {
    for (const d of dynamicNodesOf(ctx)) {
      if (d.unknown.length) continue;
      const budgets = dynamicBudgets(d);
      const aggressors = aggressorsOn(d, d.node);
      if (aggressors.length) {
        const cc = aggressors.reduce((sum, x) => sum + x.capacitance, 0);
        const per = budgets.map((b) => ({ b, glitch: (b.vdd * cc) / Math.max(b.capacitance, cc), allowed: allowedSwing(d, b, p.margin) }));
        const worst = worstBy(per, (x) => x.allowed - x.glitch);
        if (worst.glitch > worst.allowed) {
          const list = aggressors.map((x) => `${netOf(d, x.net)} (${f(x.capacitance)}, ${x.device})`).join(', ');
          report({
            message:
              `${nodeLabel(d)}: coupling from ${list} gives a glitch of ${v(worst.glitch)} at corner ${worst.b.corner} ` +
              `(Cc = ${f(cc)} of ${f(worst.b.capacitance)} total on the node, full-swing aggressors), beyond the ${v(worst.allowed)} allowed before ${thresholdText(d, worst.b)} less ${v(p.margin)}.`,
            loc: d.anchor,
            nets: [d.name, ...aggressors.map((x) => netOf(d, x.net))],
            devices: [...nodeDevices(d), ...aggressors.map((x) => x.device)],
            measured: { value: worst.glitch, unit: 'V' },
            limit: { value: worst.allowed, unit: 'V' },
            corner: worst.b.corner,
            plot: budgetPlot(per.map((x): BudgetBar => ({ label: `glitch on ${d.name}, ${x.b.corner}`, measured: { value: x.glitch, unit: 'V' }, limit: { value: x.allowed, unit: 'V' }, sense: 'max' }))),
          });
        }
      }
      // Low evaluation inputs: a rising aggressor lifts them towards the threshold of the evaluation device they gate.
      const index = cellIndex(d.ctx);
      const cell = d.ctx.cell;
      for (const g of d.inputs) {
        // The node itself only falls during evaluation, which pulls its inputs down: not an aggressor for a low input.
        const on = aggressorsOn(d, g).filter((x) => x.net !== index.alias[d.node]);
        if (!on.length) continue;
        const el = d.stage.elements.find((x) => isMosElement(x) && index.alias[cell.mosfets.gate[x]] === g);
        const device = el !== undefined ? cell.mosfets.at(el) : null;
        if (!device) continue;
        const cc = on.reduce((sum, x) => sum + x.capacitance, 0);
        const per = ctx.deck.corners.map((corner) => {
          // An input that is a net of the engine's cell may reach devices outside the node's region (its driver): count them.
          const host = d.host.net(g);
          const own = host === undefined ? netCapacitance(d.ctx, g, corner) : hierarchicalCapacitance(d.host.ctx, host, corner);
          const total = Math.max(own, cc);
          const glitch = (corner.vdd * cc) / total;
          const allowed = Math.max(thresholdOf(d.ctx, device.polarity, device.model, corner) - p.margin, 0);
          return { corner, glitch, allowed, total };
        });
        const worst = worstBy(per, (x) => x.allowed - x.glitch);
        if (worst.glitch <= worst.allowed) continue;
        const list = on.map((x) => `${netOf(d, x.net)} (${f(x.capacitance)}, ${x.device})`).join(', ');
        const level = d.style === 'n-evaluate' ? 'low' : 'high';
        report({
          message:
            `${nodeLabel(d)}: its ${level} evaluation input ${netOf(d, g)} takes a glitch of ${v(worst.glitch)} from ${list} at corner ${worst.corner.name} ` +
            `(Cc = ${f(cc)} of ${f(worst.total)} on the input), beyond the ${v(worst.allowed)} allowed below the threshold of ${device.name} less ${v(p.margin)}: ` +
            `the evaluation device turns on and the node loses charge it cannot regain.`,
          loc: d.anchor,
          nets: [d.name, netOf(d, g), ...on.map((x) => netOf(d, x.net))],
          devices: [...nodeDevices(d), ...on.map((x) => x.device)],
          measured: { value: worst.glitch, unit: 'V' },
          limit: { value: worst.allowed, unit: 'V' },
          corner: worst.corner.name,
          plot: budgetPlot(per.map((x): BudgetBar => ({ label: `glitch on ${netOf(d, g)}, ${x.corner.name}`, measured: { value: x.glitch, unit: 'V' }, limit: { value: x.allowed, unit: 'V' }, sense: 'max' }))),
        });
      }
    }
  },
});
