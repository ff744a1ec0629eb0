// The typed syntax tree of one netlist file, as the parser builds it: statements in
// source order, `.subckt` and `.lib` sections as blocks holding their bodies.
// Element nodes are ids into the `nets` table of the body that holds the element
// (the file's top level, a `.subckt`, a `.lib` section): `body.nets.names[id]`.
// Nothing here is resolved yet: includes, parameters, models and subcircuit
// references are resolved by elaboration (grammar/elaborate.ts).

import type { Diagnostic, PinDirection, SourceLoc } from './design';
import type { CompiledExpr } from './expression';
import type { NameTable } from './names';

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
  kind: 'mos';
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
