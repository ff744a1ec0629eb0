// Clock roots: where clock tracing starts in one cell.
//
// A net is a root when a periodic source drives it (a `pulse`/`sin` voltage source,
// as a test bench writes its clocks), or when its name matches one of the deck's
// clock-root patterns. A name that matches once an inverted-phase suffix is removed
// (`clk_b`, `phi1bar`) is the inverted phase of that root. Suffixes that start with a
// separator (`_b`, `_n`) always count; bare ones (`b`, `n`, `bar`) only when the
// stripped name is itself a net of the cell, so that `clkin` or `clken` are not taken
// for an inverted `clki` or `clke`. Names only seed the trace: a net driven by a
// traced clock stage takes the traced phase instead (see timing.ts).

import type { Cell, RailKind } from '../../grammar/design';
import type { Deck } from '../../shared/deck';
import { globToRegExp } from '../../shared/deck';

export interface ClockRootName {
  /** Phase name (lower case). */
  phase: string;
  inverted: boolean;
}

export type ClockNamer = (name: string) => ClockRootName | null;

const namers = new WeakMap<Deck, (cell: Cell) => ClockNamer>();

/** A function naming the clock phase a net name stands for in `cell`, or null. */
export function clockNamer(deck: Deck, cell: Cell): ClockNamer {
  let make = namers.get(deck);
  if (!make) {
    const roots = deck.clocks.roots.map((r) => ({ re: globToRegExp(r.pattern), phase: r.phase.toLowerCase(), inverted: r.polarity === 'inverted' }));
    const suffixes = [...new Set(deck.clocks.invertedSuffixes.map((s) => s.toLowerCase()))].sort((a, b) => b.length - a.length);
    make = (c: Cell) => {
      const cache = new Map<string, ClockRootName | null>();
      const direct = (name: string): ClockRootName | null => {
        for (const r of roots) if (r.re.test(name)) return { phase: r.phase || name.toLowerCase(), inverted: r.inverted };
        return null;
      };
      return (name: string) => {
        const lower = name.toLowerCase();
        let hit = cache.get(lower);
        if (hit !== undefined) return hit;
        hit = null;
        for (const s of suffixes) {
          if (lower.length <= s.length || !lower.endsWith(s)) continue;
          const stem = lower.slice(0, -s.length);
          const separated = /^[_.\-]/.test(s);
          if (!separated && !c.netIndex.has(stem)) continue;
          const root = direct(stem);
          if (root) {
            hit = { phase: root.phase === stem || !root.phase ? stem : root.phase, inverted: !root.inverted };
            break;
          }
        }
        if (!hit) hit = direct(name);
        cache.set(lower, hit);
        return hit;
      };
    };
    namers.set(deck, make);
  }
  return make(cell);
}

/** Nets driven by a periodic voltage source whose other end is ground (a test bench's clocks), with the net's name as phase. */
export function sourcedClocks(cell: Cell, railOf: (net: number) => RailKind | undefined): Map<number, string> {
  const out = new Map<number, string>();
  for (const o of cell.others) {
    if (o.kind !== 'vsrc' || (o.waveform !== 'pulse' && o.waveform !== 'sin')) continue;
    if (railOf(o.neg) === 'ground' && !railOf(o.pos)) out.set(o.pos, cell.nets[o.pos].toLowerCase());
  }
  return out;
}
