// SPICE numbers: a decimal with an optional exponent, then an optional scale
// factor, then any unit letters, which are ignored (SPICE3 convention shared by
// every simulator): `10fF` is 10e-15, `1uA` is 1e-6, `1e+06u` is 1.
// Scale factors: T G MEG K M(milli) U N P F A, and MIL (25.4 µm). `M` is milli,
// `MEG` is mega — `1M` is 0.001, the classic trap. The micro sign `µ` counts as `u`.

import { hashRange, RangeIndex } from './text-hash';

export type NumberResult = { ok: true; value: number } | { ok: false; reason: 'malformed' | 'non-finite' };

const SCALE_EXPONENT: Record<string, number> = {
  t: 12,
  g: 9,
  k: 3,
  m: -3,
  u: -6,
  µ: -6,
  μ: -6,
  n: -9,
  p: -12,
  f: -15,
  a: -18,
};

function isDigit(c: number): boolean {
  return c >= 48 && c <= 57;
}

function isLetter(c: number): boolean {
  return (c >= 65 && c <= 90) || (c >= 97 && c <= 122) || c === 0xb5 || c === 0x3bc;
}

/** Whether a word starts like a number (so that a failure to read it is a malformed number, not a name). */
export function looksNumeric(text: string): boolean {
  let i = 0;
  let c = text.charCodeAt(0);
  if (c === 43 || c === 45) c = text.charCodeAt(++i);
  if (c === 46) c = text.charCodeAt(++i);
  return isDigit(c);
}

/** Read a whole word as a SPICE number. */
export function parseSpiceNumber(text: string): NumberResult {
  const n = text.length;
  let i = 0;
  let c = text.charCodeAt(0);
  if (c === 43 || c === 45) i++;
  let digits = 0;
  while (i < n && isDigit(text.charCodeAt(i))) {
    i++;
    digits++;
  }
  if (i < n && text.charCodeAt(i) === 46) {
    i++;
    while (i < n && isDigit(text.charCodeAt(i))) {
      i++;
      digits++;
    }
  }
  if (digits === 0) return { ok: false, reason: 'malformed' };
  let end = i;
  c = text.charCodeAt(i);
  if (c === 101 || c === 69) {
    // An exponent only when digits follow; otherwise the `e` is a unit letter.
    let j = i + 1;
    const s = text.charCodeAt(j);
    if (s === 43 || s === 45) j++;
    if (isDigit(text.charCodeAt(j))) {
      while (j < n && isDigit(text.charCodeAt(j))) j++;
      end = j;
    }
  }
  // Suffix: letters only.
  for (let k = end; k < n; k++) {
    if (!isLetter(text.charCodeAt(k))) return { ok: false, reason: 'malformed' };
  }
  // A power-of-ten scale factor joins the exponent, so that the result is the correctly rounded
  // decimal (`0.15u` is exactly the double nearest 1.5e-7, not 0.15 × 1e-6).
  let value: number;
  if (end < n) {
    const suffix = text.slice(end, end + 3).toLowerCase();
    const mantissa = text.slice(0, end);
    if (suffix === 'mil') value = Number(mantissa) * 25.4e-6;
    else {
      const exponent = suffix === 'meg' ? 6 : SCALE_EXPONENT[suffix[0]];
      if (exponent === undefined || exponent === 0) value = Number(mantissa);
      else {
        const e = mantissa.search(/[eE]/);
        value = e < 0 ? Number(`${mantissa}e${exponent}`) : Number(`${mantissa.slice(0, e)}e${Number(mantissa.slice(e + 1)) + exponent}`);
      }
    }
  } else value = Number(text);
  if (!Number.isFinite(value)) return { ok: false, reason: 'non-finite' };
  return { ok: true, value };
}

/** Exact powers of ten as doubles (10^22 is the largest). */
const EXACT_POWERS = Array.from({ length: 23 }, (_, k) => Number(`1e${k}`));

/** Scale exponent of a one-letter suffix by character code (either case), 0 where the letter is none. */
const LETTER_EXPONENT = new Int8Array(128);
for (const [letter, e] of Object.entries(SCALE_EXPONENT)) {
  if (letter.charCodeAt(0) < 128) {
    LETTER_EXPONENT[letter.charCodeAt(0)] = e;
    LETTER_EXPONENT[letter.toUpperCase().charCodeAt(0)] = e;
  }
}

/**
 * The common literal read without any string work: digits, an optional fraction and at
 * most one scale letter (`0.42`, `150000u`, `1.26`). Mantissa and power of ten are both
 * exact as doubles (at most 15 digits, power at most 22), so one multiplication or
 * division gives the correctly rounded value, the same double as `Number("…e…")`
 * (Clinger's fast path). Anything else (signs, exponents, `meg`, `mil`, unit letters,
 * long mantissas) returns NaN and is read the general way.
 */
export function parsePlainDecimal(text: string, start: number, end: number): number {
  let mantissa = 0;
  let digits = 0;
  let fraction = -1;
  let i = start;
  for (; i < end; i++) {
    const c = text.charCodeAt(i);
    if (c >= 48 && c <= 57) {
      mantissa = mantissa * 10 + (c - 48);
      digits++;
    } else if (c === 46 && fraction < 0) fraction = i;
    else break;
  }
  if (digits === 0 || digits > 15) return NaN;
  let exponent = fraction < 0 ? 0 : -(i - fraction - 1);
  if (i < end) {
    const c = text.charCodeAt(i);
    if (i + 1 !== end || c >= 128 || LETTER_EXPONENT[c] === 0) return NaN;
    exponent += LETTER_EXPONENT[c];
  }
  if (exponent >= 0) return exponent > 22 ? NaN : mantissa * EXACT_POWERS[exponent];
  return exponent < -22 ? NaN : mantissa / EXACT_POWERS[-exponent];
}

/** A memo of parsed literals: netlists repeat the same few hundred values millions of times. */
export class NumberCache {
  private readonly keys: string[] = [];
  /** The result of a plain decimal, reused: callers read `value` at once and keep only the number. */
  private readonly plain: { ok: true; value: number } = { ok: true, value: 0 };
  private readonly results: NumberResult[] = [];
  // Folding case is safe: scale factors and unit letters read the same in either case.
  private readonly index = new RangeIndex((e) => this.keys[e], true, 1024);

  /** The number written at `text[start, end)`. */
  parseAt(text: string, start: number, end: number): NumberResult {
    const plain = parsePlainDecimal(text, start, end);
    if (plain === plain) {
      this.plain.value = plain;
      return this.plain;
    }
    const h = hashRange(text, start, end, true);
    const e = this.index.find(text, start, end, h);
    if (e >= 0) return this.results[e];
    const word = text.substring(start, end);
    const r = parseSpiceNumber(word);
    if (this.keys.length < 100_000) {
      this.keys.push(word);
      this.results.push(r);
      this.index.add(h);
    }
    return r;
  }

  parse(text: string): NumberResult {
    return this.parseAt(text, 0, text.length);
  }
}
