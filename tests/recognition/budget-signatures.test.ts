// Dynamic-node budgets are memoised by the structure of a node's neighbourhood, so that a flat
// block of thousands of equal domino gates is solved once per distinct gate. Sharing must never
// change a result: every node's budgets must equal those of the same gate read in a design of
// its own (no memo shared), and a node that differs in one device size must not share.
// The budgets themselves are checked against the charge formulas in tests/electrical/charge.test.ts.

import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { checkDesign } from '../../rules/engine';
import { defaultDeck } from '../../rules/default-deck';
import { defineRule, type CellContext } from '../../rules/types';
import { dynamicBudgets, type CornerBudget } from '../../rules/recognition/budgets';
import { dynamicNodesOf } from '../../rules/recognition/dynamic';
import { NumberKey, NumberKeyTable } from '../../rules/signature-key';
import { read } from './support';

// Invented: the "Tarnwell" match line, footed domino gates with half keepers, written the way a schematic netlister does.
function gate(i: number, keeperWidth = 0.42, evalWidth = 0.84): string[] {
  return [
    `Mpre${i} dyn${i} clk vdd vdd pch w=1.0 l=0.15`,
    `Mev${i}a dyn${i} a${i} s${i} vss nch w=${evalWidth} l=0.15`,
    `Mev${i}b s${i} b${i} ft${i} vss nch w=0.84 l=0.15`,
    `Mft${i} ft${i} clk vss vss nch w=1.26 l=0.15`,
    `Mkp${i} dyn${i} y${i} vdd vdd pch w=${keeperWidth} l=0.3`,
    `Mno${i} y${i} dyn${i} vss vss nch w=0.65 l=0.15`,
    `Mpo${i} y${i} dyn${i} vdd vdd pch w=1.0 l=0.15`,
  ];
}

function deckText(gates: string[][]): string {
  return ['* tarnwell match line', '.option scale=1e-6', 'Vdd vdd 0 1.8', 'Vss vss 0 0', 'Vclk clk 0 pulse(0 1.8 0 50p 50p 1n 2n)', ...gates.flat(), '.end'].join('\n');
}

/** Budgets of every dynamic node of the top level, by node name, computed by the real engine. */
function budgetsOf(text: string): Map<string, CornerBudget[]> {
  const deck = defaultDeck();
  const out = new Map<string, CornerBudget[]>();
  const probe = defineRule({
    meta: { id: 'test.budgets', title: 'probe', area: 'dynamic', rationale: '', fix: '', defaultSeverity: 'info' },
    params: z.object({}),
    check(ctx: CellContext) {
      for (const d of dynamicNodesOf(ctx)) out.set(d.name, dynamicBudgets(d));
    },
  });
  checkDesign(read(text, deck), { ...deck, rules: { 'test.budgets': { enabled: true, severity: 'info', params: {} } } }, { rules: [probe] });
  return out;
}

describe('dynamic-node budgets shared by neighbourhood structure', () => {
  const together = budgetsOf(deckText([gate(1), gate(2), gate(3, 0.84), gate(4, 0.42, 0.65)]));
  // Net and stage ids number the nets and stages of one cell and differ between the two designs: the electrical figures may not.
  const withoutStageIds = (bs: CornerBudget[] | undefined) =>
    bs?.map((b) => ({
      corner: b.corner,
      capacitance: b.capacitance,
      threshold: [b.threshold.value, b.threshold.source],
      sharing: [b.chargeSharing.drop, b.chargeSharing.cShared, b.chargeSharing.cNode, b.chargeSharingDrop],
      keepers: b.keepers.map((k) => [k.ratio, k.keeperCurrent, k.pullDownCurrent]),
      leakage: b.leakage,
    }));
  const alone = (g: string[]) => withoutStageIds([...budgetsOf(deckText([g])).values()][0]);
  const shared = (name: string) => withoutStageIds(together.get(name));

  it('finds the four nodes', () => {
    expect([...together.keys()].sort()).toEqual(['dyn1', 'dyn2', 'dyn3', 'dyn4']);
  });

  it('gives every node exactly the budgets of the same gate read alone', () => {
    expect(shared('dyn1')).toEqual(alone(gate(1)));
    expect(shared('dyn2')).toEqual(alone(gate(2)));
    expect(shared('dyn3')).toEqual(alone(gate(3, 0.84)));
    expect(shared('dyn4')).toEqual(alone(gate(4, 0.42, 0.65)));
  });

  it('does not share between gates that differ in one device', () => {
    const ratio = (name: string) => together.get(name)![0].keepers[0].ratio;
    expect(ratio('dyn2')).toBe(ratio('dyn1'));
    // A keeper twice as wide carries about twice the current (square law, same bias): the ratio roughly doubles.
    expect(ratio('dyn3') / ratio('dyn1')).toBeGreaterThan(1.8);
    expect(ratio('dyn3') / ratio('dyn1')).toBeLessThan(2.2);
    // A narrower evaluation device weakens the evaluation path: the keeper ratio rises.
    expect(ratio('dyn4')).toBeGreaterThan(ratio('dyn1'));
    // The node capacitance counts the evaluation device's junction: it differs too.
    expect(together.get('dyn4')![0].capacitance).toBeLessThan(together.get('dyn1')![0].capacitance);
  });
});

describe('number keys', () => {
  const keyOf = (xs: number[]) => {
    const k = new NumberKey();
    for (const x of xs) k.push(x);
    return k;
  };

  it('tells apart doubles one unit in the last place apart, and equal lists of different lengths', () => {
    const table = new NumberKeyTable<string>();
    expect(table.getOrCompute(keyOf([0.84e-6, 3]), () => 'a')).toBe('a');
    expect(table.getOrCompute(keyOf([0.84e-6 * (1 + Number.EPSILON), 3]), () => 'b')).toBe('b');
    expect(table.getOrCompute(keyOf([0.84e-6, 3, 0]), () => 'c')).toBe('c');
    expect(table.getOrCompute(keyOf([0.84e-6, 3]), () => 'd')).toBe('a');
    expect(table.size).toBe(3);
  });

  it('grows past its first buffer and keeps every number', () => {
    const long = Array.from({ length: 1000 }, (_, i) => i * 0.5);
    const table = new NumberKeyTable<number>();
    table.getOrCompute(keyOf(long), () => 1);
    expect(table.getOrCompute(keyOf(long), () => 2)).toBe(1);
    expect(table.getOrCompute(keyOf([...long.slice(0, 999), 1]), () => 3)).toBe(3);
  });
});
