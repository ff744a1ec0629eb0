// The reader's internal tables (the per-file MOSFET column table, the name and model
// tables, the range hash) must give back exactly what the text says, however many
// rows they hold and in whatever order names recur. The expectations are SPICE
// conventions (SPICE3 user's guide, recalled from memory; ngspice manual, chapters
// "Circuit description" and ".OPTIONS"): names are case-insensitive, `.option scale`
// multiplies W, L, PS, PD and, squared, AS and AD.

import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseNetlist } from '../../grammar/parser';
import { NameTable } from '../../grammar/names';
import { foldAscii } from '../../grammar/text-hash';
import { MosfetTable } from '../../grammar/mosfet-table';
import { cell, close, read, terminals } from './helpers';

describe('MOSFET rows beyond the first table block', () => {
  // 700 rows: the table starts with room for 256 and grows twice.
  const rows = 700;
  const lines: string[] = ['.option scale=1e-6', '.param wn=0.5', '.subckt blk a y vdd vss'];
  for (let r = 0; r < rows; r++) {
    const size = r % 3 === 0 ? 'w={wn*2}' : `w=${(r % 7) + 1}`;
    const junction = r % 5 === 0 ? ` as=${r % 4 + 1} ps=${r % 6 + 1}` : '';
    const model = r % 2 === 0 ? 'nch' : 'pch';
    lines.push(`M${r} n${r} a n${r + 1} ${model === 'nch' ? 'vss' : 'vdd'} ${model} ${size} l=0.15${junction}`);
  }
  lines.push('.ends blk', '.model nch nmos', '.model pch pmos');
  const design = read(lines.join('\n') + '\n');
  const blk = cell(design, 'blk');

  it('keeps every row, in order, with its own nodes', () => {
    expect(design.diagnostics).toEqual([]);
    expect(blk.mosfets).toHaveLength(rows);
    [...blk.mosfets].forEach((m, r) => {
      expect(m.name).toBe(`M${r}`);
      expect(terminals(blk, m)).toEqual([`n${r}`, 'a', `n${r + 1}`, r % 2 === 0 ? 'vss' : 'vdd']);
      expect(m.polarity).toBe(r % 2 === 0 ? 'n' : 'p');
    });
  });

  it('reads expressions and plain sizes of each row, scale applied (.option scale)', () => {
    [...blk.mosfets].forEach((m, r) => {
      const w = r % 3 === 0 ? 2 * 0.5 : (r % 7) + 1;
      expect(close(m.w, w * 1e-6)).toBe(true);
      expect(close(m.l, 0.15e-6)).toBe(true);
    });
  });

  it('gives junction parameters only to the rows that have them, AS scaled by scale squared', () => {
    [...blk.mosfets].forEach((m, r) => {
      if (r % 5 === 0) {
        expect(Object.keys(m.params).sort()).toEqual(['as', 'ps']);
        expect(close(m.params.as, (r % 4 + 1) * 1e-12)).toBe(true);
        expect(close(m.params.ps, (r % 6 + 1) * 1e-6)).toBe(true);
      } else expect(m.params).toEqual({});
    });
  });

  it('locates each row on its own line', () => {
    // Line 4 is the first M line (after .option, .param and .subckt).
    [...blk.mosfets].forEach((m, r) => expect([m.loc.line, m.loc.column]).toEqual([4 + r, 1]));
  });
});

describe('model names as written', () => {
  it('keeps the spelling of each line even when names recur in any order and case', () => {
    // Names that share length, first and last character, alternating in every pattern.
    const models = ['hv_nfet_01', 'hv_pfet_01', 'nch_lvt', 'NCH_LVT', 'pch_lvt', 'hv_nfet_01', 'Hv_Pfet_01'];
    const text: string[] = ['.model hv_nfet_01 nmos', '.model hv_pfet_01 pmos', '.model nch_lvt nmos', '.model pch_lvt pmos', '.subckt m a b'];
    for (let r = 0; r < 200; r++) text.push(`M${r} a b a b ${models[(r * 5 + (r >> 3)) % models.length]} w=1 l=1`);
    text.push('.ends');
    const d = read(text.join('\n') + '\n');
    expect(d.diagnostics).toEqual([]);
    const c = cell(d, 'm');
    [...c.mosfets].forEach((m, r) => {
      const written = models[(r * 5 + (r >> 3)) % models.length];
      expect(m.model).toBe(written);
      // Case-insensitive lookup of the .model card decides the polarity.
      expect(m.polarity).toBe(/nfet|nch/i.test(written) ? 'n' : 'p');
    });
  });
});

describe('node names', () => {
  it('gives two names one id exactly when they differ only in the case of ASCII letters', () => {
    // Property (fast-check) over a small alphabet so that near-equal names are frequent;
    // non-ASCII letters (Ä/ä) are distinct names, as SPICE folds only ASCII.
    const alphabet = fc.constantFrom(...'aAbBzZ09_[]<>#/Ää'.split(''));
    fc.assert(
      fc.property(fc.array(fc.array(alphabet, { minLength: 1, maxLength: 6 }).map((cs) => cs.join('')), { minLength: 1, maxLength: 60 }), (names) => {
        const table = new NameTable();
        const ids = names.map((n) => table.id(n, 0));
        for (let i = 0; i < names.length; i++) {
          for (let j = 0; j < names.length; j++) expect(ids[i] === ids[j]).toBe(foldAscii(names[i]) === foldAscii(names[j]));
        }
        // The first spelling is kept for each id.
        ids.forEach((id, i) => expect(foldAscii(table.names[id])).toBe(foldAscii(names[i])));
      }),
      { numRuns: 200 },
    );
  });

  it('still tells names apart once the table is large', () => {
    // Beyond 4096 names the table puts a cache of recent names in front of itself.
    const table = new NameTable();
    const n = 20_000;
    const wrong: string[] = [];
    for (let i = 0; i < n; i++) if (table.id(`net${i}`, i) !== i) wrong.push(`net${i}`);
    for (let i = n - 1; i >= 0; i -= 7) if (table.id(`NET${i}`, 0) !== i) wrong.push(`NET${i}`);
    expect(wrong).toEqual([]);
    expect(table.size).toBe(n);
  });
});

describe('line structure', () => {
  it('reads any sequence of netlist characters as lines, never failing the grammar itself', () => {
    // Every token the lexer makes belongs to some line (SPICE: a statement per logical
    // line), so the parser never reports that it could not read a line.
    const alphabet = fc.constantFrom(...'MXRmx.+*$;=(){}\'"/\\ \t\n\r,:#[]0123456789euUkKf-abcsubcktendsPININFO'.split(''));
    fc.assert(
      fc.property(fc.array(alphabet, { maxLength: 400 }), (chars) => {
        const ast = parseNetlist('x.sp', chars.join(''), { chunkSize: 64 });
        expect(ast.diagnostics.filter((d) => d.message.startsWith('cannot read this line'))).toEqual([]);
      }),
      { numRuns: 300 },
    );
  });
});

describe("a cell's MOSFET columns (MosfetTable)", () => {
  const table = new MosfetTable(1); // room for one: every further row grows the columns
  const files = ['top.sp', 'lib/cells.inc', 'top.sp'];
  for (let i = 0; i < 40; i++) {
    table.add(i % 2 ? 'p' : 'n', `M${i}`, i, i + 1, i + 2, i % 2 ? 100 : 101, i % 2 ? 'pch' : 'nch', (i + 1) * 1e-7, 1.5e-7, 1 + (i % 3), 1, i === 7 ? { as: 2e-13 } : undefined, files[i % 3], 10 + i, 1 + (i % 4));
  }

  it('gives each row back as written, its file and location included', () => {
    expect(table.length).toBe(40);
    const m = table.at(7);
    expect(m).toEqual({
      kind: 'mos', polarity: 'p', name: 'M7', drain: 7, gate: 8, source: 9, bulk: 100, model: 'pch',
      w: 8e-7, l: 1.5e-7, m: 2, nf: 1, params: { as: 2e-13 }, loc: { file: 'lib/cells.inc', line: 17, column: 4 },
    });
    expect(table.at(8).params).toEqual({});
    expect([...table].map((x) => x.loc.file)).toEqual(Array.from({ length: 40 }, (_, i) => files[i % 3]));
  });

  it('hands out copies: changing a record leaves the table as it is', () => {
    const m = table.at(3);
    m.w = 1;
    m.loc.line = 1;
    expect(table.w[3]).toBeCloseTo(4e-7, 20);
    expect(table.loc(3).line).toBe(13);
  });

  it('takes a subset in the order asked, and renumbers terminals of its own', () => {
    const sub = table.subset([5, 2, 5]);
    expect([...sub].map((x) => x.name)).toEqual(['M5', 'M2', 'M5']);
    expect(sub.at(1)).toEqual(table.at(2));
    sub.remapNets((net) => net + 1000);
    expect([sub.drain[0], sub.gate[0], sub.source[0], sub.bulk[0]]).toEqual([1005, 1006, 1007, 1100]);
    expect(table.drain[5]).toBe(5);
  });
});
