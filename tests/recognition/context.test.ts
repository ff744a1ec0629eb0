// Contexts outside the engine's walk. The reference is the engine itself: a child's
// context built for a look from its parent must see the cell as the engine's own context
// does (same rails from the pins, same stages), and a stage list one context adopts from
// another is shared with no change leaking back.

import { describe, expect, it } from 'vitest';
import { defaultDeck } from '../../rules/default-deck';
import { stagesOf, type CellStages } from '../../rules/stages';
import { STAGES_MEMO_KEY, childContext, makeContext, netIndex, cellIndex } from '../../rules/recognition/context';
import { read } from './support';

const text = [
  '.subckt inv a y vdd vss',
  'mn y a vss vss nch w=1u l=0.25u',
  'mp y a vdd vdd pch w=2u l=0.25u',
  'r0 y y2 0',
  '.ends',
  '.subckt top a y p g',
  'x1 a y p g inv',
  '.ends',
].join('\n');

describe('recognition contexts', () => {
  const deck = defaultDeck();
  const design = read(text, deck);

  it('keeps stages under the key stagesOf uses, so an adopted list is the one every rule sees', () => {
    const cell = design.cells.get('inv')!;
    const ctx = makeContext(design, deck, cell, new Array(cell.nets.length));
    const adopted = { stages: [], driverOf: new Map(), alias: new Int32Array(cell.nets.length) } as CellStages;
    ctx.memo(STAGES_MEMO_KEY, () => adopted);
    expect(stagesOf(ctx)).toBe(adopted);
  });

  it('gives a child the rails its parent’s pins carry, and merges zero-ohm ties as stage extraction does', () => {
    const child = childContext(design, deck, 'inv', [undefined, undefined, 'power', 'ground'])!;
    const cell = child.cell;
    const id = (n: string) => cell.netIndex.get(n)!;
    expect(child.rails[id('vdd')]).toBe('power');
    expect(netIndex(child).alias).toEqual(cellIndex(child).stages.alias);
    expect(netIndex(child).alias[id('y2')]).toBe(id('y'));
  });
});
