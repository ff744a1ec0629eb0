// CDL as LVS flows and open PDKs write it (the conventions of the SkyWater sky130
// CDL and extracted SPICE cells, recalled from reading them): `*.PININFO` pin
// directions, `/` before an X line's cell name, `$[model]` annotations, `short`
// zero-ohm ties, backslash-escaped names, `*.SCALE`, `*.GLOBAL`; and extracted
// netlists whose transistors are X instances of PDK device subcircuits.

import { describe, expect, it } from 'vitest';
import { TOP_LEVEL_CELL } from '../../grammar/index';
import { cell, close, codes, mos, read, terminals, where } from './helpers';

const lines = (...ls: string[]) => ls.join('\n') + '\n';

describe('CDL', () => {
  it('keeps *.PININFO directions aligned with the ports', () => {
    const d = read(
      lines(
        '* CDL cell',
        '.SUBCKT nand2 A B Y VDD VSS',
        '*.PININFO A:I B:I Y:O VDD:B',
        '*.PININFO VSS:B',
        'MN1 Y A n1 VSS nfet_01v8 m=1 w=0.65 l=0.15 mult=1 sa=0.265 topography=normal',
        'MN2 n1 B VSS VSS nfet_01v8 m=1 w=0.65 l=0.15',
        'MP1 Y A VDD VDD pfet_01v8_hvt m=1 w=1.0 l=0.15',
        'MP2 Y B VDD VDD pfet_01v8_hvt m=1 w=1.0 l=0.15',
        '.ENDS nand2',
      ),
      { scale: 1e-6 },
    );
    expect(d.diagnostics).toEqual([]);
    const c = cell(d, 'nand2');
    expect(c.portDirections).toEqual(['input', 'input', 'output', 'inout', 'inout']);
    // Non-numeric CDL properties (topography=normal) are not errors and not parameters.
    expect(mos(c, 'MN1').params).toEqual({ mult: 1, sa: 0.265 });
    expect(close(mos(c, 'MN1').w, 0.65e-6)).toBe(true);
    expect(mos(c, 'MP1').polarity).toBe('p');
  });

  it('reads the / separator between nodes and cell name, also across a continuation', () => {
    const d = read(
      lines(
        '* CDL hierarchy',
        '.SUBCKT inv A Y VDD VSS',
        'MN Y A VSS VSS nfet_01v8 w=0.65 l=0.15',
        'MP Y A VDD VDD pfet_01v8 w=1 l=0.15',
        '.ENDS',
        '.SUBCKT buf A Y VDD VSS',
        'XI1 A mid VDD VSS / inv',
        'XI2 mid Y VDD VSS /',
        '+ inv',
        'XI3 mid Y VDD VSS /inv',
        '.ENDS',
      ),
      { scale: 1e-6 },
    );
    expect(d.diagnostics).toEqual([]);
    const buf = cell(d, 'buf');
    expect(buf.instances.map((i) => [i.name, i.cell, i.pins.length])).toEqual([
      ['XI1', 'inv', 4],
      ['XI2', 'inv', 4],
      ['XI3', 'inv', 4],
    ]);
  });

  it('merges the nets a short resistor ties, so both names are one node', () => {
    const d = read(
      lines(
        '* CDL tie cell',
        '.SUBCKT tiehi HI LO VPWR VGND',
        '*.PININFO HI:O LO:O VPWR:I VGND:I',
        'rI1 HI VPWR short',
        'rI2 VGND LO short',
        'MN LO LO VGND VGND nfet_01v8 w=0.42 l=0.15',
        '.ENDS',
      ),
      { scale: 1e-6 },
    );
    expect(d.diagnostics).toEqual([]);
    const c = cell(d, 'tiehi');
    const [hi, lo, vpwr, vgnd] = c.ports;
    expect(hi).toBe(vpwr);
    expect(lo).toBe(vgnd);
    expect(c.netIndex.get('hi')).toBe(c.netIndex.get('vpwr'));
    expect(c.netIndex.get('lo')).toBe(c.netIndex.get('vgnd'));
    // The device on LO now sees one node on all of drain, gate and source.
    const mn = mos(c, 'MN');
    expect(new Set([mn.drain, mn.gate, mn.source, mn.bulk]).size).toBe(1);
    // The ties stay as zero-ohm resistors, both ends on the merged net.
    expect(c.others.map((o) => o.kind === 'res' && [o.name, o.value, o.a === o.b])).toEqual([
      ['rI1', 0, true],
      ['rI2', 0, true],
    ]);
  });

  it('reads $[model] annotations on resistors and capacitors', () => {
    const d = read(lines('* annotations', 'R0 a b 2k $[rpoly] $W=1u $L=10u', 'C0 a 0 5f $[mimcap]', 'R1 b 0 $[rpoly] 3k'));
    expect(d.diagnostics).toEqual([]);
    const top = cell(d, TOP_LEVEL_CELL);
    expect(top.others).toMatchObject([
      { name: 'R0', value: 2e3, model: 'rpoly' },
      { name: 'C0', value: 5e-15, model: 'mimcap' },
      { name: 'R1', value: 3e3, model: 'rpoly' },
    ]);
  });

  it('reads *.SCALE and *.GLOBAL', () => {
    const d = read(lines('* CDL header', '*.SCALE MICRON', '*.GLOBAL VDD! GND!', '.SUBCKT c A', 'M1 A A GND! GND! nch w=2 l=0.5', '.ENDS'));
    expect(d.diagnostics).toEqual([]);
    expect(d.scale).toBe(1e-6);
    expect([...d.globals]).toEqual(['vdd!', 'gnd!']);
    expect(close(mos(cell(d, 'c'), 'M1').w, 2e-6)).toBe(true);
  });

  it('warns about a *.PININFO entry that names no port', () => {
    const d = read(lines('* pininfo', '.SUBCKT c A Y', '*.PININFO A:I Z:O Y:X', 'R1 A Y 1k', '.ENDS'));
    expect(where(d)).toEqual(['pininfo-unknown-pin@3:15', 'bad-pininfo@3:19']);
  });
});

describe('extracted netlists', () => {
  it('maps X lines naming undefined PDK devices to MOSFETs through the device map', () => {
    const d = read(
      lines(
        '* extracted standard cell, widths for .option scale=1e-6',
        '.subckt nor2 A B VGND VNB VPB VPWR Y',
        'X0 Y A VGND VNB sky130_fd_pr__nfet_01v8 w=650000u l=150000u',
        'X1 VGND B Y VNB sky130_fd_pr__nfet_01v8 w=650000u l=150000u',
        'X2 a_109_297# A VPWR VPB sky130_fd_pr__pfet_01v8_hvt w=1e+06u l=150000u',
        'X3 Y B a_109_297# VPB sky130_fd_pr__pfet_01v8_hvt w=1e+06u l=150000u',
        '.ends',
      ),
      { scale: 1e-6 },
    );
    expect(d.diagnostics).toEqual([]);
    const c = cell(d, 'nor2');
    expect(c.instances).toEqual([]);
    expect([...c.mosfets].map((m) => m.polarity).join('')).toBe('nnpp');
    const x2 = mos(c, 'X2');
    expect(terminals(c, x2)).toEqual(['a_109_297#', 'A', 'VPWR', 'VPB']);
    expect(close(x2.w, 1e-6) && close(x2.l, 0.15e-6)).toBe(true);
    expect(x2.model).toBe('sky130_fd_pr__pfet_01v8_hvt');
  });

  it('ties the nodes of an extracted short device', () => {
    const d = read(lines('* extracted tie', '.subckt tie HI LO VPWR VGND VNB', 'X0 VGND LO VNB short w=480000u l=45000u', 'X1 HI VPWR VNB short w=480000u l=45000u', '.ends'));
    expect(d.diagnostics).toEqual([]);
    const c = cell(d, 'tie');
    expect(c.netIndex.get('lo')).toBe(c.netIndex.get('vgnd'));
    expect(c.netIndex.get('hi')).toBe(c.netIndex.get('vpwr'));
  });

  it('reports an X line whose name is neither a subcircuit nor a mapped device', () => {
    const d = read(lines('* unmapped', '.subckt c A', 'X0 A B sky130_fd_pr__esd_clamp', '.ends'));
    expect(where(d)).toEqual(['unknown-subckt@3:8']);
    // With a deck that maps diodes, the same line is a diode.
    const mapped = read(lines('* mapped', '.subckt c A', 'X0 A B sky130_fd_pr__diode_pw2nd', '.ends'), {
      deviceMap: [{ pattern: '*diode*', kind: 'diode' }],
    });
    expect(codes(mapped)).toEqual([]);
    expect(cell(mapped, 'c').others).toMatchObject([{ kind: 'diode', name: 'X0', model: 'sky130_fd_pr__diode_pw2nd' }]);
  });
});
