// The typed syntax tree of one netlist file, as the parser builds it: statements in
// source order, `.subckt` and `.lib` sections as blocks holding their bodies.
// Element nodes are ids into the `nets` table of the body that holds the element
// (the file's top level, a `.subckt`, a `.lib` section): `body.nets.names[id]`.
// Nothing here is resolved yet: includes, parameters, models and subcircuit
// references are resolved by elaboration (grammar/elaborate.ts).

import type { Diagnostic, PinDirection, SourceLoc } from './design';
import type { CompiledExpr } from './expression';
import type { NameTable } from './names';
import { LocationCursor } from './source';

/** An expression to evaluate per parameter binding, or a bare parameter name (`w=wn`). */
export interface Expr {
  kind: 'expr';
  /** Text without braces or quotes. */
  text: string;
  compiled: CompiledExpr;
  /** Offset of the text's first character in its file (for messages). */
  offset: number;
  /** True for a bare word (`topography=normal`): when no parameter has that name, it is text, not an error. */
  bare: boolean;
}

/** A literal number (already scaled by its SPICE suffix) or an expression. */
export type Value = number | Expr;

export interface Param {
  /** Lower-case name. */
  name: string;
  /** Undefined for a declared parameter without a default (`.subckt x a params: w`). */
  value: Value | undefined;
  offset: number;
}

export interface MosStatement {
  readonly kind: 'mos';
  name: string;
  drain: number;
  gate: number;
  source: number;
  bulk: number;
  model: string;
  modelOffset: number;
  w?: Value;
  l?: Value;
  m?: Value;
  nf?: Value;
  /** Every other `name=value`, lower-case names. */
  extra?: Param[];
  loc: SourceLoc;
}

/** Value slots of a MOSFET row, in `MosTable.values` order. */
const W = 0;
const L = 1;
const M = 2;
const NF = 3;

/**
 * The M lines of one file, column by column: a million-line extraction holds its
 * transistors in a few typed arrays instead of a million statement objects. Sizes that
 * are plain numbers live in the arrays; an expression, or any other parameter, is kept
 * on the side for the few rows that have one. Locations are computed when asked.
 */
export class MosTable {
  count = 0;
  drain = new Int32Array(256);
  gate = new Int32Array(256);
  source = new Int32Array(256);
  bulk = new Int32Array(256);
  /** Offset of the element name (the line's first field) in the file. */
  offset = new Int32Array(256);
  modelOffset = new Int32Array(256);
  /** w, l, m, nf of each row, four per row; NaN where the value is absent or an expression. */
  values = new Float64Array(256 * 4);
  readonly names: string[] = [];
  readonly models: string[] = [];
  /** For rows whose w, l, m or nf is an expression: the four values, numbers included. */
  private readonly expressionList: (Value | undefined)[][] = [];
  /** For rows with other parameters: those parameters. */
  private readonly extraList: Param[][] = [];
  /** Per row, 1 + index into `expressionList` / `extraList`, 0 for none (a typed array: a Map keyed by a million rows costs a cache miss per read). */
  private expressionAt = new Int32Array(256);
  private extraAt = new Int32Array(256);
  private readonly cursor: LocationCursor;

  constructor(file: string, lineStarts: readonly number[]) {
    this.cursor = new LocationCursor(file, lineStarts);
  }

  add(name: string, drain: number, gate: number, source: number, bulk: number, model: string, offset: number, modelOffset: number, w: Value | undefined, l: Value | undefined, m: Value | undefined, nf: Value | undefined, extra: Param[] | undefined): number {
    if (this.count === this.drain.length) this.grow();
    const r = this.count++;
    this.drain[r] = drain;
    this.gate[r] = gate;
    this.source[r] = source;
    this.bulk[r] = bulk;
    this.offset[r] = offset;
    this.modelOffset[r] = modelOffset;
    this.names.push(name);
    this.models.push(model);
    const values = this.values;
    const at = 4 * r;
    values[at + W] = typeof w === 'number' ? w : NaN;
    values[at + L] = typeof l === 'number' ? l : NaN;
    values[at + M] = typeof m === 'number' ? m : NaN;
    values[at + NF] = typeof nf === 'number' ? nf : NaN;
    if (typeof w === 'object' || typeof l === 'object' || typeof m === 'object' || typeof nf === 'object') this.expressionAt[r] = this.expressionList.push([w, l, m, nf]);
    else this.expressionAt[r] = 0;
    if (extra) this.extraAt[r] = this.extraList.push(extra);
    else this.extraAt[r] = 0;
    return r;
  }

  /** Size `k` of row `r` (0 w, 1 l, 2 m, 3 nf). */
  value(r: number, k: number): Value | undefined {
    const v = this.values[4 * r + k];
    if (v === v) return v;
    const e = this.expressionAt[r];
    return e === 0 ? undefined : this.expressionList[e - 1][k];
  }

  /** Parameters of row `r` other than w, l, m and nf. */
  extra(r: number): Param[] | undefined {
    const e = this.extraAt[r];
    return e === 0 ? undefined : this.extraList[e - 1];
  }

  loc(r: number): SourceLoc {
    return this.cursor.at(this.offset[r]);
  }

  /** The file the rows come from. */
  get file(): string {
    return this.cursor.file;
  }

  /** 1-based line of row `r` (`loc` without the object). */
  lineOf(r: number): number {
    return this.cursor.lineIndex(this.offset[r]) + 1;
  }

  /** 1-based column of row `r`, given its line. */
  columnOf(r: number, line: number): number {
    return this.offset[r] - this.cursor.starts[line - 1] + 1;
  }

  private grow(): void {
    const n = this.drain.length * 2;
    const grow32 = (a: Int32Array) => {
      const b = new Int32Array(n);
      b.set(a);
      return b;
    };
    this.drain = grow32(this.drain);
    this.gate = grow32(this.gate);
    this.source = grow32(this.source);
    this.bulk = grow32(this.bulk);
    this.offset = grow32(this.offset);
    this.modelOffset = grow32(this.modelOffset);
    this.expressionAt = grow32(this.expressionAt);
    this.extraAt = grow32(this.extraAt);
    const values = new Float64Array(n * 4);
    values.set(this.values);
    this.values = values;
  }
}

/** One M line: a view of its row in the file's `MosTable` (every field read on demand). */
export class MosRow implements MosStatement {
  // A data field, not a getter: every walk over statements switches on `kind`.
  readonly kind = 'mos' as const;
  constructor(
    readonly table: MosTable,
    readonly row: number,
  ) {}
  get name(): string {
    return this.table.names[this.row];
  }
  get drain(): number {
    return this.table.drain[this.row];
  }
  get gate(): number {
    return this.table.gate[this.row];
  }
  get source(): number {
    return this.table.source[this.row];
  }
  get bulk(): number {
    return this.table.bulk[this.row];
  }
  get model(): string {
    return this.table.models[this.row];
  }
  get modelOffset(): number {
    return this.table.modelOffset[this.row];
  }
  get w(): Value | undefined {
    return this.table.value(this.row, W);
  }
  get l(): Value | undefined {
    return this.table.value(this.row, L);
  }
  get m(): Value | undefined {
    return this.table.value(this.row, M);
  }
  get nf(): Value | undefined {
    return this.table.value(this.row, NF);
  }
  get extra(): Param[] | undefined {
    return this.table.extra(this.row);
  }
  /** A new location object on every read. */
  get loc(): SourceLoc {
    return this.table.loc(this.row);
  }
}

export interface InstanceStatement {
  kind: 'instance';
  name: string;
  nodes: number[];
  /** Subcircuit (or PDK device) name as written. */
  cell: string;
  cellOffset: number;
  params: Param[];
  loc: SourceLoc;
}

export interface TwoTerminalStatement {
  kind: 'res' | 'cap';
  name: string;
  a: number;
  b: number;
  value?: Value;
  valueOffset: number;
  model?: string;
  loc: SourceLoc;
}

export interface SourceStatement {
  kind: 'vsrc' | 'isrc';
  name: string;
  pos: number;
  neg: number;
  /** The DC value when one is written (`V1 a 0 1.8`, `V1 a 0 DC 1.8`); absent for pure transient sources. */
  dc?: Value;
  /** Transient function name (`pulse`, `sin`, `pwl`, …) when the source has one: a signal, not a rail. */
  waveform?: string;
  loc: SourceLoc;
}

export interface DiodeStatement {
  kind: 'diode';
  name: string;
  anode: number;
  cathode: number;
  model: string;
  loc: SourceLoc;
}

export type ElementStatement = MosStatement | InstanceStatement | TwoTerminalStatement | SourceStatement | DiodeStatement;

export interface PinInfoEntry {
  name: string;
  direction: PinDirection;
  offset: number;
}

export interface SubcktStatement {
  kind: 'subckt';
  name: string;
  nameOffset: number;
  ports: string[];
  portOffsets: number[];
  /** Net id of each port in `nets` (ports are entered first). */
  portIds: number[];
  params: Param[];
  body: Statement[];
  nets: NameTable;
  loc: SourceLoc;
  /** Offsets of the definition's text, `.subckt` to the end of `.ends` (to recognise identical repeats). */
  start: number;
  end: number;
  /** Name written on `.ends`, if any. */
  endName?: string;
  closed: boolean;
}

export interface LibSectionStatement {
  kind: 'libsection';
  /** Lower-case section name. */
  name: string;
  body: Statement[];
  nets: NameTable;
  loc: SourceLoc;
  closed: boolean;
}

export interface ParamStatement {
  kind: 'param';
  params: Param[];
  loc: SourceLoc;
}

export interface ModelStatement {
  kind: 'model';
  name: string;
  /** Lower-case type word: nmos, pmos, d, r, c, npn, … */
  type: string;
  params: Param[];
  loc: SourceLoc;
}

export interface GlobalStatement {
  kind: 'global';
  names: string[];
  loc: SourceLoc;
}

export interface OptionStatement {
  kind: 'option';
  params: Param[];
  loc: SourceLoc;
}

/** CDL `*.SCALE`: the unit of the file's lengths. */
export interface ScaleStatement {
  kind: 'scale';
  value: number;
  loc: SourceLoc;
}

export interface PinInfoStatement {
  kind: 'pininfo';
  entries: PinInfoEntry[];
  loc: SourceLoc;
}

export interface IncludeStatement {
  kind: 'include';
  path: string;
  pathOffset: number;
  loc: SourceLoc;
}

/** `.lib file section`: include one section of a library file. */
export interface LibStatement {
  kind: 'lib';
  path: string;
  pathOffset: number;
  /** Lower-case section name. */
  section: string;
  loc: SourceLoc;
}

export type Statement =
  | ElementStatement
  | SubcktStatement
  | LibSectionStatement
  | ParamStatement
  | ModelStatement
  | GlobalStatement
  | OptionStatement
  | ScaleStatement
  | PinInfoStatement
  | IncludeStatement
  | LibStatement;

export interface FileAst {
  path: string;
  /** The first line, when it was read as a simulation deck's title. */
  title?: string;
  statements: Statement[];
  /** Nodes of the top-level statements. */
  nets: NameTable;
  lineStarts: number[];
  lineCount: number;
  diagnostics: Diagnostic[];
}
