// The editor's colouring, checked with Monaco's own tokenizer (it runs in jsdom) against the
// conventions every SPICE reader shares. Sources, recalled from memory of the manuals:
//  - SPICE3 / ngspice User's Manual, "Circuit Description — General Structure and Conventions":
//    the first letter of an element line names its kind (M MOSFET, X subcircuit instance,
//    C capacitor, R resistor, V/I sources, D diode); a line starting with `*` is a comment;
//    a line starting with `+` continues the previous one; scale suffixes are
//    T G MEG K M(milli) U N P F and MIL, and letters after them are ignored (`10fF`).
//  - ngspice User's Manual, same chapter: `$` (after white space) and `;` start an end-of-line
//    comment; `{…}` holds an expression evaluated when the netlist is read.
//  - CDL as LVS flows write it: `*.PININFO name:dir` is a directive inside a comment line, and
//    `/` separates an instance's nodes from its cell name.
import { beforeAll, describe, expect, it } from 'vitest';

type Monaco = typeof import('monaco-editor/editor');
let monaco: Monaco;
let languageId: string;

beforeAll(async () => {
  ({ monaco } = await import('../../src/features/editor/monaco-setup'));
  ({ SPICE_LANGUAGE_ID: languageId } = await import('../../src/features/editor/spice-language'));
});

/** Tokens of each line as `[text, type]`, without white space and without the `.spice` suffix. */
function tokens(text: string): [string, string][][] {
  const lines = text.split('\n');
  return monaco.editor.tokenize(text, languageId).map((row, i) =>
    row
      .map((t, j): [string, string] => [lines[i].slice(t.offset, row[j + 1]?.offset ?? lines[i].length), t.type.replace(/\.spice$/, '')])
      .filter(([, type]) => type !== 'white'),
  );
}

function typeOf(line: [string, string][], text: string) {
  return line.find(([t]) => t === text)?.[1];
}

describe('SPICE colouring', () => {
  it('names elements by their first letter', () => {
    const [m, x, c, r, v, d] = tokens(['M1 out in vss vss nch w=1u l=0.15u', 'Xinv a y inv', 'Cload y 0 10fF', 'R2 a b 1k', 'Vdd vdd 0 1.8', 'D1 a 0 dmod'].join('\n'));
    expect(m[0]).toEqual(['M1', 'element.mosfet']);
    expect(x[0]).toEqual(['Xinv', 'element.instance']);
    expect(c[0]).toEqual(['Cload', 'element.passive']);
    expect(r[0]).toEqual(['R2', 'element.passive']);
    expect(v[0]).toEqual(['Vdd', 'element.source']);
    expect(d[0]).toEqual(['D1', 'element.diode']);
    // Only the first word is an element name: nodes and the model are not.
    expect(typeOf(m, 'out')).toBe('identifier');
    expect(typeOf(m, 'nch')).toBe('identifier');
  });

  it('is case-insensitive, as SPICE is', () => {
    const [lower, upper] = tokens('mn1 a b c d nch\n.SUBCKT INV A Y');
    expect(lower[0]).toEqual(['mn1', 'element.mosfet']);
    expect(upper[0]).toEqual(['.SUBCKT', 'keyword.structure']);
    expect(upper[1]).toEqual(['INV', 'type.cell']);
  });

  it('marks dot-commands, and the cell a .subckt or .ends names', () => {
    const [subckt, param, ends, model] = tokens('.subckt dom_and2 clk a b y\n.param wn=0.4u\n.ends dom_and2\n.model nch nmos level=1');
    expect(subckt.slice(0, 2)).toEqual([
      ['.subckt', 'keyword.structure'],
      ['dom_and2', 'type.cell'],
    ]);
    expect(typeOf(subckt, 'clk')).toBe('identifier');
    expect(param[0]).toEqual(['.param', 'keyword']);
    expect(ends.slice(0, 2)).toEqual([
      ['.ends', 'keyword.structure'],
      ['dom_and2', 'type.cell'],
    ]);
    expect(model.slice(0, 3)).toEqual([
      ['.model', 'keyword'],
      ['nch', 'type.cell'],
      ['nmos', 'type'],
    ]);
  });

  it('splits a number from its scale suffix or unit letters', () => {
    const [line] = tokens('C1 a 0 10fF m=1meg l=1e+06u w=.5u k=2.5MIL');
    expect(line).toEqual(
      expect.arrayContaining([
        ['10', 'number'],
        ['fF', 'number.unit'],
        ['1', 'number'],
        ['meg', 'number.unit'],
        ['1e+06', 'number'],
        ['u', 'number.unit'],
        ['.5', 'number'],
        ['2.5', 'number'],
        ['MIL', 'number.unit'],
      ]),
    );
  });

  it('takes `name=value` as a parameter and its value', () => {
    const [line] = tokens('M1 d g s b pch w=0.6u nf=2');
    const i = line.findIndex(([t]) => t === 'w');
    expect(line.slice(i, i + 4)).toEqual([
      ['w', 'attribute.name'],
      ['=', 'operator'],
      ['0.6', 'number'],
      ['u', 'number.unit'],
    ]);
  });

  it('reads `*` lines as comments, but not a `*` inside an expression', () => {
    const [comment, indented, expr] = tokens('* keeper sizing follows\n   * indented comment\nM1 a b c d nch w={2*wn}');
    expect(comment).toEqual([['* keeper sizing follows', 'comment']]);
    expect(indented[0][1]).toBe('comment');
    expect(expr.slice(-5)).toEqual([
      ['{', 'delimiter.curly'],
      ['2', 'number'],
      ['*', 'operator'],
      ['wn', 'variable'],
      ['}', 'delimiter.curly'],
    ]);
  });

  it('ends a line at `$` and `;` inline comments', () => {
    const [dollar, semicolon] = tokens('M1 a b c d nch $ top of the stack\nCdyn dyn 0 2.5fF ; node cap');
    expect(dollar.at(-1)).toEqual(['$ top of the stack', 'comment']);
    expect(typeOf(dollar, 'nch')).toBe('identifier');
    expect(semicolon.at(-1)).toEqual(['; node cap', 'comment']);
  });

  it('marks `+` continuation lines and colours what follows as arguments', () => {
    const [first, cont] = tokens('Mkeep dyn y vdd vdd pch w=0.2u\n+ m=1 nf=1');
    expect(first[0][1]).toBe('element.mosfet');
    expect(cont[0]).toEqual(['+', 'delimiter.continuation']);
    expect(cont[1]).toEqual(['m', 'attribute.name']);
    // `m` after `+` is a parameter, not a MOSFET: only column one names an element.
    expect(cont.some(([, type]) => type.startsWith('element'))).toBe(false);
  });

  it('knows functions in expressions and closes the expression at the brace', () => {
    const [line] = tokens('.param w2={max(wn, 2*lmin)} z=1');
    expect(typeOf(line, 'max')).toBe('predefined');
    expect(typeOf(line, 'lmin')).toBe('variable');
    expect(typeOf(line, 'z')).toBe('attribute.name');
  });

  it('reads CDL pin directions and the cell after `/`', () => {
    const [pins, inst] = tokens('*.PININFO clk:I y:O vdd:B\nXtag0 clk a0 hit0 vdd vss / lk_dom_and2 wk=0.18u');
    expect(pins[0]).toEqual(['*.PININFO', 'annotation']);
    expect(pins.slice(1, 4)).toEqual([
      ['clk', 'identifier'],
      [':', 'delimiter'],
      ['I', 'keyword.direction'],
    ]);
    expect(typeOf(inst, '/')).toBe('delimiter');
    expect(typeOf(inst, 'lk_dom_and2')).toBe('type.cell');
  });

  it('keeps extracted-style names whole', () => {
    const [line] = tokens('X0 a_85_193# addr0[3] net<2> x1/x2/n5 sky_nfet w=650000u');
    expect(line.slice(1, 5)).toEqual([
      ['a_85_193#', 'identifier'],
      ['addr0[3]', 'identifier'],
      ['net<2>', 'identifier'],
      ['x1/x2/n5', 'identifier'],
    ]);
  });
});
