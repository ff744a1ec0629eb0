// `.include` and `.lib` resolved only inside the uploaded set of files, relative to
// the including file (as simulators resolve them relative to the deck); `.lib file
// section` reads the `.lib section` … `.endl` block of that file (ngspice convention).

import { describe, expect, it } from 'vitest';
import { TOP_LEVEL_CELL } from '../../grammar/index';
import { cell, codes, read, where } from './helpers';

const lines = (...ls: string[]) => ls.join('\n') + '\n';

describe('includes', () => {
  it('splices an included file in place, relative to the including file', () => {
    const d = read({
      'top.sp': lines('* deck', '.include "lib/cells.sp"', 'X1 a b inv'),
      'lib/cells.sp': lines('.subckt inv a y', '.include \'devices/pair.inc\'', '.ends'),
      'lib/devices/pair.inc': lines('Mn y a 0 0 nch w=1u l=1u', 'Mp y a vdd vdd pch w=2u l=1u'),
    });
    expect(d.diagnostics).toEqual([]);
    // The included file's devices land in the subcircuit that includes them, located in their own file.
    const inv = cell(d, 'inv');
    expect([...inv.mosfets].map((m) => `${m.name}@${m.loc.file}:${m.loc.line}`)).toEqual(['Mn@lib/devices/pair.inc:1', 'Mp@lib/devices/pair.inc:2']);
    expect(inv.nets).toEqual(['a', 'y', '0', 'vdd']);
    // Entry files are those nobody includes; the title rule does not apply to included files.
    expect(d.roots).toEqual([TOP_LEVEL_CELL]);
  });

  it('refuses a path that leaves the uploaded set', () => {
    const d = read({ 'deck/top.sp': lines('* deck', '.include "../../etc/models.lib"', '.inc /usr/share/models.lib', 'R1 a 0 1k') });
    expect(where(d)).toEqual(['include-outside@2:11', 'include-outside@3:6']);
  });

  it('reports a missing file, with a hint for a case mismatch', () => {
    const d = read({ 'top.sp': lines('* deck', '.include Models.lib', 'R1 a 0 1k'), 'models.lib': lines('.model nch nmos level=1') });
    expect(where(d)).toEqual(['include-not-found@2:10']);
    expect(d.diagnostics[0].hint).toContain('models.lib');
  });

  it('reports an include cycle once and still reads the rest', () => {
    const d = read({
      'a.sp': lines('* a', '.include b.sp', 'R1 a 0 1k'),
      'b.sp': lines('.include a.sp', 'R2 b 0 1k'),
    });
    expect(where(d)).toEqual(['include-cycle@1:10']);
    expect(cell(d, TOP_LEVEL_CELL).others.map((o) => o.name)).toEqual(['R2', 'R1']);
  });

  it('reads one section of a library with .lib file section', () => {
    const d = read({
      'top.sp': lines('* deck', '.lib "models.lib" tt', 'M1 y a 0 0 fet w=1u l=1u'),
      'models.lib': lines('* corner library', '.lib ff', '.model fet pmos level=1', '.endl ff', '.lib tt', '.model fet nmos level=1', '.endl tt'),
    });
    expect(d.diagnostics).toEqual([]);
    expect(cell(d, TOP_LEVEL_CELL).mosfets.at(0).polarity).toBe('n');
    const missing = read({ 'top.sp': lines('* deck', '.lib models.lib ss'), 'models.lib': lines('.lib tt', '.endl') });
    expect(codes(missing)).toEqual(['lib-section-not-found']);
  });

  it('reads a file included twice into one scope once, with a warning', () => {
    const d = read({ 'top.sp': lines('* deck', '.include cells.sp', '.include cells.sp', 'X1 a inv'), 'cells.sp': lines('.subckt inv a', 'R1 a 0 1k', '.ends') });
    expect(where(d)).toEqual(['repeated-include@3:10']);
  });

  it('starts only from the given entries when asked', () => {
    const files = { 'a.sp': lines('* a', 'R1 a 0 1k'), 'b.sp': lines('* b', 'R2 b 0 1k') };
    const d = read(files, { entry: ['b.sp'] });
    expect(cell(d, TOP_LEVEL_CELL).others.map((o) => o.name)).toEqual(['R2']);
    expect(codes(read(files, { entry: ['c.sp'] }))).toContain('entry-not-found');
  });
});
