// The SPICE3 conventions every simulator shares (SPICE3 user's guide, Quarles,
// recalled from memory; ngspice manual, chapter "Circuit description"): one
// statement per logical line, `+` continuation, `*` comment lines, case-insensitive
// names, dot commands, element letters M X R C V I D.

import { describe, expect, it } from 'vitest';
import { parseNetlist } from '../../grammar/parser';
import { TOP_LEVEL_CELL } from '../../grammar/index';
import { cell, close, codes, mos, read, terminals, where } from './helpers';

const lines = (...ls: string[]) => ls.join('\n') + '\n';

describe('statements and lines', () => {
  it('is case-insensitive for keywords and names', () => {
    const d = read(
      lines(
        '* mixed case',
        '.SUBCKT Inv A Y VDD VSS',
        'mN Y a vss VSS nch W=0.5u L=0.15U',
        'MP y A Vdd vdd PCH w=1u l=0.15u',
        '.Ends INV',
        'x1 in out vdd 0 INV',
      ),
    );
    expect(d.diagnostics).toEqual([]);
    const inv = cell(d, 'inv');
    // One net per name whatever its case; the first spelling is kept.
    expect(inv.nets).toEqual(['A', 'Y', 'VDD', 'VSS']);
    expect(terminals(inv, mos(inv, 'mN'))).toEqual(['Y', 'A', 'VSS', 'VSS']);
    expect(mos(inv, 'mN').w).toBeCloseTo(0.5e-6, 18);
    expect(cell(d, TOP_LEVEL_CELL).instances[0].cell).toBe('inv');
  });

  it('reads the first line of a deck as its title unless it reads as content', () => {
    // SPICE convention: line 1 of a deck is its title. Keepwell keeps a first line that is valid content.
    const titled = parseNetlist('deck.sp', lines('Inverter chain with four stages', 'M1 y a 0 0 nch w=1u l=1u'), { simulationDeck: true });
    expect(titled.title).toBe('Inverter chain with four stages');
    expect(titled.diagnostics).toEqual([]);
    expect(titled.statements.map((s) => s.kind)).toEqual(['mos']);

    const content = parseNetlist('cell.sp', lines('M1 y a 0 0 nch w=1u l=1u', 'M2 y a vdd vdd pch w=2u l=1u'), { simulationDeck: true });
    expect(content.title).toBeUndefined();
    expect(content.statements).toHaveLength(2);

    const subckt = parseNetlist('lib.sp', lines('.subckt inv a y', 'M1 y a 0 0 nch w=1u l=1u', '.ends'), { simulationDeck: true });
    expect(subckt.title).toBeUndefined();
    expect(subckt.statements.map((s) => s.kind)).toEqual(['subckt']);

    // An included file has no title: its first line is always content.
    const included = parseNetlist('inc.sp', lines('Rload out 0 10k'), { simulationDeck: false });
    expect(included.statements.map((s) => s.kind)).toEqual(['res']);
  });

  it('joins + continuation lines, indented or not, across comment and blank lines', () => {
    const d = read(
      lines(
        '* continuation',
        '.subckt buf a y vdd vss',
        'X1 a',
        '+ mid vdd',
        '* a comment between the pieces',
        '',
        '   + vss inv',
        'X2 mid y vdd vss',
        '+inv',
        '.ends',
        '.subckt inv a y vdd vss',
        'M1 y a vss vss nch w=1u',
        '    + l=0.2u',
        '.ends',
      ),
    );
    expect(d.diagnostics).toEqual([]);
    const buf = cell(d, 'buf');
    expect(buf.instances.map((i) => [i.name, i.cell, i.pins.map((p) => buf.nets[p]).join(' ')])).toEqual([
      ['X1', 'inv', 'a mid vdd vss'],
      ['X2', 'inv', 'mid y vdd vss'],
    ]);
    // A logical line keeps the physical line where it starts.
    expect(buf.instances[0].loc).toEqual({ file: 'test.sp', line: 3, column: 1 });
    expect(buf.instances[1].loc.line).toBe(8);
    expect(mos(cell(d, 'inv'), 'M1').l).toBeCloseTo(0.2e-6, 18);
  });

  it('drops $ and ; inline comments and stops at .end', () => {
    const d = read(
      lines(
        '* comments',
        'M1 y a 0 0 nch w=1u l=1u $ the pull-down, w=9u would be too wide',
        'M2 y a vdd vdd pch w=2u l=1u;pull-up, no space needed before a semicolon',
        'R1 y 0 1k $[rpoly] $ a CDL model annotation, then a comment',
        '.end',
        'M3 this line is after .end and is never read',
      ),
    );
    const top = cell(d, TOP_LEVEL_CELL);
    expect(mos(top, 'M1').w).toBeCloseTo(1e-6, 18);
    expect([...top.mosfets].map((m) => m.name)).toEqual(['M1', 'M2']);
    expect(mos(top, 'M2').l).toBe(1e-6);
    expect(top.others).toMatchObject([{ name: 'R1', value: 1e3, model: 'rpoly' }]);
    expect(d.diagnostics).toEqual([]);
  });

  it('counts every physical line, CRLF and comment lines included, in locations', () => {
    const text = ['* header', '* more header', '', 'M1 y a 0 0 nch', '+ w=1u', '+ l=1u', '* note', 'M2 y a vdd vdd pch w=1u l=1u', ''].join('\r\n');
    const d = read(text);
    const top = cell(d, TOP_LEVEL_CELL);
    expect(mos(top, 'M1').loc).toEqual({ file: 'test.sp', line: 4, column: 1 });
    expect(mos(top, 'M2').loc.line).toBe(8);
    expect(d.files).toEqual([{ path: 'test.sp', lineCount: 9 }]);
  });

  it('keeps the column of an indented element', () => {
    const d = read(lines('* indented', '   M1 y a 0 0 nch w=1u l=1u'));
    expect(mos(cell(d, TOP_LEVEL_CELL), 'M1').loc).toEqual({ file: 'test.sp', line: 2, column: 4 });
  });
});

describe('pieces', () => {
  it('reads a file the same whatever size the pieces it is tokenized in', () => {
    // Chunking is an implementation detail: it must never change what a netlist means.
    const text = lines(
      '* chunked',
      '.subckt inv a y',
      'M1 y a 0 0 nch w=1u',
      '+ l=1u $ continued',
      '* comment',
      'M2 y a vdd vdd pch w=2u l=1u',
      '.ends',
      'X1 p q inv',
      'X2 q r',
      '+ inv',
      'R1 r 0 {2*1k}',
    );
    const shape = (chunkSize?: number) => JSON.stringify(parseNetlist('c.sp', text, { chunkSize }), (k, v) => (v instanceof Map || k === 'lookup' ? undefined : v));
    const whole = shape();
    for (const size of [1, 7, 16, 40]) expect(shape(size)).toBe(whole);
  });
});

describe('elements', () => {
  it('reads M, X, R, C, V, I and D elements with their values', () => {
    const d = read(
      lines(
        '* every element letter',
        '.subckt cell a b',
        'Rz a b 2.2k',
        '.ends',
        'M1 d g s b nch w=0.4u l=0.15u m=2 nf=2 as=0.1p ad=0.1p ps=1.2u pd=1.2u',
        'X1 d s cell',
        'R1 d s 10k',
        'R2 d s r=4.7k',
        'C1 d 0 10fF',
        'C2 d 0 c={2*5f}',
        'Vdd vdd 0 1.8',
        'Vb b 0 DC 0.4 AC 1',
        'Vclk g 0 pulse(0 1.8 0 10p 10p 1n 2n)',
        'Ib vdd s 10uA',
        'D1 s 0 dmod',
      ),
    );
    expect(d.diagnostics).toEqual([]);
    const top = cell(d, TOP_LEVEL_CELL);
    const m = mos(top, 'M1');
    expect([m.polarity, m.w, m.l, m.m, m.nf]).toEqual([ 'n', 0.4e-6, 0.15e-6, 2, 2]);
    expect(close(m.params.as, 0.1e-12) && close(m.params.ps, 1.2e-6)).toBe(true);
    const byName = new Map(top.others.map((o) => [o.name, o]));
    expect(byName.get('R1')).toMatchObject({ kind: 'res', value: 10e3 });
    expect(byName.get('R2')).toMatchObject({ kind: 'res', value: 4.7e3 });
    expect(close((byName.get('C1') as { value: number }).value, 10e-15)).toBe(true);
    expect(close((byName.get('C2') as { value: number }).value, 10e-15)).toBe(true);
    expect(byName.get('Vdd')).toMatchObject({ kind: 'vsrc', dc: 1.8 });
    expect(byName.get('Vb')).toMatchObject({ kind: 'vsrc', dc: 0.4 });
    expect(byName.get('Vclk')).toMatchObject({ kind: 'vsrc', waveform: 'pulse' });
    expect(byName.get('Vclk')).not.toHaveProperty('dc');
    expect(byName.get('Ib')).toMatchObject({ kind: 'isrc', dc: 10e-6 });
    expect(byName.get('D1')).toMatchObject({ kind: 'diode', model: 'dmod' });
    expect(top.instances).toHaveLength(1);
  });

  it('makes an unknown element letter a clear error, not a crash', () => {
    const d = read(lines('* letters', 'Q1 c b e npn', 'L1 a b 1n', '%junk here', 'M1 y a 0 0 nch w=1u l=1u'));
    expect(where(d)).toEqual(['unknown-element@2:1', 'unknown-element@3:1', 'unknown-element@4:1']);
    expect(d.diagnostics[0].message).toContain('bipolar transistor');
    expect(d.diagnostics[0].hint).toContain('M, X, R, C, V, I and D');
    // The rest of the file is still read.
    expect(cell(d, TOP_LEVEL_CELL).mosfets).toHaveLength(1);
  });
});

describe('subcircuits, parameters, models, options', () => {
  it('reads params: on .subckt and X lines, with defaults and overrides', () => {
    const d = read(
      lines(
        '* parameters',
        '.subckt inv a y vdd vss params: wn=0.5u wp={2*wn}',
        'Mn y a vss vss nch w={wn} l=0.15u',
        'Mp y a vdd vdd pch w={wp} l=0.15u',
        '.ends inv',
        'X1 a b vdd 0 inv',
        'X2 b c vdd 0 inv params: wn=1u',
        'X3 c d vdd 0 inv wn=1u wp=3u',
      ),
    );
    expect(d.diagnostics).toEqual([]);
    const top = cell(d, TOP_LEVEL_CELL);
    const widths = top.instances.map((i) => {
      const c = cell(d, i.cell);
      return [mos(c, 'Mn').w, mos(c, 'Mp').w].map((w) => Math.round(w * 1e9));
    });
    // Default wp = 2·wn: 0.5 µm → 1 µm; X2 overrides wn only, so wp follows it to 2 µm.
    expect(widths).toEqual([
      [500, 1000],
      [1000, 2000],
      [1000, 3000],
    ]);
  });

  it('allows an inline comment after a .subckt header', () => {
    const d = read(lines('* header comments', '.subckt inv a y $ inverter, minimum size', 'M1 y a 0 0 nch w=1u l=1u', '.ends', '.subckt buf a y ; buffer', 'X1 a y inv', '.ends'));
    expect(d.diagnostics).toEqual([]);
    expect(cell(d, 'inv').ports.map((p) => cell(d, 'inv').nets[p])).toEqual(['a', 'y']);
    expect(cell(d, 'buf').ports).toHaveLength(2);
  });

  it('reads a device inside a nested .subckt, local to its parent', () => {
    const d = read(
      lines(
        '* nesting',
        '.subckt outer a y',
        '.subckt leaf p q',
        'M1 q p 0 0 nch w=1u l=0.2u',
        '.ends leaf',
        'X1 a mid leaf',
        'X2 mid y leaf',
        '.ends outer',
        'Xtop in out outer',
      ),
    );
    expect(d.diagnostics).toEqual([]);
    expect(mos(cell(d, 'leaf'), 'M1').l).toBeCloseTo(0.2e-6, 18);
    expect(cell(d, 'outer').instances.map((i) => i.cell)).toEqual(['leaf', 'leaf']);
    // Outside its parent the nested definition is not visible.
    const outside = read(lines('* scope', '.subckt outer a', '.subckt leaf p', 'R1 p 0 1k', '.ends', '.ends', 'X1 n leaf'));
    expect(codes(outside)).toEqual(['unknown-subckt']);
  });

  it('takes polarity from the .model card, then from the device map', () => {
    const d = read(
      lines(
        '* models',
        '.model fastn nmos (level=1 vto=0.45 kp=120u lambda=0.05 gamma=0.4 phi=0.7)',
        '.model oddname pmos level=1 vto=-0.4',
        'M1 y a 0 0 fastn w=1u l=1u',
        'M2 y a vdd vdd oddname w=1u l=1u',
        'M3 y a vdd vdd pch_lvt w=1u l=1u',
        'M4 y a vdd vdd mystery w=1u l=1u',
      ),
    );
    const top = cell(d, TOP_LEVEL_CELL);
    expect([...top.mosfets].map((m) => [m.name, m.polarity])).toEqual([
      ['M1', 'n'],
      ['M2', 'p'],
      ['M3', 'p'],
    ]);
    expect(where(d)).toEqual(['unknown-model@7:16']);
    expect(d.models.get('fastn')).toMatchObject({ type: 'nmos', params: { level: 1, vto: 0.45, kp: 120e-6, lambda: 0.05, gamma: 0.4, phi: 0.7 } });
  });

  it('reads .macro/.eom as .subckt/.ends, binned model cards, and ignored device kinds', () => {
    // HSPICE-style synonyms and binned cards (nch.1, nch.2 serve devices naming nch), recalled from memory.
    const d = read(
      lines(
        '* synonyms',
        '.model nch.1 nmos level=1 lmin=0.1u lmax=1u',
        '.model nch.2 nmos level=1 lmin=1u lmax=10u',
        '.macro cell a y',
        'M1 y a 0 0 nch w=1u l=0.5u',
        'X9 y a fill_cap_cell',
        '.eom',
      ),
      { deviceMap: [{ pattern: 'fill_*', kind: 'ignore' }] },
    );
    expect(d.diagnostics).toEqual([]);
    const c = cell(d, 'cell');
    expect([...c.mosfets].map((m) => m.polarity)).toEqual(['n']);
    expect(c.others).toEqual([]);
  });

  it('warns about a MOSFET without W or L and uses the SPICE default or .option defw/defl', () => {
    // SPICE3: DEFW and DEFL default to 100 µm (recalled from the ngspice manual's .options list).
    const d = read(lines('* sizes', 'M1 y a 0 0 nch l=1u', 'M2 y a 0 0 nch'));
    expect(where(d)).toEqual(['missing-size@2:1', 'missing-size@3:1']);
    const top = cell(d, TOP_LEVEL_CELL);
    expect(mos(top, 'M1').w).toBeCloseTo(100e-6, 15);
    expect(mos(top, 'M2').l).toBeCloseTo(100e-6, 15);
    const withDefaults = read(lines('* sizes', '.option defw=2u defl=0.5u', 'M1 y a 0 0 nch'));
    expect(mos(cell(withDefaults, TOP_LEVEL_CELL), 'M1').w).toBeCloseTo(2e-6, 15);
    expect(mos(cell(withDefaults, TOP_LEVEL_CELL), 'M1').l).toBeCloseTo(0.5e-6, 15);
  });

  it('refuses an M line whose model card is not a MOSFET', () => {
    const d = read(lines('* kinds', '.model rpoly r rsh=100', 'M1 y a 0 0 rpoly w=1u l=1u'));
    expect(where(d)).toEqual(['model-kind@3:12']);
  });

  it('reports a declared subcircuit parameter that never gets a value', () => {
    const d = read(lines('* params', '.subckt c a params: w', 'M1 a a 0 0 nch w={w} l=1u', '.ends', 'X1 n c'));
    expect(codes(d)).toEqual(['unknown-parameter']);
    expect(d.diagnostics[0].message).toBe('parameter "w" has no value: it is declared without a default and the instance gives none');
    const given = read(lines('* params', '.subckt c a params: w', 'M1 a a 0 0 nch w={w} l=1u', '.ends', 'X1 n c w=2u'));
    expect(given.diagnostics).toEqual([]);
  });

  it('applies .option scale to W and L: w=650000u under scale=1e-6 is 0.65 µm', () => {
    // SPICE `.option scale` multiplies instance lengths (areas by its square).
    const d = read(lines('* scaled', '.option scale=1e-6', 'M1 y a 0 0 nch w=650000u l=150000u as=0.2 ps=1.8'));
    const m = mos(cell(d, TOP_LEVEL_CELL), 'M1');
    expect(close(m.w, 0.65e-6)).toBe(true);
    expect(close(m.l, 0.15e-6)).toBe(true);
    expect(close(m.params.as, 0.2e-12)).toBe(true);
    expect(close(m.params.ps, 1.8e-6)).toBe(true);
    expect(d.scale).toBe(1e-6);
  });

  it('uses the caller scale, then the deck scale, when the netlist sets none', () => {
    const text = lines('* unscaled', 'M1 y a 0 0 nch w=0.65 l=0.15');
    expect(mos(cell(read(text, { scale: 1e-6, defaultScale: 1 }), TOP_LEVEL_CELL), 'M1').w).toBeCloseTo(0.65e-6, 18);
    expect(mos(cell(read(text, { defaultScale: 1e-6 }), TOP_LEVEL_CELL), 'M1').w).toBeCloseTo(0.65e-6, 18);
    expect(mos(cell(read(text, { defaultScale: 1 }), TOP_LEVEL_CELL), 'M1').w).toBe(0.65);
    // The netlist's own scale wins over the caller's, with a warning.
    const own = read(lines('* scaled', '.option scale=1e-9', 'M1 y a 0 0 nch w=650 l=150'), { scale: 1e-6 });
    expect(close(mos(cell(own, TOP_LEVEL_CELL), 'M1').w, 0.65e-6)).toBe(true);
    expect(codes(own)).toEqual(['scale-override-ignored']);
  });

  it('records .global names and rails held by DC sources', () => {
    const d = read(lines('* rails', '.global vdd vss', 'Vdd vdd 0 1.2', 'Vss vss 0 0', 'Vio vio vss 1.8', 'Vclk clk 0 pulse(0 1.2 0 1p 1p 1n 2n)', 'M1 y clk vss vss nch w=1u l=1u'));
    expect([...d.globals]).toEqual(['vdd', 'vss']);
    expect(d.sourcedRails.get('vdd')).toEqual({ rail: 'power', volts: 1.2 });
    expect(d.sourcedRails.get('vss')).toEqual({ rail: 'ground', volts: 0 });
    // Chained through vss: vio sits 1.8 V above ground.
    expect(d.sourcedRails.get('vio')).toEqual({ rail: 'power', volts: 1.8 });
    // A clock source is a signal, not a rail.
    expect(d.sourcedRails.has('clk')).toBe(false);
  });

  it('takes a net the deck names as ground as the reference of a source', () => {
    // Built-in deck ground patterns include vss*: vssa is a reference even with no source to node 0.
    const d = read(lines('* analog rail', 'Va vdda vssa 3.3', 'R1 vdda vssa 1k'));
    expect(d.sourcedRails.get('vdda')).toEqual({ rail: 'power', volts: 3.3 });
    expect(d.sourcedRails.get('vssa')).toEqual({ rail: 'ground', volts: 0 });
  });
});

describe('names as extractors write them', () => {
  it('keeps #, brackets, angle brackets, slashes, colons and escapes in net names', () => {
    const d = read(
      lines(
        '* extracted names',
        '.subckt blk VPWR gnd:F12992 addr0[3] net<2> B_reg\\[106\\]',
        'X0 a_85_193# addr0[3] gnd:F12992 gnd:F12992 sky130_fd_pr__nfet_01v8 w=650000u l=150000u',
        'X1 x1/x2/n5 net<2> VPWR VPWR sky130_fd_pr__pfet_01v8_hvt w=1e+06u l=150000u',
        'R1 a_85_193# B_reg[106] 1k',
        '.ends',
      ),
      { scale: 1e-6 },
    );
    expect(d.diagnostics).toEqual([]);
    const blk = cell(d, 'blk');
    expect(blk.ports.map((p) => blk.nets[p])).toEqual(['VPWR', 'gnd:F12992', 'addr0[3]', 'net<2>', 'B_reg[106]']);
    expect(terminals(blk, mos(blk, 'X0'))).toEqual(['a_85_193#', 'addr0[3]', 'gnd:F12992', 'gnd:F12992']);
    expect(terminals(blk, mos(blk, 'X1'))).toEqual(['x1/x2/n5', 'net<2>', 'VPWR', 'VPWR']);
    // The escaped port and the plain spelling on R1 are one net.
    const r1 = blk.others.find((o) => o.name === 'R1') as { b: number };
    expect(blk.nets[r1.b]).toBe('B_reg[106]');
    expect(blk.netIndex.get('b_reg[106]')).toBe(r1.b);
  });
});
