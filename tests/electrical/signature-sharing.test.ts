// Stages of one signature share one analysis (the memo keys on a numeric encoding of the
// signature, bucketed by a hash). Sharing must never join stages whose DC curves differ:
// every stage's shared analysis must equal the analysis of that stage solved alone, with
// no memo (the same current balance at the output node, Rabaey et al., Digital Integrated
// Circuits, 2nd ed., §5.3, solved afresh).

import { describe, expect, it } from 'vitest';
import { defaultDeck } from '../../rules/default-deck';
import { localRails } from '../../rules/engine';
import { makeContext, stageEnvironmentOf } from '../../rules/recognition/context';
import { analyseStage, analysisStats, STATIC_KINDS, stageAnalysesOf, stageSignature, stagesOf, type Stage, type StageAnalysis } from '../../rules/stages';
import { generateFlatNetlist } from '../bench/netlist';
import { read } from '../recognition/support';

const figures = (a: StageAnalysis) =>
  a.inputs.map((i) => ({
    input: i.input,
    corners: i.corners.map((c) => ({
      corner: c.corner,
      cases: c.cases.map((x) => ({ held: x.held, vm: x.result.vm, gain: x.result.gainAtVm, vil: x.result.vil, vih: x.result.vih, voh: x.result.voh, vol: x.result.vol })),
      worst: c.cases.indexOf(c.worstMargin),
      weakest: c.cases.indexOf(c.weakestGain),
    })),
  }));

describe('analyses shared by signature', () => {
  // The benchmark's invented "Harrow" slice, small: inverters, NANDs with stack nodes, domino stages, pass gates.
  const deck = defaultDeck();
  const design = read(generateFlatNetlist(3000, 7), deck);
  const cell = design.cells.get('harrow_flat')!;
  const ctx = makeContext(design, deck, cell, localRails(design, cell, deck));
  const analyses = stageAnalysesOf(ctx);
  const env = stageEnvironmentOf(ctx);

  it('share: far fewer signatures than analysed stages', () => {
    const analysed = analyses.filter((a) => a.inputs.length > 0).length;
    expect(analysed).toBeGreaterThan(300);
    expect(analysisStats(design).signatures).toBeLessThan(analysed / 2);
  });

  it('every shared analysis equals the stage solved alone (a third of the stages, signatures with several stages among them)', () => {
    const bySignature = new Map<string, number>();
    let compared = 0;
    for (const [i, a] of analyses.entries()) {
      if (!a.inputs.length || i % 3 !== 0) continue;
      // A copy of the design object has a memo of its own: nothing is shared with the first look.
      const alone = analyseStage({ ...env, design: { ...design } }, stagesOf(ctx).stages[i]);
      expect(figures(alone)).toEqual(figures(a));
      bySignature.set(stageSignature(env, a.stage), (bySignature.get(stageSignature(env, a.stage)) ?? 0) + 1);
      compared++;
    }
    expect(compared).toBeGreaterThan(100);
    expect([...bySignature.values()].some((n) => n > 1)).toBe(true);
  });

  it('only the static kinds get a transfer curve: a dynamic node or a pass device restores no level on its own', () => {
    // A dynamic node is not regenerative and a pass device has no supply path, so neither has a static DC transfer curve;
    // inverters, complementary, ratioed and clocked stages do (Rabaey et al., Digital Integrated Circuits, 2nd ed., ch. 6, chapter cited from memory).
    const inverter = stagesOf(ctx).stages.find((st) => st.kind === 'inverter')!;
    const kinds: Stage['kind'][] = ['inverter', 'complementary', 'ratioed', 'clocked', 'dynamic', 'pass', 'other'];
    for (const kind of kinds) {
      const a = analyseStage({ ...env, design: { ...design } }, { ...inverter, kind, notes: [] });
      expect(a.skipped === null, kind).toBe(STATIC_KINDS.has(kind));
      expect(a.inputs.length > 0, kind).toBe(STATIC_KINDS.has(kind));
    }
  });
});
