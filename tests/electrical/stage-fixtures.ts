// Cells and decks shared by the stage rule tests.

import type { Cell, ModelCard } from '../../grammar/design';
import type { Deck } from '../../shared/deck';
import { checkDesign } from '../../rules/engine';
import type { RuleModule } from '../../rules/types';
import { CellBuilder, designOf, mosCard } from '../support/cell-builder';
import { corner, deckWith } from './helpers';

export const CARDS: ModelCard[] = [
  mosCard('nm', 'nmos', { vto: 0.43, kp: 115e-6, lambda: 0.06, gamma: 0.4, phi: 0.6 }),
  mosCard('pm', 'pmos', { vto: -0.4, kp: 30e-6, lambda: 0.1, gamma: 0.4, phi: 0.6 }),
];
export const MODEL_LINES = [
  '.model nm nmos level=1 vto=0.43 kp=115e-6 lambda=0.06 gamma=0.4 phi=0.6',
  '.model pm pmos level=1 vto=-0.4 kp=30e-6 lambda=0.1 gamma=0.4 phi=0.6',
];
/** One square-law corner whose device values the cards replace: the same equations as ngspice level 1. */
export const levelOneDeck: Deck = deckWith([corner()]);

const L = 0.25e-6;

export function inverter(wn = 1e-6, wp = 3e-6): Cell {
  return new CellBuilder('inv', ['in', 'out', 'vdd', 'vss'])
    .nmos('MN', 'out', 'in', 'vss', 'vss', { w: wn, l: L, model: 'nm' })
    .pmos('MP', 'out', 'in', 'vdd', 'vdd', { w: wp, l: L, model: 'pm' })
    .build();
}

/** n-channel driver with a diode-connected n-channel load (gate and drain on the supply). */
export function diodeLoaded(wDriver = 1e-6, wLoad = 1e-6): Cell {
  return new CellBuilder('dload', ['in', 'out', 'vdd', 'vss'])
    .nmos('ML', 'vdd', 'vdd', 'out', 'vss', { w: wLoad, l: L, model: 'nm' })
    .nmos('MD', 'out', 'in', 'vss', 'vss', { w: wDriver, l: L, model: 'nm' })
    .build();
}

export function nand2(): Cell {
  return new CellBuilder('nand2', ['a', 'b', 'out', 'vdd', 'vss'])
    .pmos('MP1', 'out', 'a', 'vdd', 'vdd', { w: 2e-6, l: L, model: 'pm' })
    .pmos('MP2', 'out', 'b', 'vdd', 'vdd', { w: 2e-6, l: L, model: 'pm' })
    .nmos('MN1', 'out', 'a', 'mid', 'vss', { w: 2e-6, l: L, model: 'nm' })
    .nmos('MN2', 'mid', 'b', 'vss', 'vss', { w: 2e-6, l: L, model: 'nm' })
    .build();
}

/** Footed domino with output inverter and half keeper, and a transmission gate onto a port. */
export function dominoWithPassGate(): Cell {
  const s = { w: 1e-6, l: L, model: 'nm' };
  const p = { w: 1e-6, l: L, model: 'pm' };
  return new CellBuilder('dom', ['a', 'b', 'phi', 'phib', 'z', 'q', 'vdd', 'vss'])
    .pmos('MPRE', 'x', 'phi', 'vdd', 'vdd', p)
    .pmos('MK', 'x', 'z', 'vdd', 'vdd', { ...p, w: 0.4e-6 })
    .nmos('MA', 'x', 'a', 'n1', 'vss', s)
    .nmos('MB', 'n1', 'b', 'n2', 'vss', s)
    .nmos('MF', 'n2', 'phi', 'vss', 'vss', s)
    .pmos('MO', 'z', 'x', 'vdd', 'vdd', { ...p, w: 3e-6 })
    .nmos('MON', 'z', 'x', 'vss', 'vss', s)
    .nmos('MT', 'z', 'phi', 'q', 'vss', s)
    .pmos('MTP', 'q', 'phib', 'z', 'vdd', p)
    .build();
}

export function run(rule: RuleModule, cell: Cell, deck: Deck, params: Record<string, unknown> = {}, models: ModelCard[] = CARDS) {
  const configured: Deck = {
    ...deck,
    rules: { ...deck.rules, [rule.meta.id]: { enabled: true, severity: rule.meta.defaultSeverity, params } },
  };
  return checkDesign(designOf([cell], models), configured, { rules: [rule] }).findings;
}
