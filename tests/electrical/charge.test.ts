// Dynamic-node budgets against hand-worked examples and their formulas.

import { describe, expect, it } from 'vitest';
import {
  chargeShareDrop,
  driveCurrent,
  holdBudget,
  holdTime,
  keeperRatio,
  nodeCapacitance,
  worstChargeSharing,
} from '../../rules/electrical/charge';
import { CellBuilder } from '../support/cell-builder';
import { analyseCell, corner, deckWith, nParams, pParams } from './helpers';
import type { Network } from '../../rules/electrical/network';
import { isMosElement, mosElement } from '../../rules/electrical/element';

// A footed domino AND2: precharge MP (clk), evaluation MA (a) – n1 – MB (b) – n2 – MF (clk) to ground,
// output inverter MO/MON, explicit capacitors 20 fF on the dynamic node x, 5 fF on n1 and on n2.
function domino() {
  return new CellBuilder('dom', ['a', 'b', 'clk', 'y', 'vdd', 'vss'])
    .pmos('MP', 'x', 'clk', 'vdd', 'vdd', { w: 1e-6, l: 0.25e-6 })
    .nmos('MA', 'x', 'a', 'n1', 'vss', { w: 1e-6, l: 0.25e-6 })
    .nmos('MB', 'n1', 'b', 'n2', 'vss', { w: 2e-6, l: 0.25e-6 })
    .nmos('MF', 'n2', 'clk', 'vss', 'vss', { w: 1e-6, l: 0.25e-6 })
    .pmos('MK', 'x', 'y', 'vdd', 'vdd', { w: 0.5e-6, l: 0.25e-6 })
    .pmos('MO', 'y', 'x', 'vdd', 'vdd', { w: 2e-6, l: 0.25e-6 })
    .nmos('MON', 'y', 'x', 'vss', 'vss', { w: 1e-6, l: 0.25e-6 })
    .cap('CX', 'x', 'vss', 20e-15)
    .cap('C1', 'n1', 'vss', 5e-15)
    .cap('C2', 'n2', 'vss', 5e-15)
    .build();
}

// Capacitance per µm set to zero so the hand-worked numbers involve the explicit capacitors only.
const noParasitics = corner({ nmos: { ...nParams, cjPerUm: 0, cgPerUm: 0 }, pmos: { ...pParams, cjPerUm: 0, cgPerUm: 0 } });

function dynamicStage(c = noParasitics) {
  const cell = domino();
  const a = analyseCell(cell, deckWith([c]));
  const stage = a.driving('x').stage;
  return { cell, a, stage };
}

describe('charge sharing', () => {
  it('ΔV = VDD·Cint/(Cint + Cnode): 2.5 V · 5 fF / 25 fF = 0.5 V', () => {
    expect(chargeShareDrop(2.5, 5e-15, 20e-15)).toBeCloseTo(0.5, 12);
  });

  it('footed domino AND2, footer on during evaluation: worst case a high, b low shares x with n1 only → 0.5 V', () => {
    // Hand-worked: with clk high, n2 is tied to ground through the footer. a = b = 1 discharges x (a legitimate
    // evaluation, not charge sharing). a = 1, b = 0 connects n1 (5 fF) to x (20 fF): ΔV = 2.5·5/(5 + 20) = 0.5 V.
    const { cell, a, stage } = dynamicStage();
    expect(stage.kind).toBe('dynamic');
    const clk = cell.netIndex.get('clk')!;
    const r = worstChargeSharing({
      cell,
      corner: noParasitics,
      elements: stage.elements,
      railOf: a.env.railOf,
      node: stage.output!,
      network: stage.pullDown!,
      held: new Map([[clk, true]]),
    });
    expect(r.cNode).toBeCloseTo(20e-15, 20);
    expect(r.cShared).toBeCloseTo(5e-15, 20);
    expect(r.drop).toBeCloseTo(0.5, 9);
    expect(r.sharedNets.map((n) => cell.nets[n])).toEqual(['n1']);
    expect(r.highInputs.map((n) => cell.nets[n])).toEqual(['a']);
  });

  it('with the footer free as well, a = b = 1 and clk low shares both nodes → 2.5·10/30 = 0.833 V', () => {
    const { cell, a, stage } = dynamicStage();
    const r = worstChargeSharing({ cell, corner: noParasitics, elements: stage.elements, railOf: a.env.railOf, node: stage.output!, network: stage.pullDown! });
    expect(r.cShared).toBeCloseTo(10e-15, 20);
    expect(r.drop).toBeCloseTo((2.5 * 10) / 30, 9);
  });

  it('node capacitance adds junctions (cj·W per terminal) and gates (cg·W) from the corner', () => {
    // Hand-worked for x: CX 20 fF; junctions MP, MA, MK drains: 1.5 fF/µm · (1 + 1 + 0.5) µm = 3.75 fF;
    // gates MO, MON: 2 fF/µm · (2 + 1) µm = 6 fF; total 29.75 fF.
    const cell = domino();
    const c = nodeCapacitance(cell, cell.netIndex.get('x')!, corner());
    expect(c.explicit).toBeCloseTo(20e-15, 20);
    expect(c.junction).toBeCloseTo(3.75e-15, 20);
    expect(c.gate).toBeCloseTo(6e-15, 20);
    expect(c.total).toBeCloseTo(29.75e-15, 20);
  });
});

describe('hold time without a keeper', () => {
  it('t = C·ΔVallowed/Ileak, the series stack leaking as its leakiest device', () => {
    // Hand-worked: leakage 10 pA/µm; the off stack MA (1 µm), MB (2 µm), MF (1 µm) leaks at most as MB with the others on: 20 pA.
    // C = 20 fF, ΔV allowed 0.5 V → t = 20 fF · 0.5 V / 20 pA = 10 fC / 20 pA = 500 µs, far longer than a 100 ns clock period.
    const { cell, a, stage } = dynamicStage();
    const budget = holdBudget({ cell, corner: noParasitics, elements: stage.elements, alias: a.stages.alias }, stage.output!, stage.pullDown!, 0.5, 100e-9);
    expect(budget.leakage).toBeCloseTo(20e-12, 20);
    expect(budget.holdTime / 500e-6).toBeCloseTo(1, 12);
    expect(budget.holdTime).toBe(holdTime(20e-15, 0.5, 20e-12));
    expect(budget.holds).toBe(true);
    // Leaking 10 000× more (100 nA/µm, 200 nA through MB) the node lasts 10 fC / 200 nA = 50 ns: short of the 100 ns period.
    const hot = corner({ nmos: { ...noParasitics.nmos, leakPerUm: 100e-9 }, pmos: noParasitics.pmos });
    expect(holdBudget({ cell, corner: hot, elements: stage.elements }, stage.output!, stage.pullDown!, 0.5, 100e-9).holdTime / 50e-9).toBeCloseTo(1, 12);
    expect(holdBudget({ cell, corner: hot, elements: stage.elements }, stage.output!, stage.pullDown!, 0.5, 100e-9).holds).toBe(false);
  });
});

describe('keeper strength', () => {
  const flat = corner({ nmos: { ...nParams, lambda: 0, gamma: 0 }, pmos: { ...pParams, lambda: 0, gamma: 0 } });

  it('on-currents are square-law saturation currents k′/2·(W/L)·(VDD − VT)²; the ratio is keeper over weakest path', () => {
    const { cell, a, stage } = dynamicStage(flat);
    const keeperIndex = stage.elements.findIndex((e) => isMosElement(e) && cell.mosfets.names[e] === 'MK');
    const keeper: Network = { kind: 'leaf', element: keeperIndex, a: -1, b: stage.output! };
    const input = { cell, corner: flat, elements: stage.elements, railOf: a.env.railOf, models: a.design.models, useNetlistModels: true };
    const r = keeperRatio(input, keeper, stage.pullDown!);
    const iKeeper = (30e-6 / 2) * (0.5 / 0.25) * (2.5 - 0.4) ** 2;
    expect(r.keeperCurrent).toBeCloseTo(iKeeper, 12);
    // Long-channel fact (square law, no body effect): series devices with a common full gate drive carry the current of
    // one device of the summed L/W. Path MA (L/W = 0.25), MB (0.125), MF (0.25): L/W = 0.625.
    const iPath = (115e-6 / 2) * (1 / 0.625) * (2.5 - 0.43) ** 2;
    expect(r.pullDownCurrent / iPath).toBeCloseTo(1, 6);
    expect(r.ratio).toBeCloseTo(iKeeper / iPath, 6);
  });

  it('a two-device stack equals one device of twice the length (square law, γ = λ = 0)', () => {
    const cell = new CellBuilder('stk', ['d', 'vdd', 'vss'])
      .nmos('M1', 'd', 'vdd', 'm', 'vss', { w: 1e-6, l: 0.25e-6 })
      .nmos('M2', 'm', 'vdd', 'vss', 'vss', { w: 1e-6, l: 0.25e-6 })
      .nmos('M3', 'd', 'vdd', 'vss', 'vss', { w: 1e-6, l: 0.5e-6 })
      .build();
    const d = cell.netIndex.get('d')!;
    const m = cell.netIndex.get('m')!;
    const elements = [0, 1, 2].map(mosElement);
    const input = { cell, corner: flat, elements, railOf: (n: number) => (n === 1 ? ('power' as const) : n === 2 ? ('ground' as const) : undefined), models: new Map(), useNetlistModels: false };
    const stack: Network = { kind: 'series', a: d, b: -2, children: [{ kind: 'leaf', element: 0, a: d, b: m }, { kind: 'leaf', element: 1, a: m, b: -2 }], nodes: [m] };
    for (const vd of [0.3, 1, 2.5]) {
      expect(driveCurrent(input, stack, vd, 0) / driveCurrent(input, { kind: 'leaf', element: 2, a: d, b: -2 }, vd, 0)).toBeCloseTo(1, 9);
    }
  });
});
