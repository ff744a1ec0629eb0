// Go-to-definition over a run's files: which word of an instance line names a subcircuit, and
// where that subcircuit is defined. The forms follow the SPICE3 / ngspice subcircuit call
// (ngspice manual, “Subcircuit Calls”: `XYYYYYYY N1 <N2 N3 …> SUBNAM`, parameters after the
// name as `name=value`, names case-insensitive) and the CDL instance form with `/` before the
// cell name (`X1 n1 n2 / CELL`, with or without a space after the slash).

import { describe, expect, it } from 'vitest';
import { findDefinition, indexSubcircuits, referenceAt } from '../../src/features/editor/definitions';

// An invented two-file netlist set: a keeper cell in a library file, a domino bit using it.
const LIB = ['* lantern bit-cell library', '.SUBCKT lp_keeper dyn out vdd vss', 'Mkp dyn out vdd vdd pch w=0.4u l=0.15u', '.ENDS lp_keeper', '', '.subckt lp_inv a y vdd vss', 'Mn y a vss vss nch w=0.5u l=0.15u', 'Mp y a vdd vdd pch w=1u l=0.15u', '.ends'].join('\n');
const TOP = [
  '* match line, one bit',
  '.include "lib.sp"',
  '.subckt lm_bit clk a b ml vdd vss',
  'Mpre ml clk vdd vdd pch w=1u l=0.15u',
  'Xkeep ml mlb vdd vss LP_KEEPER',
  'Xinv ml mlb vdd',
  '+ vss lp_inv',
  'Xcdl ml mlb vdd vss / lp_inv',
  'Xcdl2 ml mlb vdd vss /LP_INV',
  'Xparam ml mlb vdd vss lp_inv m=2 wn = 1u',
  'Xnone ml mlb vdd vss not_defined',
  '.ends lm_bit',
].join('\n');
const files = [
  { path: 'lib.sp', text: LIB },
  { path: 'top.sp', text: TOP },
];
const lines = TOP.split('\n');
const col = (line: number, word: string) => lines[line - 1].indexOf(word) + 1;

describe('subcircuit index', () => {
  it('finds `.subckt` lines in every file, case-insensitively, with the name’s position', () => {
    const index = indexSubcircuits(files);
    expect(index.get('lp_keeper')).toEqual({ name: 'lp_keeper', path: 'lib.sp', line: 2, column: 9 });
    expect(index.get('lp_inv')).toMatchObject({ path: 'lib.sp', line: 6 });
    expect(index.get('lm_bit')).toMatchObject({ path: 'top.sp', line: 3 });
  });
});

describe('reference under the cursor', () => {
  it('is the last positional word of an instance line (SPICE3 form), in any letter case', () => {
    const ref = referenceAt(lines, 5, col(5, 'LP_KEEPER') + 3);
    expect(ref).toEqual({ name: 'LP_KEEPER', line: 5, startColumn: col(5, 'LP_KEEPER'), endColumn: col(5, 'LP_KEEPER') + 'LP_KEEPER'.length });
    expect(findDefinition(files, 'top.sp', 5, col(5, 'LP_KEEPER'))?.definition).toMatchObject({ path: 'lib.sp', line: 2 });
  });

  it('follows continuation lines to the name on a `+` line', () => {
    const ref = referenceAt(lines, 7, col(7, 'lp_inv'));
    expect(ref?.name).toBe('lp_inv');
    // A node on the first physical line is not the reference.
    expect(referenceAt(lines, 6, col(6, 'vdd'))).toBeNull();
  });

  it('takes the word after a CDL slash, spaced or not', () => {
    expect(referenceAt(lines, 8, col(8, 'lp_inv'))?.name).toBe('lp_inv');
    const attached = referenceAt(lines, 9, col(9, 'LP_INV'));
    expect(attached).toMatchObject({ name: 'LP_INV', startColumn: col(9, 'LP_INV') });
    // The nodes before the slash are not references.
    expect(referenceAt(lines, 8, col(8, 'mlb'))).toBeNull();
  });

  it('stops before parameters, spaced `name = value` included', () => {
    expect(referenceAt(lines, 10, col(10, 'lp_inv'))?.name).toBe('lp_inv');
    expect(referenceAt(lines, 10, col(10, 'm=2'))).toBeNull();
  });

  it('is nothing on device, comment and dot lines, and an undefined cell has no definition', () => {
    expect(referenceAt(lines, 4, col(4, 'pch'))).toBeNull();
    expect(referenceAt(lines, 1, 3)).toBeNull();
    expect(referenceAt(lines, 3, col(3, 'lm_bit'))).toBeNull();
    expect(referenceAt(lines, 11, col(11, 'not_defined'))?.name).toBe('not_defined');
    expect(findDefinition(files, 'top.sp', 11, col(11, 'not_defined'))).toBeNull();
  });
});
