// chain.non-restoring: series pass devices between restoring stages. The count is the
// netlist's own structure (a tree of 2:1 transmission-gate multiplexers of depth k puts k
// devices in series); the delay quoted is Elmore's for an RC ladder, whose closed form
// for N equal sections is τ = R·C·N(N + 1)/2 (Elmore 1948; Rabaey et al., Digital
// Integrated Circuits, 2nd ed., §4.4).

import { describe, expect, it } from 'vitest';
import rule from '../../rules/chain/non-restoring';
import { defaultDeck } from '../../rules/default-deck';
import { chainPlotSchema } from '../../shared/findings';
import { checkDesign } from '../../rules/engine';
import { defineRule } from '../../rules/types';
import { elmoreDelay, passChainsOf } from '../../rules/recognition/pass';
import { corner, deckWith, nParams, pParams } from '../electrical/helpers';
import { z } from 'zod';
import { findingsOf, lineOf, read } from '../recognition/support';

/** A chain of `n` transmission gates from an inverter to an inverter. */
function tgChain(n: number, caps = ''): string {
  const lines = ['.subckt chain a s s_b y vdd vss', 'mdn n0 a vss vss nch w=1u l=0.25u', 'mdp n0 a vdd vdd pch w=2u l=0.25u'];
  for (let i = 0; i < n; i++) {
    lines.push(`mtn${i + 1} n${i} s n${i + 1} vss nch w=1u l=0.25u`, `mtp${i + 1} n${i} s_b n${i + 1} vdd pch w=2u l=0.25u`);
    if (caps) lines.push(`c${i + 1} n${i + 1} vss ${caps}`);
  }
  lines.push(`mrn y n${n} vss vss nch w=1u l=0.25u`, `mrp y n${n} vdd vdd pch w=2u l=0.25u`, '.ends');
  return lines.join('\n');
}

/** A 2^k:1 multiplexer tree of transmission gates (select pairs per level), then an inverter. */
function muxTree(levels: number): string {
  const inputs = 1 << levels;
  const lines = [`.subckt tree ${Array.from({ length: inputs }, (_, i) => `d${i}`).join(' ')} ${Array.from({ length: levels }, (_, l) => `s${l} s${l}_b`).join(' ')} y vdd vss`];
  let nets = Array.from({ length: inputs }, (_, i) => `d${i}`);
  for (let l = 0; l < levels; l++) {
    const next: string[] = [];
    for (let i = 0; i < nets.length; i += 2) {
      const out = `m${l}_${i / 2}`;
      lines.push(
        `mn${l}_${i} ${nets[i]} s${l}_b ${out} vss nch w=1u l=0.25u`,
        `mp${l}_${i} ${nets[i]} s${l} ${out} vdd pch w=2u l=0.25u`,
        `mn${l}_${i + 1} ${nets[i + 1]} s${l} ${out} vss nch w=1u l=0.25u`,
        `mp${l}_${i + 1} ${nets[i + 1]} s${l}_b ${out} vdd pch w=2u l=0.25u`,
      );
      next.push(out);
    }
    nets = next;
  }
  lines.push(`mrn y ${nets[0]} vss vss nch w=1u l=0.25u`, `mrp y ${nets[0]} vdd vdd pch w=2u l=0.25u`, '.ends');
  return lines.join('\n');
}

describe('chain.non-restoring', () => {
  it('raises on four transmission gates in series before the inverter, at the fourth', () => {
    const text = tgChain(4);
    const f = findingsOf(rule, text);
    expect(f).toHaveLength(1);
    expect(f[0].measured).toEqual({ value: 4, unit: 'count' });
    expect(f[0].limit).toEqual({ value: 3, unit: 'count' });
    expect(f[0].line).toBe(lineOf(text, 'mtn4'));
    expect(f[0].message).toContain('n0 → n1 → n2 → n3 → n4');
    const plot = chainPlotSchema.parse(f[0].plot);
    // Transmission gates pass the full level; the inverter restores it.
    expect(plot.levels.slice(0, 5).every((v) => Math.abs(v - plot.vdd) < 1e-9)).toBe(true);
  });

  it('does not raise on three', () => {
    expect(findingsOf(rule, tgChain(3))).toEqual([]);
  });

  it('counts a multiplexer tree by its depth: 16:1 (four levels) raises, 8:1 (three) does not', () => {
    expect(findingsOf(rule, muxTree(4)).map((f) => f.measured!.value)).toEqual([4]);
    expect(findingsOf(rule, muxTree(3))).toEqual([]);
  });

  it('quotes the Elmore delay of the chain, which grows as N(N + 1)/2 for equal sections', () => {
    // Explicit capacitors only (zero per-µm figures), equal on every node: an RC ladder of equal sections.
    const deck = deckWith([corner({ nmos: { ...nParams, cjPerUm: 0, cgPerUm: 0 }, pmos: { ...pParams, cjPerUm: 0, cgPerUm: 0 } })]);
    const tau = (n: number) => {
      let value = 0;
      const probe = defineRule({
        meta: { id: 'test.probe', title: 'probe', area: 'chain', rationale: '', fix: '', defaultSeverity: 'info' },
        params: z.object({}),
        check(ctx) {
          for (const c of passChainsOf(ctx)) value = elmoreDelay(ctx, c, deck.corners[0]);
        },
      });
      checkDesign(read(tgChain(n, '10f'), deck), { ...deck, rules: { 'test.probe': { enabled: true, severity: 'info', params: {} } } }, { rules: [probe] });
      return value;
    };
    const t1 = tau(1);
    for (const n of [2, 4, 6]) expect(tau(n) / t1).toBeCloseTo((n * (n + 1)) / 2, 9);
    void defaultDeck;
  });
});
