// Every problem is a diagnostic `file:line:column` (1-based, counting every
// physical line, as editors such as Monaco number them) with a short hint.
// Positions below are counted by hand from the netlists written here.

import { describe, expect, it } from 'vitest';
import { parseNetlist } from '../../grammar/parser';
import { cell, read, where } from './helpers';

const lines = (...ls: string[]) => ls.join('\n') + '\n';

describe('diagnostics with exact positions', () => {
  it('unclosed .subckt points at its .subckt line', () => {
    const d = read(lines('* unclosed', '', '  .subckt inv a y', 'M1 y a 0 0 nch w=1u l=1u'));
    expect(where(d)).toEqual(['unclosed-subckt@3:3']);
    expect(d.diagnostics[0].hint).toContain('.ends inv');
    // The body is still read.
    expect(cell(d, 'inv').mosfets).toHaveLength(1);
  });

  it('.ends without .subckt', () => {
    const d = read(lines('* stray', '.subckt a p', 'R1 p 0 1k', '.ends', '.ends extra'));
    expect(where(d)).toEqual(['stray-ends@5:1']);
  });

  it('.ends naming another subcircuit is a warning at the name', () => {
    const d = read(lines('* mismatch', '.subckt a p', 'R1 p 0 1k', '.ends b'));
    expect(where(d)).toEqual(['ends-mismatch@4:7']);
    expect(d.diagnostics[0].severity).toBe('warning');
  });

  it('malformed number at the value', () => {
    const d = read(lines('* numbers', 'C1 a 0 4.7.1p'));
    expect(where(d)).toEqual(['malformed-number@2:8']);
  });

  it('missing model name on an M line', () => {
    const d = read(lines('* model', 'M7 d g s b w=1u l=1u'));
    expect(where(d)).toEqual(['missing-model@2:1']);
    const short = read(lines('* nodes', 'M8 d g'));
    expect(where(short)).toEqual(['missing-nodes@2:1']);
  });

  it('wrong pin count at the instance', () => {
    const d = read(lines('* pins', '.subckt inv a y vdd vss', 'M1 y a vss vss nch w=1u l=1u', '.ends', 'X1 in out vdd inv'));
    expect(where(d)).toEqual(['pin-count@5:1']);
    expect(d.diagnostics[0].message).toBe('X1 connects 3 nodes to inv, which has 4 ports');
    expect(d.diagnostics[0].hint).toContain('test.sp:2');
  });

  it('unknown subcircuit at its name, also on a continuation line', () => {
    const d = read(lines('* unknown', 'X1 a b', '+ nosuch'));
    expect(where(d)).toEqual(['unknown-subckt@3:3']);
  });

  it('recursive instantiation at the instance that closes the cycle', () => {
    const d = read(lines('* recursion', '.subckt a p', 'X1 p b', '.ends', '.subckt b p', 'R1 p 0 1k', 'X2 p a', '.ends', 'Xtop n a'));
    expect(where(d)).toEqual(['recursive-instance@7:1']);
    expect(d.diagnostics[0].message).toContain('a → b → a');
    // The rest of the hierarchy still elaborates, without the cut instance.
    expect(cell(d, 'b').instances).toEqual([]);
    expect(cell(d, 'a').instances.map((i) => i.cell)).toEqual(['b']);
  });

  it('direct self-instantiation', () => {
    const d = read(lines('* self', '.subckt loop p', 'X1 p loop', '.ends'));
    expect(where(d)).toEqual(['recursive-instance@3:1']);
  });

  it('duplicate definition at the second name; the first one is used', () => {
    const d = read(lines('* dup', '.subckt inv a y', 'R1 a y 1k', '.ends', '.subckt INV a y', 'R1 a y 2k', 'R2 a y 2k', '.ends'));
    expect(where(d)).toEqual(['duplicate-subckt@5:9']);
    expect(cell(d, 'inv').others).toHaveLength(1);
  });

  it('an identical repeat of a definition (one macro cell in two files) is not a duplicate', () => {
    const leaf = lines('.subckt leaf a y', 'R1 a y 1k', '.ends leaf');
    const d = read({ 'one.sp': `* one\n${leaf}X1 p q leaf\n`, 'two.sp': `* two\n${leaf}X1 r s leaf\n` });
    expect(d.diagnostics).toEqual([]);
  });

  it('unclosed braces and quotes, and stray characters', () => {
    const d = read(lines('* syntax', 'M1 d g s b nch w={2*x l=1u', "M2 d g s b nch w='3 l=1u", 'R1 a b 1k }', 'V1 a 0 pulse(0 1 0'));
    expect(where(d)).toEqual(['unclosed-expression@2:18', 'unclosed-expression@3:18', 'syntax@4:11', 'unbalanced-parenthesis@5:13']);
  });

  it('unknown element and stray continuation', () => {
    const d = read(lines('* elements', 'Zz1 a b', '+ w=1u'));
    expect(where(d)).toEqual(['unknown-element@2:1']);
    // In a file read for its content (an included file has no title line), a leading "+" continues nothing.
    const stray = parseNetlist('inc.sp', '+ orphan continuation\nR1 a b 1k\n', { simulationDeck: false });
    expect(stray.diagnostics.map((x) => `${x.code}@${x.line}:${x.column}`)).toEqual(['stray-continuation@1:1']);
  });

  it('unknown dot commands warn; analyses are ignored silently', () => {
    const d = read(lines('* commands', '.tran 1p 10n', '.frobnicate all', '.control', 'run', 'let x = v(a) * $junk', '.endc', '.print tran v(a)'));
    expect(where(d)).toEqual(['unknown-command@3:1']);
    expect(d.diagnostics[0].severity).toBe('warning');
  });

  it('every diagnostic carries a message and a hint for the error kinds', () => {
    const d = read(lines('* all', '.subckt a p', 'X1 p nosuch', 'M1 p p p p nch w=1.2.3 l=1u', '.ends', '.ends', 'X2 q r a'));
    for (const x of d.diagnostics.filter((x) => x.severity === 'error')) {
      expect(x.message.length).toBeGreaterThan(10);
      expect(x.hint?.length ?? 0).toBeGreaterThan(5);
    }
    expect(where(d)).toEqual(['unknown-subckt@3:6', 'malformed-number@4:18', 'stray-ends@6:1', 'pin-count@7:1']);
  });
});
