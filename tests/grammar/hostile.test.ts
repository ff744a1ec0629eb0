// Hostile input ends in diagnostics, within bounded time and memory: never an
// exception, never the reader's own failure (`internal-error`), and time that grows
// linearly with the input.

import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { parseNetlist } from '../../grammar/parser';
import type { Design } from '../../grammar/design';
import { read } from './helpers';

const decoder = new TextDecoder('utf-8', { fatal: false });

function readsSafely(design: Design): void {
  expect(design.diagnostics.filter((d) => d.code === 'internal-error')).toEqual([]);
  for (const d of design.diagnostics) {
    expect(d.line).toBeGreaterThanOrEqual(1);
    expect(d.column).toBeGreaterThanOrEqual(1);
    expect(typeof d.message).toBe('string');
  }
}

const valid = [
  '* a small deck',
  '.option scale=1e-6',
  '.param wn=0.5 wp={2*wn}',
  '.model nch nmos (level=1 vto=0.4)',
  '.subckt inv a y vdd vss params: k=1',
  '*.PININFO a:I y:O',
  'Mn y a vss vss nch w={wn*k} l=0.15',
  'Mp y a vdd vdd pch w={wp*k}',
  '+ l=0.15 $ pull-up',
  '.ends inv',
  '.subckt buf a y vdd vss',
  'X1 a m vdd vss / inv',
  'X2 m y vdd vss inv k=2',
  'r1 y y2 short',
  '.ends',
  'Xb in out vdd 0 buf',
  'Vdd vdd 0 1.8',
  'Vin in 0 pulse(0 1.8 0 1p 1p 1n 2n)',
  'C1 out 0 10fF',
  '.end',
].join('\n');

describe('hostile input', () => {
  it('reads random bytes without throwing', () => {
    // Property (fast-check): any byte string, decoded as UTF-8 with U+FFFD for invalid sequences.
    fc.assert(
      fc.property(fc.uint8Array({ maxLength: 2000 }), (bytes) => {
        // A comment first line, so that the bytes are read as content rather than as a deck title.
        readsSafely(read('* fuzz\n' + decoder.decode(bytes)));
      }),
      { numRuns: 300 },
    );
  });

  it('reads random text made of netlist characters without throwing', () => {
    const alphabet = fc.constantFrom(...'MXRCVIDmx.+*$;=(){}\'"/\\ \t\n\r,:#[]<>0123456789.eEuUkKMEGfpn-abcsubcktendsparam'.split(''));
    fc.assert(
      fc.property(fc.array(alphabet, { maxLength: 3000 }), (chars) => {
        readsSafely(read('* fuzz\n' + chars.join('')));
      }),
      { numRuns: 300 },
    );
  });

  it('reads random mutations of a valid netlist without throwing', () => {
    const edit = fc.oneof(
      fc.record({ kind: fc.constant('insert' as const), at: fc.nat(), text: fc.string({ maxLength: 8 }) }),
      fc.record({ kind: fc.constant('delete' as const), at: fc.nat(), length: fc.integer({ min: 1, max: 12 }) }),
      fc.record({ kind: fc.constant('duplicate-line' as const), at: fc.nat() }),
      fc.record({ kind: fc.constant('swap-lines' as const), at: fc.nat(), with: fc.nat() }),
    );
    fc.assert(
      fc.property(fc.array(edit, { minLength: 1, maxLength: 10 }), (edits) => {
        let text = valid;
        for (const e of edits) {
          if (e.kind === 'insert') {
            const at = e.at % (text.length + 1);
            text = text.slice(0, at) + e.text + text.slice(at);
          } else if (e.kind === 'delete') {
            const at = e.at % (text.length + 1);
            text = text.slice(0, at) + text.slice(at + e.length);
          } else {
            const ls = text.split('\n');
            const i = e.at % ls.length;
            if (e.kind === 'duplicate-line') ls.splice(i, 0, ls[i]);
            else {
              const j = e.with % ls.length;
              [ls[i], ls[j]] = [ls[j], ls[i]];
            }
            text = ls.join('\n');
          }
        }
        readsSafely(read({ 'deck.sp': text, 'cells.inc': text }));
      }),
      { numRuns: 300 },
    );
  });

  it('reads pathological shapes', () => {
    const cases: [string, string][] = [
      ['empty file', ''],
      ['only blank lines', '\n\n\r\n  \n'],
      ['only comments', '* a\n* b\n'],
      ['a megabyte line of words', 'M1 ' + 'n '.repeat(500_000)],
      ['a megabyte line of parentheses', 'V1 a 0 ' + '('.repeat(1_000_000)],
      ['a megabyte brace expression', 'R1 a 0 {' + '1+'.repeat(500_000) + '1}'],
      ['an unclosed megabyte brace', '* x\nR1 a 0 {' + 'a'.repeat(1_000_000)],
      ['ten thousand continuation lines', '* x\nX1 a\n' + '+ n\n'.repeat(10_000) + '+ cell\n'],
      ['a lone + line', '+\n'],
      ['U+FFFD everywhere', '\ufffd\ufffd M1 \ufffd \ufffd\n.subckt \ufffd\n.ends\n'],
      ['NUL and control characters', '\u0000\u0001M1 a\u0007 b c d nch\n\u001b[31m\n'],
      ['only a .ends', '.ends\n'],
      ['deeply nested lib sections', '.lib a\n'.repeat(5000)],
    ];
    // Each must come back (the test's own timeout bounds the time; speed figures belong to npm run bench).
    for (const [, text] of cases) readsSafely(read(text));
  });

  it('grows linearly: four times the input takes about four times as long', () => {
    // Work of parse + elaboration for n and 4n copies of a block; a quadratic step would give ~16x.
    const block = valid.replace('.end', '').replace(/\b(inv|buf)\b/g, '$1_#');
    const netlist = (n: number) => Array.from({ length: n }, (_, i) => block.replace(/#/g, String(i))).join('\n');
    const timeOf = (text: string) => {
      let best = Infinity;
      for (let r = 0; r < 3; r++) {
        const t = performance.now();
        parseNetlist('x.sp', text);
        read(text);
        best = Math.min(best, performance.now() - t);
      }
      return best;
    };
    timeOf(netlist(200)); // warm the JIT
    const small = timeOf(netlist(500));
    const large = timeOf(netlist(2000));
    expect(large / small).toBeLessThan(10);
  });

  it('grows linearly on random junk too', () => {
    // The same comparison on fast-check's random text (a fixed seed), 50 kB against 200 kB.
    const junk = (n: number) => fc.sample(fc.string({ unit: fc.constantFrom(...'Mx.+*{}()=\'"$ ;\n\t0123456789abcdefghij'.split('')), minLength: n, maxLength: n }), { numRuns: 1, seed: 42 })[0];
    const timeOf = (text: string) => {
      let best = Infinity;
      for (let r = 0; r < 3; r++) {
        const t = performance.now();
        read('* junk\n' + text);
        best = Math.min(best, performance.now() - t);
      }
      return best;
    };
    timeOf(junk(10_000));
    expect(timeOf(junk(200_000)) / timeOf(junk(50_000))).toBeLessThan(10);
  });
});
