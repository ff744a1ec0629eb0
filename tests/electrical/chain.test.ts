// The fact of the trade behind regeneration: a stage restores a disturbed level only
// if the magnitude of its gain at the switching threshold exceeds one. A chain of CMOS
// inverters brings a logic zero disturbed by 30 % of VDD back to the rails within a
// few stages; a chain of diode-loaded n-channel stages (|gain| < 1, confirmed against
// ngspice in ngspice.test.ts) lets it settle at the curve's fixed point instead.

import { describe, expect, it } from 'vitest';
import { chainPlot, propagateLevel, repeatStage } from '../../rules/electrical/chain';
import { stageTransferFunction } from '../../rules/stages';
import { chainPlotSchema } from '../../shared/findings';
import { CellBuilder } from '../support/cell-builder';
import { analyseCell, corner, deckWith } from './helpers';

const deck = deckWith([corner()]);
const VDD = 2.5;

function stageFunction(cell: ReturnType<CellBuilder['build']>) {
  const a = analyseCell(cell, deck);
  const analysis = a.driving('out');
  const input = analysis.inputs[0];
  return {
    f: stageTransferFunction(a.env, analysis.stage, input.input, input.corners[0].worstMargin.held, deck.corners[0]),
    result: input.corners[0].worstMargin.result,
  };
}

const inverter = stageFunction(
  new CellBuilder('inv', ['in', 'out', 'vdd', 'vss'])
    .nmos('M1', 'out', 'in', 'vss', 'vss', { w: 1e-6, l: 0.25e-6 })
    .pmos('M2', 'out', 'in', 'vdd', 'vdd', { w: 3e-6, l: 0.25e-6 })
    .build(),
);
const diodeLoaded = stageFunction(
  new CellBuilder('dload', ['in', 'out', 'vdd', 'vss'])
    .nmos('ML', 'vdd', 'vdd', 'out', 'vss', { w: 1e-6, l: 0.25e-6 })
    .nmos('MD', 'out', 'in', 'vss', 'vss', { w: 1e-6, l: 0.25e-6 })
    .build(),
);

describe('regeneration through a chain', () => {
  it('CMOS inverters (|gain| at VM > 1) restore a logic zero disturbed by 0.3·VDD within a few stages', () => {
    expect(Math.abs(inverter.result.gainAtVm)).toBeGreaterThan(1);
    const chain = repeatStage(inverter.f, 8, 0.3 * VDD, { vdd: VDD, startLogic: 0 });
    expect(chain.outcome).toBe('restored');
    expect(chain.restoredAfter).not.toBeNull();
    expect(chain.restoredAfter!).toBeLessThanOrEqual(3);
    // The staircase ends at the rails, alternating.
    const last = chain.levels.at(-1)!;
    expect(Math.min(last, VDD - last)).toBeLessThan(0.01 * VDD);
  });

  it('a disturbance of 0.3·VDD on a logic one is restored too', () => {
    const chain = repeatStage(inverter.f, 8, 0.7 * VDD, { vdd: VDD, startLogic: 1 });
    expect(chain.outcome).toBe('restored');
  });

  it('diode-loaded stages (|gain| at VM < 1) never restore it: the level settles at the fixed point Vout = Vin', () => {
    expect(Math.abs(diodeLoaded.result.gainAtVm)).toBeLessThan(1);
    const chain = repeatStage(diodeLoaded.f, 60, 0.3 * VDD, { vdd: VDD, startLogic: 0 });
    expect(chain.restoredAfter).toBeNull();
    expect(chain.outcome).toBe('settled');
    // Settles at the switching threshold (the curve's fixed point): each stage shrinks the distance by about |gain| ≈ 0.9, hence 60 stages.
    expect(Math.abs(chain.levels.at(-1)! - diodeLoaded.result.vm)).toBeLessThan(0.01);
    // Even an undisturbed logic zero is not kept: the clean level itself decays towards VM stage by stage.
    const clean = repeatStage(diodeLoaded.f, 60, 0, { vdd: VDD, startLogic: 0 });
    expect(Math.abs(clean.levels.at(-1)! - diodeLoaded.result.vm)).toBeLessThan(0.01);
  });

  it('a mixed path is judged stage by stage, and the plot carries the staircase', () => {
    const chain = propagateLevel([diodeLoaded.f, inverter.f, inverter.f, inverter.f], 0.3 * VDD, { vdd: VDD, startLogic: 0 });
    expect(chain.levels).toHaveLength(5);
    expect(chain.outcome).toBe('restored');
    const plot = chainPlot(inverter.result, chain);
    expect(chainPlotSchema.parse(plot)).toEqual(plot);
  });
});
