import { spawnSync } from 'node:child_process';
import { mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { looksNumeric, NumberCache, parsePlainDecimal, parseSpiceNumber } from '../../grammar/numbers';
import { ensureNgspice } from '../support/ngspice';
import { close, mos, read, cell, where } from './helpers';

function value(text: string): number {
  const r = parseSpiceNumber(text);
  if (!r.ok) throw new Error(`${text}: ${r.reason}`);
  return r.value;
}

/**
 * ngspice's reading of each literal on an element line: a current source of that
 * value drives 1/|value| ohms, so the node voltage is ±1 exactly when ngspice and
 * Keepwell read the literal alike.
 */
function ngspiceReadsAs(literals: string[], ours: number[]): number[] {
  const bin = ensureNgspice();
  const dir = mkdtempSync(join(tmpdir(), 'keepwell-numbers-'));
  try {
    const lines = ['* literal probe'];
    literals.forEach((lit, k) => {
      lines.push(`I${k} 0 n${k} ${lit}`, `R${k} n${k} 0 ${(1 / Math.abs(ours[k])).toExponential(15)}`);
    });
    lines.push('.control', 'op', ...literals.map((_, k) => `print v(n${k})`), '.endc', '.end', '');
    const file = join(dir, 'probe.cir');
    writeFileSync(file, lines.join('\n'));
    const run = spawnSync(bin, ['-b', file], { encoding: 'utf8', timeout: 60_000 });
    return literals.map((_, k) => {
      const m = new RegExp(`^v\\(n${k}\\) = (\\S+)`, 'm').exec(run.stdout);
      if (!m) throw new Error(`ngspice printed no v(n${k}):\n${run.stdout}\n${run.stderr}`);
      return Number(m[1]);
    });
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

describe('SPICE numbers', () => {
  it('reads scale factors and unit letters as ngspice does', () => {
    // Reference: ngspice itself (Debian ngspice), reading the same literals on element lines.
    const literals = ['1M', '1MEG', '1meg', '10fF', '1uA', '1e+06u', '2.5kohm', '.5', '-1.5n', '3mil', '1Meter', '4.7p', '2T', '1G', '7k', '1e-3', '1.5e2m', '100Hz', '0.1u'];
    const ours = literals.map(value);
    const volts = ngspiceReadsAs(literals, ours);
    literals.forEach((lit, k) => {
      expect(Math.abs(volts[k]), `${lit}: Keepwell ${ours[k]}, ngspice differs`).toBeCloseTo(1, 5);
      expect(Math.sign(volts[k]), lit).toBe(Math.sign(ours[k]));
    });
  });

  it('reads plain decimals on the fast path as the exact decimal, correctly rounded', () => {
    // ECMAScript's Number(string) is the correctly rounded value of the decimal (ECMA-262,
    // StringToNumber); the fast path must give the same double for every plain literal.
    const letters = ['', 't', 'g', 'k', 'm', 'u', 'n', 'p', 'f', 'a', 'K', 'M', 'U', 'N', 'P', 'F'];
    const exponentOf: Record<string, number> = { '': 0, t: 12, g: 9, k: 3, m: -3, u: -6, n: -9, p: -12, f: -15, a: -18 };
    fc.assert(
      fc.property(fc.stringMatching(/^[0-9]{1,9}$/), fc.option(fc.stringMatching(/^[0-9]{0,6}$/)), fc.constantFrom(...letters), (int, frac, letter) => {
        const text = `${int}${frac === null ? '' : `.${frac}`}${letter}`;
        const decimal = `${int}${frac === null ? '' : `.${frac}`}e${exponentOf[letter.toLowerCase()]}`;
        const fast = parsePlainDecimal(text, 0, text.length);
        const power = exponentOf[letter.toLowerCase()] - (frac?.length ?? 0);
        // Declined only where the mantissa or the power of ten is not exact as a double.
        if (Math.abs(power) > 22 || int.length + (frac?.length ?? 0) > 15) expect(fast).toBeNaN();
        else expect(fast).toBe(Number(decimal));
        expect(parseSpiceNumber(text)).toEqual({ ok: true, value: Number(decimal) });
      }),
      { numRuns: 3000 },
    );
    // Values of the benchmark's and the sky130 extractions' kind (hand-checked decimals).
    expect(parsePlainDecimal('0.15', 0, 4)).toBe(0.15);
    expect(parsePlainDecimal('650000u', 0, 7)).toBe(0.65);
    expect(parsePlainDecimal('1.26', 0, 4)).toBe(1.26);
    // Everything else is left to the general reader, which the cache in front of it still serves.
    for (const other of ['1e-6', '-1', '+2', '1meg', '10mil', '10fF', '1uA', '1µ', '1.2.3', '1234567890123456', '1e+06u', '.', '']) {
      expect(parsePlainDecimal(other, 0, other.length), other).toBeNaN();
    }
    const cache = new NumberCache();
    for (const text of ['0.42', '1e-6', '1meg', '2.5u', '10fF', '1x2']) expect(cache.parse(text), text).toEqual(parseSpiceNumber(text));
  });

  it('keeps the classic trap: M is milli, MEG is mega', () => {
    // SPICE3 scale factors (Quarles, SPICE3 user's guide, recalled from memory): M = 1e-3, MEG = 1e6, MIL = 25.4e-6.
    expect(value('1M')).toBe(1e-3);
    expect(value('1MEG')).toBe(1e6);
    expect(value('1mil')).toBeCloseTo(25.4e-6, 18);
    expect(value('1m')).toBe(value('1M'));
  });

  it('ignores unit letters after the scale factor and reads exponents', () => {
    // SPICE3 convention: letters that follow a number and are not a scale factor are ignored.
    expect(close(value('10fF'), 10e-15)).toBe(true);
    expect(value('1uA')).toBe(1e-6);
    expect(close(value('1e+06u'), 1)).toBe(true);
    expect(value('1.8V')).toBe(1.8);
    expect(value('5')).toBe(5);
    expect(close(value('1a'), 1e-18)).toBe(true); // atto, as the brief's list of suffixes gives it
    expect(close(value('2µ'), 2e-6)).toBe(true); // the micro sign read as u
  });

  it('refuses malformed and non-finite literals instead of guessing', () => {
    expect(parseSpiceNumber('1.2.3')).toEqual({ ok: false, reason: 'malformed' });
    expect(parseSpiceNumber('12abc3')).toEqual({ ok: false, reason: 'malformed' });
    expect(parseSpiceNumber('e5')).toEqual({ ok: false, reason: 'malformed' });
    // IEEE 754 doubles end near 1.8e308: 1e999 is infinite, never a value.
    expect(parseSpiceNumber('1e999')).toEqual({ ok: false, reason: 'non-finite' });
  });

  it('tells numbers from names by their first character', () => {
    expect(looksNumeric('0.65')).toBe(true);
    expect(looksNumeric('-.5')).toBe(true);
    expect(looksNumeric('+3')).toBe(true);
    expect(looksNumeric('vdd')).toBe(false);
    expect(looksNumeric('-')).toBe(false);
  });

  it('reports a malformed number on a device line at its exact column', () => {
    const d = read('* sizes\nM1 d g s b nch w=1.2.3u l=0.15u\n');
    // Columns count from 1 as editors show them; `1.2.3u` starts at column 18.
    expect(where(d)).toEqual(['malformed-number@2:18']);
  });

  it('reports 1e999 as a diagnostic, never as a value', () => {
    // (A first line with a problem would read as a deck's title, so the device is on line 2.)
    const d = read('* overflow\nM1 d g s b nch w=1e999 l=0.15u\n');
    expect(where(d)).toEqual(['non-finite-number@2:18']);
    // The device with the unreadable width is left out rather than given a made-up one.
    expect([...d.cells.values()].flatMap((c) => [...c.mosfets])).toHaveLength(0);
  });

  it('applies 1M as milli on a real device line', () => {
    // Same SPICE3 scale-factor table as above.
    const d = read('M1 d g s b nch w=1M l=1MEG\n');
    const m = mos(cell(d, '(top level)'), 'M1');
    expect(m.w).toBe(1e-3);
    expect(m.l).toBe(1e6);
  });
});
