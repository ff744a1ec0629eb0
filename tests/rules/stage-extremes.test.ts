// The stage rules read each stage's weakest gain and narrowest noise margin from a
// per-signature summary instead of scanning every input and corner of every stage.
// The summary must pick exactly what the full scan picks (the definitions the rules
// used before: smallest |dVout/dVin| at VM, and smallest min(NMH, NML)/VDD with
// NMH = VOH − VIH, NML = VIL − VOL as in Rabaey et al., Digital Integrated Circuits,
// 2nd ed., §5.3), with the same held inputs, on stages with and without held inputs.

import { describe, expect, it } from 'vitest';
import { defaultDeck } from '../../rules/default-deck';
import { localRails } from '../../rules/engine';
import { makeContext } from '../../rules/recognition/context';
import { marginOf, stageAnalysesOf, type CornerAnalysis, type StageAnalysis } from '../../rules/stages';
import { read } from '../recognition/support';

// Invented scenario: the "Calloway" decode slice, gates of several widths under the built-in three-corner deck.
const text = [
  '.option scale=1e-6',
  '.subckt calloway a b c en y1 y2 y3 y4 y5 vdd vss',
  'Mna y1 a s1 vss nch w=0.65 l=0.15',
  'Mnb s1 b vss vss nch w=0.42 l=0.15',
  'Mpa y1 a vdd vdd pch w=0.84 l=0.15',
  'Mpb y1 b vdd vdd pch w=1.26 l=0.15',
  'Mn1 y2 a vss vss nch w=0.42 l=0.15',
  'Mn2 y2 b vss vss nch w=0.42 l=0.15',
  'Mn3 y2 c vss vss nch w=0.84 l=0.15',
  'Mp1 y2 a t1 vdd pch w=2.0 l=0.15',
  'Mp2 t1 b t2 vdd pch w=2.0 l=0.15',
  'Mp3 t2 c vdd vdd pch w=1.0 l=0.15',
  'Mni y3 y1 vss vss nch w=0.65 l=0.15',
  'Mpi y3 y1 vdd vdd pch w=1.0 l=0.15',
  '* a pseudo-n-channel stage: grounded-gate load, weak restoring',
  'Mpl y4 vss vdd vdd pch w=0.42 l=0.6',
  'Mnl y4 y3 vss vss nch w=0.42 l=0.15',
  'Mnx y5 en vss vss nch w=0.42 l=0.15',
  'Mpx y5 en vdd vdd pch w=4.0 l=0.15',
  '.ends calloway',
].join('\n');

/** The scan the stage rules did before: inputs in order, corners in order, strict improvement. */
function scanWeakest(a: StageAnalysis): { input: number; corner: CornerAnalysis; gain: number } | null {
  let worst: { input: number; corner: CornerAnalysis; gain: number } | null = null;
  for (const inp of a.inputs)
    for (const c of inp.corners) {
      const g = Math.abs(c.weakestGain.result.gainAtVm);
      if (!worst || g < worst.gain) worst = { input: inp.input, corner: c, gain: g };
    }
  return worst;
}

function scanNarrowest(a: StageAnalysis): { input: number; corner: CornerAnalysis; fraction: number } | null {
  let worst: { input: number; corner: CornerAnalysis; fraction: number } | null = null;
  for (const inp of a.inputs)
    for (const c of inp.corners) {
      const r = c.worstMargin.result;
      if (r.nmh === null || r.nml === null) continue;
      const fraction = Math.min(r.nmh, r.nml) / c.vdd;
      if (!worst || fraction < worst.fraction) worst = { input: inp.input, corner: c, fraction };
    }
  return worst;
}

const view = (c: CornerAnalysis) => ({
  corner: c.corner,
  vdd: c.vdd,
  cases: c.cases.map((x) => ({ held: x.held, result: x.result })),
  worst: c.cases.indexOf(c.worstMargin),
  weakest: c.cases.indexOf(c.weakestGain),
});

describe('per-signature stage extremes', () => {
  const deck = defaultDeck();
  const design = read(text, deck);
  const cell = [...design.cells.values()].find((c) => c.name === 'calloway')!;
  const analyses = stageAnalysesOf(makeContext(design, deck, cell, localRails(design, cell, deck)));
  const analysed = analyses.filter((a) => a.inputs.length > 0);

  it('covers stages with held inputs under several corners', () => {
    expect(deck.corners.length).toBeGreaterThan(1);
    expect(analysed.length).toBeGreaterThanOrEqual(5);
    expect(analysed.some((a) => a.inputs.some((i) => i.corners.some((c) => c.cases.some((x) => x.held.length > 0))))).toBe(true);
  });

  it('weakestGain() picks the input, corner and held case the full scan picks', () => {
    for (const a of analysed) {
      const want = scanWeakest(a)!;
      const got = a.weakestGain()!;
      expect(got.input).toBe(want.input);
      expect(got.value).toBe(want.gain);
      expect(view(got.corner)).toEqual(view(want.corner));
    }
  });

  it('smallestMargin() picks the input, corner and held case the full scan picks, or none when no case has margins', () => {
    for (const a of analysed) {
      const want = scanNarrowest(a);
      const got = a.smallestMargin();
      if (!want) {
        expect(got).toBeNull();
        continue;
      }
      expect(got!.input).toBe(want.input);
      expect(got!.value).toBe(want.fraction);
      expect(marginOf(got!.corner.worstMargin.result) / got!.corner.vdd).toBe(want.fraction);
      expect(view(got!.corner)).toEqual(view(want.corner));
    }
  });

  it('input(net) is the entry of inputs for that net, and undefined for a net the stage does not sweep', () => {
    for (const a of analysed) {
      for (const inp of a.inputs) expect(view(a.input(inp.input)!.corners[0])).toEqual(view(inp.corners[0]));
      expect(a.input(cell.netIndex.get('vdd')!)).toBeUndefined();
    }
  });
});
