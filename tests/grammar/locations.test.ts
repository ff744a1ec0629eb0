// Locations of devices and nets are computed on demand from offsets (a line-start
// table) rather than stored while parsing. These checks hold them against the text
// itself, split into lines the way editors split them (\n, \r\n or a lone \r; 1-based
// lines and UTF-16 columns): a SPICE element line starts with the element's name, and
// a net's location is a mention of that net (SPICE names are case-insensitive).

import { describe, expect, it } from 'vitest';
import { parseNetlist, type Cell, type Design, type SourceLoc } from '../../grammar/index';
import { read } from './helpers';
import { prng } from '../support/prng';


/** A body of MOSFET lines in an invented "Tarnby" clock-buffer block, with continuations, comments, blank lines and mixed line ends. */
function generateBody(rand: () => number, prefix: string, count: number, eol: () => string): string {
  let out = '';
  for (let i = 0; i < count; i++) {
    const y = `${prefix}_n${Math.floor(rand() * 40)}`;
    const a = `${prefix}_n${Math.floor(rand() * 40)}`;
    const style = rand();
    if (style < 0.25) out += `*  stage ${i}${eol()}`;
    if (style < 0.1) out += eol();
    if (style < 0.4) out += `  M${prefix}${i} ${y} ${a}${eol()}+ VSS vss${eol()}* between continuations${eol()}+ nch w=0.5u${eol()}+ l=0.15u${eol()}`;
    else if (style < 0.7) out += `M${prefix}${i}\t${y} ${a} vdd VDD pch w=1u l=0.15u $ inline note${eol()}`;
    else out += `m${prefix}${i} ${y.toUpperCase()} ${a} vss vss nch w=0.42u l=0.15u ; tail comment${eol()}`;
  }
  return out;
}

function generateSet(seed: number): Record<string, string> {
  const rand = prng(seed);
  const eols = ['\n', '\r\n', '\r'];
  const eol = () => eols[Math.floor(rand() * eols.length)];
  return {
    'tarnby.sp': `* Tarnby clock buffer${eol()}.subckt tarnby_buf vdd vss${eol()}${generateBody(rand, 'a', 300, eol)}.include "parts/tail.inc"${eol()}${generateBody(rand, 'b', 200, eol)}.ends tarnby_buf${eol()}Xtop vdd vss tarnby_buf${eol()}`,
    'parts/tail.inc': `* spliced into tarnby_buf${eol()}${generateBody(rand, 'c', 250, eol)}`,
  };
}

const editorLines = (text: string) => text.split(/\r\n|\n|\r/);

function textAt(files: Record<string, string>, loc: SourceLoc, length: number): string {
  const line = editorLines(files[loc.file])[loc.line - 1];
  expect(line, `${loc.file}:${loc.line} exists`).toBeDefined();
  return line.slice(loc.column - 1, loc.column - 1 + length);
}

function theCell(d: Design): Cell {
  const c = d.cells.get('tarnby_buf');
  if (!c) throw new Error('tarnby_buf not elaborated');
  return c;
}

describe('lazy source locations', () => {
  const files = generateSet(7);
  const d = read(files);

  it('places every device at its element name, in its own file', () => {
    expect(d.diagnostics).toEqual([]);
    const c = theCell(d);
    expect(c.mosfets).toHaveLength(750);
    for (const m of c.mosfets) {
      // SPICE: the element name is the first field of its (first physical) line.
      expect(textAt(files, m.loc, m.name.length)).toBe(m.name);
      const fromInclude = m.name.slice(1, 2).toLowerCase() === 'c';
      expect(m.loc.file).toBe(fromInclude ? 'parts/tail.inc' : 'tarnby.sp');
    }
    // Each read gives the same place.
    const first = c.mosfets.at(0);
    expect({ ...first.loc }).toEqual({ ...first.loc });
  });

  it('places every net at a mention of it, and keeps the locations in copies of the cell', () => {
    const c = theCell(d);
    expect(c.netLocs).toHaveLength(c.nets.length);
    c.nets.forEach((name, id) => {
      const loc = c.netLocs[id];
      expect(textAt(files, loc, name.length).toLowerCase()).toBe(name.toLowerCase());
    });
    // Ports are located at the .subckt line (line 2 of the deck).
    expect(c.netLocs[c.ports[0]].line).toBe(2);
    const copy = { ...c };
    expect(copy.netLocs).toBe(c.netLocs);
    expect(JSON.parse(JSON.stringify({ netLocs: c.netLocs })).netLocs).toHaveLength(c.nets.length);
    // A cell's locations can still be replaced as a whole.
    const replaced = { ...c };
    replaced.netLocs = [];
    expect(replaced.netLocs).toEqual([]);
  });

  it('gives the same lines whatever the size of the pieces the file is tokenized in', () => {
    const text = files['parts/tail.inc'];
    const whole = parseNetlist('parts/tail.inc', text);
    const small = parseNetlist('parts/tail.inc', text, { chunkSize: 97 });
    const lines = (ast: typeof whole) => ast.statements.map((s) => ('loc' in s ? `${s.loc.line}:${s.loc.column}` : ''));
    expect(lines(small)).toEqual(lines(whole));
    expect(whole.statements).toHaveLength(250);
  });
});
