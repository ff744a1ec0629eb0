// Shared by the grammar tests: read small netlists written in the tests with the
// built-in deck's device map, and look at the result by name.

import { readDesign, type ReadOptions } from '../../grammar/index';
import type { Cell, Design, Diagnostic, Mosfet } from '../../grammar/design';
import { defaultDeck } from '../../rules/default-deck';

const deck = defaultDeck();

export function read(files: Record<string, string> | string, options: Partial<ReadOptions> = {}): Design {
  const set = typeof files === 'string' ? { 'test.sp': files } : files;
  return readDesign(set, { defaultScale: 1, deviceMap: deck.deviceMap, supplies: deck.supplies, ...options });
}

export function cell(design: Design, key: string): Cell {
  const c = design.cells.get(key);
  if (!c) throw new Error(`no cell ${key}; cells: ${[...design.cells.keys()].join(', ')}`);
  return c;
}

export function mos(c: Cell, name: string): Mosfet {
  const m = [...c.mosfets].find((x) => x.name === name);
  if (!m) throw new Error(`no MOSFET ${name} in ${c.key}`);
  return m;
}

/** Net names of a MOSFET's terminals, drain gate source bulk. */
export function terminals(c: Cell, m: Mosfet): string[] {
  return [m.drain, m.gate, m.source, m.bulk].map((n) => c.nets[n]);
}

export function codes(design: Design): string[] {
  return design.diagnostics.map((d) => d.code);
}

/** `code@line:column` for each diagnostic, for exact position checks. */
export function where(design: Design): string[] {
  return design.diagnostics.map((d: Diagnostic) => `${d.code}@${d.line}:${d.column}`);
}

export function errors(design: Design): Diagnostic[] {
  return design.diagnostics.filter((d) => d.severity === 'error');
}

/** Relative closeness for floating-point SI values. */
export function close(a: number, b: number, rel = 1e-12): boolean {
  return Math.abs(a - b) <= rel * Math.max(Math.abs(a), Math.abs(b));
}
