// The elaborated design model every analysis works on.
//
// A design is a set of cells (subcircuit definitions, plus one synthetic cell for
// the top-level elements of a deck). It is hierarchical: a cell is described once,
// however many times it is instantiated, and nothing here is ever flattened.
// Net references inside a cell are small integers indexing `Cell.nets`, so that
// analyses can use typed arrays and avoid string work on hot paths.

import type { MosfetTable } from './mosfet-table';

export interface SourceLoc {
  /** Path of the file as given in the uploaded set (forward slashes). */
  file: string;
  /** 1-based physical line, counting every line of the file. */
  line: number;
  /** 1-based column of the first character. */
  column: number;
}

export type MosPolarity = 'n' | 'p';

export interface Mosfet {
  kind: 'mos';
  polarity: MosPolarity;
  /** Element name as written (`M1`, `X0`, `XM3`). */
  name: string;
  drain: number;
  gate: number;
  source: number;
  bulk: number;
  /** Model or PDK device name as written (`nch`, `sky130_fd_pr__nfet_01v8`). */
  model: string;
  /** Channel width in metres, scale applied. Total width of one device (all fingers). */
  w: number;
  /** Channel length in metres, scale applied. */
  l: number;
  /** Parallel multiplier (M); effective width is w × m. */
  m: number;
  /** Finger count (NF), 1 when absent. Informational: `w` already covers every finger. */
  nf: number;
  /** Other numeric parameters, lower-case keys (as, ad, ps, pd, …), scale applied where SPICE applies it. */
  params: Record<string, number>;
  loc: SourceLoc;
}

export interface Resistor {
  kind: 'res';
  name: string;
  a: number;
  b: number;
  /** Ohms. 0 for a zero-ohm tie (a model such as `short` with no value). */
  value: number;
  model?: string;
  loc: SourceLoc;
}

export interface Capacitor {
  kind: 'cap';
  name: string;
  a: number;
  b: number;
  /** Farads. */
  value: number;
  model?: string;
  loc: SourceLoc;
}

export interface Source {
  kind: 'vsrc' | 'isrc';
  name: string;
  pos: number;
  neg: number;
  /** DC value in volts or amperes when one is given. */
  dc?: number;
  /** Transient function (`pulse`, `sin`, `pwl`, …) when one is given: such a source drives a signal (a clock), not a rail. */
  waveform?: string;
  loc: SourceLoc;
}

export interface Diode {
  kind: 'diode';
  name: string;
  anode: number;
  cathode: number;
  model: string;
  loc: SourceLoc;
}

export type Device = Mosfet | Resistor | Capacitor | Source | Diode;

export type PinDirection = 'input' | 'output' | 'inout';

export interface Instance {
  /** Instance name as written (`X1`). */
  name: string;
  /** Key of the instantiated cell in `Design.cells`. */
  cell: string;
  /** Parent-cell net index for each port of the child, in the child's port order. */
  pins: number[];
  /** Parameter overrides as evaluated numbers, lower-case keys. */
  params: Record<string, number>;
  loc: SourceLoc;
}

export interface Cell {
  /** Name as written in its definition. */
  name: string;
  /** Lower-case lookup key (unique in the design; parameter variants get a suffix). */
  key: string;
  /** Net index of each port, in definition order. */
  ports: number[];
  /** Pin directions from `*.PININFO`, aligned with `ports`; undefined when unknown. */
  portDirections: (PinDirection | undefined)[];
  /** Net names as first written; index = net id. */
  nets: string[];
  /** Lower-case net name → net id. */
  netIndex: Map<string, number>;
  /** Where each net is first mentioned (its definition for ports). */
  netLocs: SourceLoc[];
  /** The cell's transistors, column by column (`mosfets.at(i)` for one as a record). */
  mosfets: MosfetTable;
  /** Resistors, capacitors, sources and diodes. */
  others: Exclude<Device, Mosfet>[];
  instances: Instance[];
  /** Location of the `.subckt` line (or of the first top-level element for the top cell). */
  loc: SourceLoc;
  /** True for the synthetic cell that holds a deck's top-level elements. */
  isTopLevel: boolean;
  /** Evaluated subcircuit parameters this variant was elaborated with. */
  params: Record<string, number>;
}

export type RailKind = 'power' | 'ground';

export type DiagnosticSeverity = 'error' | 'warning';

export interface Diagnostic {
  severity: DiagnosticSeverity;
  /** Stable short code, e.g. `unclosed-subckt`, `unknown-subckt`. */
  code: string;
  message: string;
  /** A short hint on how to fix it. */
  hint?: string;
  file: string;
  line: number;
  column: number;
}

export interface ModelCard {
  name: string;
  /** Lower-case type word as written: nmos, pmos, npn, d, r, c … */
  type: string;
  /** Lower-case keys: level, vto, kp, lambda, gamma, phi, … */
  params: Record<string, number>;
  loc: SourceLoc;
}

export interface Design {
  /** Every elaborated cell by key, including the top-level cell when it holds elements. */
  cells: Map<string, Cell>;
  /** Keys of the cells the check starts from (explicit top, else cells nobody instantiates). */
  roots: string[];
  /** Lower-case names declared by `.global` / `*.GLOBAL`. */
  globals: Set<string>;
  /** `.model` cards by lower-case name. */
  models: Map<string, ModelCard>;
  /** Lower-case names of nets held at a DC level by a voltage source, with their rail. */
  sourcedRails: Map<string, { rail: RailKind; volts: number }>;
  /** Files read, with their text, for the source map and the editor view. */
  files: { path: string; lineCount: number }[];
  /** The scale actually applied to W and L (from `.option scale`, the deck or the caller). */
  scale: number;
  diagnostics: Diagnostic[];
}

/** Number of times each cell occurs in the flattened hierarchy under the roots (as floating point: counts can exceed 2^53 in pathological inputs). */
export function instanceCounts(design: Design): Map<string, number> {
  const counts = new Map<string, number>();
  const order = topologicalOrder(design);
  for (const key of design.roots) counts.set(key, (counts.get(key) ?? 0) + 1);
  for (const key of order) {
    const n = counts.get(key) ?? 0;
    if (n === 0) continue;
    const cell = design.cells.get(key);
    if (!cell) continue;
    for (const inst of cell.instances) counts.set(inst.cell, (counts.get(inst.cell) ?? 0) + n);
  }
  return counts;
}

/** Cells ordered parents before children. Cycles (already reported by elaboration) are broken arbitrarily. */
export function topologicalOrder(design: Design): string[] {
  const state = new Map<string, 1 | 2>();
  const post: string[] = [];
  for (const start of design.cells.keys()) {
    if (state.has(start)) continue;
    const stack: [string, number][] = [[start, 0]];
    state.set(start, 1);
    while (stack.length) {
      const top = stack[stack.length - 1];
      const cell = design.cells.get(top[0]);
      const insts = cell ? cell.instances : [];
      if (top[1] < insts.length) {
        const child = insts[top[1]++].cell;
        if (!state.has(child) && design.cells.has(child)) {
          state.set(child, 1);
          stack.push([child, 0]);
        }
      } else {
        state.set(top[0], 2);
        post.push(top[0]);
        stack.pop();
      }
    }
  }
  return post.reverse();
}

/** Cells that occur under the roots, parents before children (what a check visits). */
export function occurringOrder(design: Design, counts: Map<string, number> = instanceCounts(design)): string[] {
  return topologicalOrder(design).filter((k) => (counts.get(k) ?? 0) > 0);
}

/** Flattened device and instance totals under the roots. */
export function flattenedTotals(design: Design, counts: Map<string, number> = instanceCounts(design)): { devices: number; instances: number } {
  let devices = 0;
  let instances = 0;
  for (const [key, n] of counts) {
    const cell = design.cells.get(key);
    if (!cell) continue;
    devices += n * (cell.mosfets.length + cell.others.length);
    instances += n * cell.instances.length;
  }
  return { devices, instances };
}

/** Total flattened device count under the roots. */
export function flattenedDeviceCount(design: Design): number {
  return flattenedTotals(design).devices;
}
