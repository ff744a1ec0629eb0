// Shared set-up for the electrical tests: a deck with one corner of chosen values,
// and the stage analysis of a builder cell under it.

import type { Cell, Design, ModelCard } from '../../grammar/design';
import type { Corner, Deck, DeviceParams } from '../../shared/deck';
import { defaultDeck } from '../../rules/default-deck';
import { localRails } from '../../rules/engine';
import { analyseStage, extractStages, type StageAnalysis, type StageEnvironment } from '../../rules/stages';
import type { CellStages } from '../../rules/stages';
import { designOf } from '../support/cell-builder';

export const nParams: DeviceParams = {
  vt0: 0.43,
  kPrime: 115e-6,
  lambda: 0.06,
  gamma: 0.4,
  phi2F: 0.6,
  vdsat: 0.63,
  cjPerUm: 1.5e-15,
  cgPerUm: 2e-15,
  leakPerUm: 10e-12,
};
export const pParams: DeviceParams = { ...nParams, vt0: 0.4, kPrime: 30e-6, lambda: 0.1, vdsat: 1.0, leakPerUm: 5e-12 };

export function corner(overrides: Partial<Corner> = {}): Corner {
  return { name: 'c0', vdd: 2.5, temperatureC: 25, model: 'square-law', nmos: nParams, pmos: pParams, ...overrides };
}

export function deckWith(corners: Corner[], overrides: Partial<Deck> = {}): Deck {
  return { ...defaultDeck(), corners, ...overrides };
}

export interface Analysed {
  design: Design;
  cell: Cell;
  stages: CellStages;
  env: StageEnvironment;
  analyses: StageAnalysis[];
  /** The analysis of the stage driving the named net. */
  driving(net: string): StageAnalysis;
}

export function analyseCell(cell: Cell, deck: Deck, models: ModelCard[] = []): Analysed {
  const design = designOf([cell], models);
  const rails = localRails(design, cell, deck);
  const stages = extractStages(cell, rails);
  const env: StageEnvironment = { design, cell, deck, alias: stages.alias, railOf: (n) => rails[stages.alias[n]] };
  const analyses = stages.stages.map((s) => analyseStage(env, s));
  return {
    design,
    cell,
    stages,
    env,
    analyses,
    driving(net) {
      const id = cell.netIndex.get(net.toLowerCase());
      const found = analyses.find((a) => a.stage.output === id);
      if (!found) throw new Error(`no stage drives ${net}`);
      return found;
    },
  };
}

/** The analysis of one swept input (by net name) at the first corner, worst-margin case. */
export function sweptResult(a: Analysed, output: string, input: string) {
  const stage = a.driving(output);
  const id = a.cell.netIndex.get(input.toLowerCase());
  const inp = stage.inputs.find((i) => i.input === id);
  if (!inp) throw new Error(`${input} is not an analysed input of the stage driving ${output}`);
  return inp.corners[0].worstMargin;
}
