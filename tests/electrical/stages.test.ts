// Stage extraction and classification: the circuit families of the trade (static
// CMOS, ratioed, clocked/tri-state, dynamic, pass gates), judged by topology as a
// designer reads a schematic.

import { describe, expect, it } from 'vitest';
import { networkElements, networkNodes } from '../../rules/electrical/network';
import { elementIndex, extractStages, isMosElement, type Stage } from '../../rules/stages';
import { localRails } from '../../rules/engine';
import { defaultDeck } from '../../rules/default-deck';
import { CellBuilder, designOf } from '../support/cell-builder';

const s = { w: 1e-6, l: 0.25e-6 };
const deck = defaultDeck();

function stagesOf(b: CellBuilder, isClock?: (net: number) => boolean) {
  const cell = b.build();
  const stages = extractStages(cell, localRails(designOf([cell]), cell, deck), { isClock });
  const names = (nets: number[]) => nets.map((n) => cell.nets[n]);
  const devices = (st: Stage, els = st.elements.map((_, i) => i)) => els.map((i) => (isMosElement(st.elements[i]) ? cell.mosfets.names[st.elements[i]] : cell.others[elementIndex(st.elements[i])].name));
  const driving = (net: string) => stages.stages.find((st) => st.output === cell.netIndex.get(net))!;
  return { cell, stages, names, devices, driving };
}

describe('stage extraction', () => {
  it('a NAND2 is one stage with a parallel p-channel pull-up and a series n-channel pull-down with one internal node', () => {
    const t = stagesOf(
      new CellBuilder('nand2', ['a', 'b', 'y', 'vdd', 'vss'])
        .pmos('MP1', 'y', 'a', 'vdd', 'vdd', s)
        .pmos('MP2', 'y', 'b', 'vdd', 'vdd', s)
        .nmos('MN1', 'y', 'a', 'm', 'vss', s)
        .nmos('MN2', 'm', 'b', 'vss', 'vss', s),
    );
    expect(t.stages.stages).toHaveLength(1);
    const st = t.driving('y');
    expect(st.kind).toBe('complementary');
    expect(t.names(st.inputs)).toEqual(['a', 'b']);
    expect(t.names(st.internal)).toEqual(['m']);
    expect(st.pullUp!.kind).toBe('parallel');
    expect(st.pullDown!.kind).toBe('series');
    expect(t.names(networkNodes(st.pullDown!))).toEqual(['m']);
    // Series order runs from the output to the rail.
    expect(t.devices(st, networkElements(st.pullDown!))).toEqual(['MN1', 'MN2']);
    expect(st.anchor.line).toBe(2);
  });

  it('an inverter chain splits at gates; stages are anchored at their first device line', () => {
    const t = stagesOf(
      new CellBuilder('buf', ['a', 'y', 'vdd', 'vss'])
        .nmos('MN1', 'x', 'a', 'vss', 'vss', s)
        .pmos('MP1', 'x', 'a', 'vdd', 'vdd', s)
        .pmos('MP2', 'y', 'x', 'vdd', 'vdd', s)
        .nmos('MN2', 'y', 'x', 'vss', 'vss', s),
    );
    expect(t.stages.stages.map((st) => st.kind)).toEqual(['inverter', 'inverter']);
    expect(t.stages.stages.map((st) => st.anchor.line)).toEqual([2, 4]);
  });

  it('stages follow netlist order across files: file order first (the order the files are read), then line', () => {
    // A buffer whose second inverter comes from an earlier-read file: SPICE reads an .include where it stands, so that
    // file's lines precede the including file's later lines (here the second file is read first).
    const cell = new CellBuilder('buf', ['a', 'y', 'vdd', 'vss'])
      .nmos('MN1', 'x', 'a', 'vss', 'vss', s)
      .pmos('MP1', 'x', 'a', 'vdd', 'vdd', s)
      .pmos('MP2', 'y', 'x', 'vdd', 'vdd', { ...s, at: { file: 'lib/inv.sp', line: 8, column: 1 } })
      .nmos('MN2', 'y', 'x', 'vss', 'vss', { ...s, at: { file: 'lib/inv.sp', line: 9, column: 1 } })
      .build();
    const rails = localRails(designOf([cell]), cell, deck);
    const rank = (order: string[]) => (f: string) => order.indexOf(f);
    const ordered = (order: string[]) => extractStages(cell, rails, { fileRank: rank(order) }).stages.map((st) => cell.nets[st.output!]);
    expect(ordered(['lib/inv.sp', 'buf.sp'])).toEqual(['y', 'x']);
    expect(ordered(['buf.sp', 'lib/inv.sp'])).toEqual(['x', 'y']);
    const late = extractStages(cell, rails, { fileRank: rank(['lib/inv.sp', 'buf.sp']) }).stages[0];
    // The anchor is the stage's first device in netlist order: line 8 of its file.
    expect(late.anchor).toEqual({ file: 'lib/inv.sp', line: 8, column: 1 });
    expect(late.id).toBe(0);
  });

  it('an AOI21 is complementary: series/parallel duals', () => {
    const t = stagesOf(
      new CellBuilder('aoi21', ['a1', 'a2', 'b', 'y', 'vdd', 'vss'])
        .pmos('MP1', 'p1', 'a1', 'vdd', 'vdd', s)
        .pmos('MP2', 'p1', 'a2', 'vdd', 'vdd', s)
        .pmos('MP3', 'y', 'b', 'p1', 'vdd', s)
        .nmos('MN1', 'y', 'a1', 'n1', 'vss', s)
        .nmos('MN2', 'n1', 'a2', 'vss', 'vss', s)
        .nmos('MN3', 'y', 'b', 'vss', 'vss', s),
    );
    expect(t.driving('y').kind).toBe('complementary');
  });

  it('pseudo-n-channel NOR (grounded-gate p-channel pull-up), resistor load and diode-connected load are ratioed', () => {
    const pseudo = stagesOf(
      new CellBuilder('pnor', ['a', 'b', 'y', 'vdd', 'vss'])
        .pmos('MP', 'y', 'vss', 'vdd', 'vdd', s)
        .nmos('MA', 'y', 'a', 'vss', 'vss', s)
        .nmos('MB', 'y', 'b', 'vss', 'vss', s),
    );
    expect(pseudo.driving('y').kind).toBe('ratioed');
    const resistive = stagesOf(new CellBuilder('rl', ['a', 'y', 'vdd', 'vss']).res('R1', 'vdd', 'y', 10e3).nmos('MA', 'y', 'a', 'vss', 'vss', s));
    expect(resistive.driving('y').kind).toBe('ratioed');
    const diode = stagesOf(new CellBuilder('dl', ['a', 'y', 'vdd', 'vss']).nmos('ML', 'vdd', 'vdd', 'y', 'vss', s).nmos('MA', 'y', 'a', 'vss', 'vss', s));
    expect(diode.driving('y').kind).toBe('ratioed');
  });

  it('a zero-ohm tie is a wire, not a load', () => {
    const t = stagesOf(
      new CellBuilder('tie', ['a', 'y', 'vdd', 'vss'])
        .pmos('MP', 'yy', 'a', 'vdd', 'vdd', s)
        .nmos('MN', 'y', 'a', 'vss', 'vss', s)
        .res('R0', 'yy', 'y', 0),
    );
    expect(t.stages.stages).toHaveLength(1);
    expect(t.stages.stages[0].kind).toBe('inverter');
  });

  it('a footed domino stage is dynamic: precharge and footer share the clock; the keeper sits beside the precharge device', () => {
    const t = stagesOf(
      new CellBuilder('dom', ['a', 'b', 'phi', 'z', 'vdd', 'vss'])
        .pmos('MPRE', 'x', 'phi', 'vdd', 'vdd', s)
        .pmos('MK', 'x', 'z', 'vdd', 'vdd', s)
        .nmos('MA', 'x', 'a', 'n1', 'vss', s)
        .nmos('MB', 'n1', 'b', 'n2', 'vss', s)
        .nmos('MF', 'n2', 'phi', 'vss', 'vss', s)
        .pmos('MO', 'z', 'x', 'vdd', 'vdd', s)
        .nmos('MON', 'z', 'x', 'vss', 'vss', s),
    );
    const st = t.driving('x');
    expect(st.kind).toBe('dynamic');
    expect(st.dynamic!.style).toBe('n-evaluate');
    expect(t.cell.nets[st.dynamic!.clock]).toBe('phi');
    expect(t.devices(st, st.dynamic!.precharge)).toEqual(['MPRE']);
    expect(t.devices(st, st.dynamic!.footer)).toEqual(['MF']);
    expect(t.names(st.internal)).toEqual(['n1', 'n2']);
    expect(t.driving('z').kind).toBe('inverter');
  });

  it('a clocked latch node with an asynchronous set is clocked, not dynamic, though its set device sits where a precharge would', () => {
    // Static-logic fact: each data input gates a device in both networks (the complementary halves), which no
    // precharged node has; sky130-style set flops build their latch nodes this way.
    const t = stagesOf(
      new CellBuilder('setlatch', ['d', 'ck', 'ckb', 'setb', 'q', 'vdd', 'vss'])
        .pmos('MPS', 'q', 'setb', 'vdd', 'vdd', s)
        .pmos('MPD', 'p1', 'd', 'vdd', 'vdd', s)
        .pmos('MPC', 'q', 'ckb', 'p1', 'vdd', s)
        .nmos('MNC', 'q', 'ck', 'n1', 'vss', s)
        .nmos('MND', 'n1', 'd', 'n2', 'vss', s)
        .nmos('MNS', 'n2', 'setb', 'vss', 'vss', s),
    );
    expect(t.driving('q').kind).toBe('clocked');
  });

  it('a footless stage is dynamic only through the clock hint', () => {
    const build = () =>
      new CellBuilder('fl', ['a', 'b', 'ck', 'x', 'vdd', 'vss'])
        .pmos('MPRE', 'x', 'ck', 'vdd', 'vdd', s)
        .nmos('MA', 'x', 'a', 'n1', 'vss', s)
        .nmos('MB', 'n1', 'b', 'vss', 'vss', s);
    expect(stagesOf(build()).driving('x').kind).not.toBe('dynamic');
    const hinted = stagesOf(build(), (net) => net === 2);
    expect(hinted.driving('x').kind).toBe('dynamic');
    expect(hinted.driving('x').dynamic!.clockByName).toBe(true);
  });

  it('a tri-state inverter is clocked; a transmission gate between two observed nets is a pass stage', () => {
    const t = stagesOf(
      new CellBuilder('tri', ['a', 'en', 'enb', 'y', 'q', 's', 'sb', 'vdd', 'vss'])
        .pmos('MP1', 'p1', 'a', 'vdd', 'vdd', s)
        .pmos('MP2', 'y', 'enb', 'p1', 'vdd', s)
        .nmos('MN2', 'y', 'en', 'n1', 'vss', s)
        .nmos('MN1', 'n1', 'a', 'vss', 'vss', s)
        .nmos('MT', 'y', 's', 'q', 'vss', s)
        .pmos('MTB', 'q', 'sb', 'y', 'vdd', s),
    );
    expect(t.driving('y').kind).toBe('clocked');
    const pass = t.stages.stages.find((st) => st.kind === 'pass')!;
    expect(t.names(pass.terminals).sort()).toEqual(['q', 'y']);
    expect(pass.channel!.kind).toBe('parallel');
    expect(t.names(pass.inputs)).toEqual(['s', 'sb']);
  });

  it('a top-level netlist without ports still finds its output: the net that splits pull-up from pull-down', () => {
    const b = new CellBuilder('top', ['vdd', 'vss'])
      .pmos('MP1', 'out', 'a', 'vdd', 'vdd', s)
      .pmos('MP2', 'out', 'b', 'vdd', 'vdd', s)
      .nmos('MN1', 'out', 'a', 'm', 'vss', s)
      .nmos('MN2', 'm', 'b', 'vss', 'vss', s);
    const t = stagesOf(b);
    expect(t.stages.stages).toHaveLength(1);
    expect(t.cell.nets[t.stages.stages[0].output!]).toBe('out');
    expect(t.stages.stages[0].kind).toBe('complementary');
  });
});

describe('unobserved outputs', () => {
  it('an unused tri-state output is found as the output, not its stack node (p-channel side towards the supply)', () => {
    const t = stagesOf(
      new CellBuilder('tri', ['a', 'en', 'enb', 'vdd', 'vss'])
        .pmos('MPA', 'p1', 'a', 'vdd', 'vdd', s)
        .pmos('MPE', 'y', 'enb', 'p1', 'vdd', s)
        .nmos('MNE', 'y', 'en', 'n1', 'vss', s)
        .nmos('MNA', 'n1', 'a', 'vss', 'vss', s),
    );
    expect(t.stages.stages).toHaveLength(1);
    expect(t.cell.nets[t.stages.stages[0].output!]).toBe('y');
    expect(t.stages.stages[0].kind).toBe('clocked');
  });
});

describe('stages in context', () => {
  it('a NAND2 whose parent ties one input high is an inverter in that context (the tied devices are constants)', () => {
    const cell = new CellBuilder('nand2', ['a', 'b', 'y', 'vdd', 'vss'])
      .pmos('MP1', 'y', 'a', 'vdd', 'vdd', s)
      .pmos('MP2', 'y', 'b', 'vdd', 'vdd', s)
      .nmos('MN1', 'y', 'a', 'm', 'vss', s)
      .nmos('MN2', 'm', 'b', 'vss', 'vss', s)
      .build();
    const rails = localRails(designOf([cell]), cell, deck);
    rails[cell.netIndex.get('b')!] = 'power';
    const st = extractStages(cell, rails).stages;
    expect(st).toHaveLength(1);
    expect(st[0].kind).toBe('inverter');
    expect(st[0].inputs.map((n) => cell.nets[n])).toEqual(['a']);
  });
});
