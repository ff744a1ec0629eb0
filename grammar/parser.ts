// The netlist parser: a Chevrotain grammar over logical lines with embedded actions
// that decode each line into a typed statement (grammar/ast.ts). No CST is built.
//
//   netlist := line*
//   line    := Directive? item* Newline
//   item    := Fields | Brace | Quoted | DollarModel | LParen | RParen | Unclosed | Stray
//
// What a line means depends on its first field (an element letter or a dot
// command) and on the position of the fields after it, as in every SPICE reader;
// that decoding lives in `FileBuilder`. Block structure (`.subckt`/`.ends`,
// `.lib`/`.endl`) is tracked with an explicit stack, so nesting depth never grows
// the call stack. Problems become diagnostics with the file's physical line and
// column; nothing is thrown.
//
// The first line of a simulation deck is its title, by SPICE convention. Keepwell
// reads the first line as content instead when it is blank, a comment, a known dot
// command, or an element line that reads without any problem, because netlists cut
// from larger decks and exported by tools usually start with content.

import { createTokenInstance, EmbeddedActionsParser, type IToken } from 'chevrotain';
import type { FileAst, InstanceStatement, MosStatement, Param, PinInfoEntry, Statement, SubcktStatement, LibSectionStatement, Value, Expr } from './ast';
import type { Diagnostic, DiagnosticSeverity, PinDirection, SourceLoc } from './design';
import { compileExpression } from './expression';
import {
  Brace,
  DollarModel,
  Directive,
  Fields,
  LParen,
  Newline,
  netlistTokens,
  Quoted,
  RParen,
  statementChunks,
  Stray,
  tokenize,
  Unclosed,
  type FieldsPayload,
} from './lexer';
import { looksNumeric, NumberCache } from './numbers';
import { NameTable } from './names';
import { LocationCursor, lineStarts } from './source';

const enum Kind {
  Word = 0,
  Brace = 1,
  Quoted = 2,
  DollarModel = 3,
  Open = 4,
  Close = 5,
  Unclosed = 6,
  Stray = 7,
}

/** SPICE element letters Keepwell does not read, and what they are. */
const UNREAD_ELEMENTS: Record<string, string> = {
  l: 'inductor',
  k: 'coupled inductor',
  e: 'voltage-controlled voltage source',
  f: 'current-controlled current source',
  g: 'voltage-controlled current source',
  h: 'current-controlled voltage source',
  b: 'behavioural source',
  q: 'bipolar transistor',
  j: 'JFET',
  z: 'MESFET',
  s: 'voltage-controlled switch',
  w: 'current-controlled switch',
  t: 'transmission line',
  o: 'lossy transmission line',
  u: 'distributed RC line',
  y: 'transmission line',
  p: 'coupled transmission line',
  a: 'code model',
  n: 'OSDI device',
};

/** Dot commands that do not describe the circuit (analyses, outputs, simulator control): read and ignored. */
const IGNORED_COMMANDS = new Set([
  '.tran', '.ac', '.dc', '.op', '.noise', '.tf', '.sens', '.pz', '.disto', '.four', '.sp', '.pss', '.step',
  '.print', '.plot', '.probe', '.save', '.meas', '.measure', '.ic', '.nodeset', '.temp', '.width', '.title',
  '.alter', '.data', '.enddata', '.protect', '.unprotect', '.hdl', '.csparam', '.func', '.lin', '.options_end',
  '.if', '.elseif', '.else', '.endif', '.connect', '.iplot', '.four', '.dcvolt', '.backanno', '.net', '.graph',
]);

const KNOWN_COMMANDS = new Set([
  ...IGNORED_COMMANDS,
  '.subckt', '.macro', '.ends', '.eom', '.param', '.params', '.model', '.global', '.option', '.options', '.opt',
  '.include', '.inc', '.lib', '.endl', '.end', '.control', '.endc',
]);

const SOURCE_FUNCTIONS = new Set(['pulse', 'sin', 'pwl', 'exp', 'sffm', 'am', 'trnoise', 'trrandom', 'pat', 'distof1', 'distof2']);

/** Beyond this, a file is probably not a netlist at all; the count of the rest is reported. */
const MAX_DIAGNOSTICS_PER_FILE = 1000;

const PIN_DIRECTIONS: Record<string, PinDirection> = { i: 'input', o: 'output', b: 'inout', p: 'inout', g: 'inout' };

export interface ParseOptions {
  /** True for a file read as a deck of its own (not included): its first line may be a title. */
  simulationDeck?: boolean;
  /** Characters per tokenized piece (tests use small values to exercise piece boundaries). */
  chunkSize?: number;
}

class NetlistParser extends EmbeddedActionsParser {
  sink: FileBuilder | null = null;
  private itemAlts?: { ALT: () => void }[];

  constructor() {
    super(netlistTokens, { recoveryEnabled: true });
    this.performSelfAnalysis();
  }

  netlist = this.RULE('netlist', () => {
    this.MANY(() => this.SUBRULE(this.line));
  });

  line = this.RULE('line', () => {
    const directive = this.OPTION(() => this.CONSUME(Directive));
    this.MANY(() =>
      this.OR(
        // Cached alternatives: building them per call would allocate on every line.
        (this.itemAlts ??= [
          { ALT: () => { const t = this.CONSUME(Fields); this.ACTION(() => this.sink!.fields(t)); } },
          { ALT: () => { const t = this.CONSUME(Brace); this.ACTION(() => this.sink!.item(Kind.Brace, t)); } },
          { ALT: () => { const t = this.CONSUME(Quoted); this.ACTION(() => this.sink!.item(Kind.Quoted, t)); } },
          { ALT: () => { const t = this.CONSUME(DollarModel); this.ACTION(() => this.sink!.item(Kind.DollarModel, t)); } },
          { ALT: () => { const t = this.CONSUME(LParen); this.ACTION(() => this.sink!.item(Kind.Open, t)); } },
          { ALT: () => { const t = this.CONSUME(RParen); this.ACTION(() => this.sink!.item(Kind.Close, t)); } },
          { ALT: () => { const t = this.CONSUME(Unclosed); this.ACTION(() => this.sink!.item(Kind.Unclosed, t)); } },
          { ALT: () => { const t = this.CONSUME(Stray); this.ACTION(() => this.sink!.item(Kind.Stray, t)); } },
        ]),
      ),
    );
    this.CONSUME(Newline);
    this.ACTION(() => this.sink!.endLine(directive));
  });
}

let sharedParser: NetlistParser | null = null;
function netlistParser(): NetlistParser {
  return (sharedParser ??= new NetlistParser());
}

const EMPTY_WORDS: string[] = [];
const EMPTY_OFFSETS: number[] = [];

/** Builds one file's statements from decoded lines. */
class FileBuilder {
  readonly statements: Statement[] = [];
  readonly topNets = new NameTable();
  readonly diagnostics: Diagnostic[] = [];
  private readonly stack: (SubcktStatement | LibSectionStatement)[] = [];
  private readonly cursor: LocationCursor;
  private readonly numbers: NumberCache;
  /** Offset of the piece being parsed within the file. */
  base = 0;
  private ended = false;
  private suppressed = 0;
  /** Values that could not be read so far; an element whose count changed is left out. */
  private valueErrors = 0;
  private control: SourceLoc | null = null;
  /** Index of the last statement-producing line's first item (for `.ends` end offsets). */
  private lineEnd = 0;

  // The line being collected: item texts, offsets relative to `base`, kinds (null: all words).
  private words: string[] = EMPTY_WORDS;
  private offs: number[] = EMPTY_OFFSETS;
  private kinds: Kind[] | null = null;

  constructor(
    readonly path: string,
    readonly text: string,
    readonly starts: number[],
    numbers: NumberCache,
  ) {
    this.cursor = new LocationCursor(path, starts);
    this.numbers = numbers;
  }

  // ---- collecting items ----

  fields(t: IToken): void {
    const p = t.payload as FieldsPayload;
    if (this.words.length === 0) {
      this.words = p.words;
      this.offs = p.offsets;
      this.kinds = null;
      return;
    }
    this.materialiseKinds();
    for (let i = 0; i < p.words.length; i++) {
      this.words.push(p.words[i]);
      this.offs.push(p.offsets[i]);
      this.kinds!.push(Kind.Word);
    }
  }

  item(kind: Kind, t: IToken): void {
    if (this.words === EMPTY_WORDS) {
      this.words = [];
      this.offs = [];
      this.kinds = [];
    } else this.materialiseKinds();
    let text = t.image;
    let offset = t.startOffset;
    if (kind === Kind.Brace || kind === Kind.Quoted) {
      text = text.slice(1, -1);
      offset++;
    } else if (kind === Kind.DollarModel) {
      text = text.slice(2, -1);
      offset += 2;
    }
    this.words.push(text);
    this.offs.push(offset);
    this.kinds!.push(kind);
  }

  private materialiseKinds(): void {
    if (this.kinds) return;
    if (this.words === EMPTY_WORDS) {
      this.words = [];
      this.offs = [];
    }
    this.kinds = new Array(this.words.length).fill(Kind.Word);
  }

  endLine(directive: IToken | undefined): void {
    const words = this.words;
    const offs = this.offs;
    const kinds = this.kinds;
    this.words = EMPTY_WORDS;
    this.offs = EMPTY_OFFSETS;
    this.kinds = null;
    if (this.ended) return;
    if (directive) {
      this.directive(directive, words, offs, kinds);
      return;
    }
    if (words.length === 0) return;
    const line = new Line(words, offs, kinds, this.base);
    if (this.control) {
      if (line.isWord(0) && words[0].toLowerCase() === '.endc') this.control = null;
      return;
    }
    this.lineEnd = line.end();
    this.statement(line);
  }

  // ---- diagnostics and locations ----

  loc(offset: number): SourceLoc {
    return this.cursor.at(offset);
  }

  report(severity: DiagnosticSeverity, code: string, offset: number, message: string, hint?: string): void {
    if (this.diagnostics.length >= MAX_DIAGNOSTICS_PER_FILE) {
      this.suppressed++;
      return;
    }
    const at = this.cursor.at(offset);
    this.diagnostics.push({ severity, code, message, ...(hint ? { hint } : {}), file: at.file, line: at.line, column: at.column });
  }

  private error(code: string, offset: number, message: string, hint?: string): void {
    this.report('error', code, offset, message, hint);
  }

  private warning(code: string, offset: number, message: string, hint?: string): void {
    this.report('warning', code, offset, message, hint);
  }

  private readonly names = new Map<string, string>();

  /** One string per distinct model or cell name: a million lines name `nch` a million times. */
  intern(name: string): string {
    const known = this.names.get(name);
    if (known !== undefined) return known;
    // Bounded: frequent names (rails, clocks, models) arrive early; a huge table of one-off names only costs time.
    if (this.names.size < 20_000) this.names.set(name, name);
    return name;
  }

  /** The node table of the body being read. */
  private nets(): NameTable {
    const top = this.stack[this.stack.length - 1];
    return top ? top.nets : this.topNets;
  }

  private add(statement: Statement): void {
    const top = this.stack[this.stack.length - 1];
    (top ? top.body : this.statements).push(statement);
  }

  // ---- statements ----

  private statement(line: Line): void {
    if (!line.isWord(0)) {
      this.itemProblem(line, 0);
      return;
    }
    const first = line.words[0];
    const c = first.charCodeAt(0) | 0x20;
    if (first.charCodeAt(0) === 46 /* . */) return this.command(line, first.toLowerCase());
    switch (c) {
      case 109: // m
        return this.mosfet(line);
      case 120: // x
        return this.instance(line);
      case 114: // r
        return this.twoTerminal(line, 'res');
      case 99: // c
        return this.twoTerminal(line, 'cap');
      case 118: // v
        return this.source(line, 'vsrc');
      case 105: // i
        return this.source(line, 'isrc');
      case 100: // d
        return this.diode(line);
    }
    if (first.charCodeAt(0) === 43 /* + */) {
      this.error('stray-continuation', line.at(0), 'a "+" continuation line with no statement before it to continue', 'join it to the statement it belongs to, or remove the "+"');
      return;
    }
    const what = UNREAD_ELEMENTS[String.fromCharCode(c)];
    const shown = first.length > 24 ? first.slice(0, 24) + '…' : first;
    if (what) {
      this.error('unknown-element', line.at(0), `element "${shown}" is a ${what}, which Keepwell does not read`, 'Keepwell reads M, X, R, C, V, I and D elements; remove the element or move it to a simulation-only file');
    } else {
      this.error('unknown-element', line.at(0), `"${shown}" is neither an element nor a dot command`, 'element names start with M, X, R, C, V, I or D; dot commands with "."');
    }
  }

  /** Positional items from `from` until the first `name=value` or `params:`; returns the index where parameters start. */
  private positionalEnd(line: Line, from: number): number {
    let i = from;
    for (; i < line.length; i++) {
      if (line.kind(i) !== Kind.Word) continue;
      const w = line.words[i];
      if (w.indexOf('=') >= 0) {
        return w.charCodeAt(0) === 61 /* = */ && i > from ? i - 1 : i;
      }
      if (w.length === 7 && w.toLowerCase() === 'params:') return i;
    }
    return i;
  }

  private mosfet(line: Line): void {
    const end = this.positionalEnd(line, 1);
    const name = line.words[0];
    const form = 'an M element is: M<name> drain gate source bulk model [w=… l=…]';
    const positional = end - 1;
    if (positional >= 5 && !line.allWords(1, 6)) {
      for (let i = 1; i < 6; i++) if (!line.isWord(i)) return this.itemProblem(line, i);
    }
    if (positional === 4) {
      this.error('missing-model', line.at(0), `${name}: four fields where drain, gate, source, bulk and a model name are needed; is the model name (or the bulk node) missing?`, form);
      return;
    }
    if (positional < 4) {
      this.error('missing-nodes', line.at(0), `${name}: an M element needs drain, gate, source and bulk nodes and a model name (found ${positional} field${positional === 1 ? '' : 's'})`, form);
      return;
    }
    const words = line.words;
    const failures = this.valueErrors;
    const sizes: { w?: Value; l?: Value; m?: Value; nf?: Value } = {};
    let extra: Param[] | undefined;
    // Positional flags after the model (`off`) are simulator hints: skipped by paramAt.
    const params: Param[] = [];
    for (let i = end; i < line.length; ) {
      const w = words[i];
      const eq = line.isWord(i) ? w.indexOf('=') : -1;
      if (eq === 1 || eq === 2) {
        // Fast path for the sizes every line carries: w=…, l=…, m=…, nf=…
        const c = w.charCodeAt(0) | 0x20;
        const key = eq === 1 ? (c === 119 ? 'w' : c === 108 ? 'l' : c === 109 ? 'm' : null) : c === 110 && (w.charCodeAt(1) | 0x20) === 102 ? 'nf' : null;
        if (key && eq < w.length - 1) {
          sizes[key] = this.wordValue(w.slice(eq + 1), line.at(i) + eq + 1);
          i++;
          continue;
        }
      }
      i = this.paramAt(line, i, params, false);
    }
    for (const p of params) {
      if (p.name === 'w' || p.name === 'l' || p.name === 'm' || p.name === 'nf') sizes[p.name] = p.value;
      else (extra ??= []).push(p);
    }
    // A device with an unreadable value is left out (the value's diagnostic says why).
    if (this.valueErrors !== failures) return;
    const nets = this.nets();
    // Every field initialised here, so that all statements share one object shape.
    const stmt: MosStatement = {
      kind: 'mos',
      name,
      drain: nets.id(words[1], line.at(1)),
      gate: nets.id(words[2], line.at(2)),
      source: nets.id(words[3], line.at(3)),
      bulk: nets.id(words[4], line.at(4)),
      model: this.intern(words[5]),
      modelOffset: line.at(5),
      w: sizes.w,
      l: sizes.l,
      m: sizes.m,
      nf: sizes.nf,
      extra,
      loc: this.loc(line.at(0)),
    };
    this.add(stmt);
  }

  private instance(line: Line): void {
    const end = this.positionalEnd(line, 1);
    const name = line.words[0];
    // CDL writes `nodes / cell` (or `nodes /cell`); names such as x1/x2/n5 never start with "/".
    let slash = -1;
    for (let i = 1; i < end; i++) {
      if (line.isWord(i) && line.words[i].charCodeAt(0) === 47) {
        slash = i;
        break;
      }
    }
    let nodeEnd: number;
    let cell: string | undefined;
    let cellOffset: number;
    if (slash >= 0) {
      nodeEnd = slash;
      let cellIndex = slash;
      if (line.words[slash].length > 1) {
        cell = line.words[slash].slice(1);
        cellOffset = line.at(slash) + 1;
      } else if (slash + 1 < end && line.isWord(slash + 1)) {
        cellIndex = slash + 1;
        cell = line.words[cellIndex];
        cellOffset = line.at(cellIndex);
      } else cellOffset = line.at(slash);
      if (cell && cellIndex + 1 < end) {
        this.error('syntax', line.at(cellIndex + 1), `${name}: unexpected ${line.describe(cellIndex + 1)} after the subcircuit name`);
        return;
      }
    } else {
      nodeEnd = end - 1;
      if (end - 1 >= 1 && line.isWord(end - 1)) {
        cell = line.words[end - 1];
        cellOffset = line.at(end - 1);
      } else cellOffset = line.at(0);
    }
    if (!cell) {
      this.error('missing-subckt-name', cellOffset, `${name}: no subcircuit name`, 'an X element is: X<name> node… subckt [name=value…]');
      return;
    }
    for (let i = 1; i < nodeEnd; i++) {
      if (!line.isWord(i)) {
        this.error('syntax', line.at(i), `${name}: unexpected ${line.describe(i)} among the nodes`);
        return;
      }
    }
    const failures = this.valueErrors;
    const params = this.params(line, end);
    if (this.valueErrors !== failures) return;
    const nets = this.nets();
    const nodes: number[] = new Array(Math.max(0, nodeEnd - 1));
    for (let i = 1; i < nodeEnd; i++) nodes[i - 1] = nets.id(line.words[i], line.at(i));
    const stmt: InstanceStatement = {
      kind: 'instance',
      name,
      nodes,
      cell: this.intern(cell),
      cellOffset,
      params,
      loc: this.loc(line.at(0)),
    };
    this.add(stmt);
  }

  private twoTerminal(line: Line, kind: 'res' | 'cap'): void {
    const name = line.words[0];
    const what = kind === 'res' ? 'resistor' : 'capacitor';
    if (line.length < 3 || !line.allWords(1, 3) || line.words[1].indexOf('=') >= 0 || line.words[2].indexOf('=') >= 0) {
      this.error('missing-nodes', line.at(0), `${name}: a ${what} needs two nodes`, `a ${what} is: ${kind === 'res' ? 'R' : 'C'}<name> node node value [model]`);
      return;
    }
    const failures = this.valueErrors;
    const end = this.positionalEnd(line, 3);
    let value: Value | undefined;
    let valueOffset = line.at(0);
    let model: string | undefined;
    // Positional: a value and/or a model name, in either order (`R1 a b 1k rpoly`, `r1 a b short`), or CDL `$[model]`.
    for (let i = 3; i < end; i++) {
      const k = line.kind(i);
      const numeric = k === Kind.Brace || k === Kind.Quoted || (k === Kind.Word && looksNumeric(line.words[i]));
      if (k === Kind.DollarModel || (k === Kind.Word && !numeric)) {
        if (model === undefined) model = line.words[i];
      } else if (numeric) {
        if (value === undefined) {
          value = this.value(line, i);
          valueOffset = line.at(i);
        }
      } else if (k === Kind.Stray || k === Kind.Unclosed) this.itemProblem(line, i);
    }
    const valueKeys = kind === 'res' ? ['r', 'resistance', 'value'] : ['c', 'capacitance', 'value'];
    for (const p of this.params(line, end)) {
      if (valueKeys.includes(p.name) && value === undefined) {
        value = p.value;
        valueOffset = p.offset;
      }
    }
    if (this.valueErrors !== failures) return;
    const nets = this.nets();
    const a = nets.id(line.words[1], line.at(1));
    const b = nets.id(line.words[2], line.at(2));
    this.add({ kind, name, a, b, value, valueOffset, model, loc: this.loc(line.at(0)) });
  }

  private source(line: Line, kind: 'vsrc' | 'isrc'): void {
    const name = line.words[0];
    if (line.length < 3 || !line.allWords(1, 3)) {
      this.error('missing-nodes', line.at(0), `${name}: a source needs two nodes`, `a source is: ${kind === 'vsrc' ? 'V' : 'I'}<name> node+ node- [DC] value [AC …] [pulse(…)]`);
      return;
    }
    const failures = this.valueErrors;
    let dc: Value | undefined;
    let waveform: string | undefined;
    let i = 3;
    while (i < line.length) {
      const k = line.kind(i);
      const w = line.words[i];
      if (k === Kind.Word) {
        const lw = w.toLowerCase();
        if (lw === 'dc' && i + 1 < line.length) {
          dc = this.value(line, i + 1);
          i += 2;
          continue;
        }
        if (lw.startsWith('dc=')) {
          dc = w.length > 3 ? this.wordValue(w.slice(3), line.at(i) + 3) : i + 1 < line.length ? this.value(line, ++i) : undefined;
          i++;
          continue;
        }
        if (lw === 'ac') {
          // AC magnitude and phase: skip the numbers that follow.
          i++;
          while (i < line.length && line.kind(i) !== Kind.Open && (line.kind(i) !== Kind.Word || looksNumeric(line.words[i]))) i++;
          continue;
        }
        if (SOURCE_FUNCTIONS.has(lw)) {
          // A transient function, with or without parentheses: the rest of the line is its arguments.
          waveform = lw;
          i = line.length;
          break;
        }
        if (looksNumeric(w)) {
          if (dc === undefined) dc = this.value(line, i);
          i++;
          continue;
        }
        this.error('syntax', line.at(i), `${name}: unexpected "${w.slice(0, 24)}" in a source`, `a source is: ${kind === 'vsrc' ? 'V' : 'I'}<name> node+ node- [DC] value [AC mag [phase]] [pulse(…)|sin(…)|pwl(…)|exp(…)]`);
        this.valueErrors++;
        i++;
        continue;
      }
      if ((k === Kind.Brace || k === Kind.Quoted) && dc === undefined) dc = this.value(line, i);
      else if (k === Kind.Stray || k === Kind.Unclosed) this.itemProblem(line, i);
      i++;
    }
    this.checkParentheses(line);
    if (this.valueErrors !== failures) return;
    const nets = this.nets();
    const pos = nets.id(line.words[1], line.at(1));
    const neg = nets.id(line.words[2], line.at(2));
    this.add({ kind, name, pos, neg, dc, ...(waveform ? { waveform } : {}), loc: this.loc(line.at(0)) });
  }

  private diode(line: Line): void {
    const name = line.words[0];
    if (line.length < 4 || !line.allWords(1, 4) || line.words[3].indexOf('=') >= 0) {
      this.error(line.length >= 3 ? 'missing-model' : 'missing-nodes', line.at(0), `${name}: a diode needs anode, cathode and a model name`, 'a diode is: D<name> anode cathode model [area]');
      return;
    }
    const nets = this.nets();
    const anode = nets.id(line.words[1], line.at(1));
    const cathode = nets.id(line.words[2], line.at(2));
    this.add({ kind: 'diode', name, anode, cathode, model: this.intern(line.words[3]), loc: this.loc(line.at(0)) });
  }

  // ---- dot commands ----

  private command(line: Line, cmd: string): void {
    switch (cmd) {
      case '.subckt':
      case '.macro':
        return this.subckt(line);
      case '.ends':
      case '.eom':
        return this.ends(line);
      case '.param':
      case '.params':
        this.add({ kind: 'param', params: this.paramAssignments(line), loc: this.loc(line.at(0)) });
        return;
      case '.model':
        return this.model(line);
      case '.global': {
        const names: string[] = [];
        for (let i = 1; i < line.length; i++) if (line.isWord(i)) names.push(line.words[i]);
        this.add({ kind: 'global', names, loc: this.loc(line.at(0)) });
        return;
      }
      case '.option':
      case '.options':
      case '.opt':
        this.add({ kind: 'option', params: this.params(line, this.positionalEnd(line, 1), true), loc: this.loc(line.at(0)) });
        return;
      case '.include':
      case '.inc': {
        if (line.length < 2 || (line.kind(1) !== Kind.Word && line.kind(1) !== Kind.Quoted)) {
          this.error('missing-path', line.at(0), `${line.words[0]}: no file name`, 'write .include "relative/path"');
          return;
        }
        this.add({ kind: 'include', path: line.words[1], pathOffset: line.at(1), loc: this.loc(line.at(0)) });
        return;
      }
      case '.lib':
        return this.lib(line);
      case '.endl': {
        const top = this.stack[this.stack.length - 1];
        if (!top || top.kind !== 'libsection') {
          this.error('stray-endl', line.at(0), '.endl without a matching .lib section', 'remove it, or open the section with .lib NAME');
          return;
        }
        top.closed = true;
        this.stack.pop();
        return;
      }
      case '.end':
        this.ended = true;
        return;
      case '.control':
        this.control = this.loc(line.at(0));
        return;
      case '.endc':
        return;
    }
    if (IGNORED_COMMANDS.has(cmd)) return;
    this.warning('unknown-command', line.at(0), `unknown dot command "${line.words[0].slice(0, 24)}" ignored`);
  }

  private subckt(line: Line): void {
    if (line.length < 2 || !line.isWord(1) || line.words[1].indexOf('=') >= 0) {
      this.error('missing-name', line.at(0), `${line.words[0]} without a subcircuit name`, 'write .subckt NAME port… [params: name=value…]');
      // Still open a block so that the matching .ends does not read as stray.
      this.stack.push({ kind: 'subckt', name: '', nameOffset: line.at(0), ports: [], portOffsets: [], portIds: [], params: [], body: [], nets: new NameTable(), loc: this.loc(line.at(0)), start: line.at(0), end: line.at(0), closed: false });
      return;
    }
    const end = this.positionalEnd(line, 2);
    const ports: string[] = [];
    const portOffsets: number[] = [];
    for (let i = 2; i < end; i++) {
      if (!line.isWord(i)) {
        this.itemProblem(line, i);
        continue;
      }
      ports.push(line.words[i]);
      portOffsets.push(line.at(i));
    }
    const nets = new NameTable();
    const stmt: SubcktStatement = {
      kind: 'subckt',
      name: line.words[1],
      nameOffset: line.at(1),
      ports,
      portOffsets,
      portIds: ports.map((p, i) => nets.id(p, portOffsets[i])),
      params: this.params(line, end),
      body: [],
      nets,
      loc: this.loc(line.at(0)),
      start: line.at(0),
      end: line.at(0),
      closed: false,
    };
    this.add(stmt);
    this.stack.push(stmt);
  }

  private ends(line: Line): void {
    const top = this.stack[this.stack.length - 1];
    if (!top || top.kind !== 'subckt') {
      this.error('stray-ends', line.at(0), `${line.words[0]} without a matching .subckt`, 'remove it, or add the .subckt line it should close');
      return;
    }
    this.stack.pop();
    top.closed = true;
    top.end = this.lineEnd;
    if (line.length > 1 && line.isWord(1)) {
      top.endName = line.words[1];
      if (top.name && line.words[1].toLowerCase() !== top.name.toLowerCase()) {
        this.warning('ends-mismatch', line.at(1), `.ends ${line.words[1]} closes .subckt ${top.name}`, `write .ends ${top.name}, or check that the definitions are nested as intended`);
      }
    }
  }

  private lib(line: Line): void {
    const args: number[] = [];
    for (let i = 1; i < line.length; i++) if (line.kind(i) === Kind.Word || line.kind(i) === Kind.Quoted) args.push(i);
    if (args.length === 0) {
      this.error('missing-path', line.at(0), '.lib without a file or section name', 'write .lib "file" SECTION to use a section, or .lib SECTION … .endl to define one');
      return;
    }
    if (args.length === 1 && line.kind(args[0]) === Kind.Word) {
      // `.lib NAME` opens a section definition.
      const section: LibSectionStatement = { kind: 'libsection', name: line.words[args[0]].toLowerCase(), body: [], nets: new NameTable(), loc: this.loc(line.at(0)), closed: false };
      this.add(section);
      this.stack.push(section);
      return;
    }
    this.add({
      kind: 'lib',
      path: line.words[args[0]],
      pathOffset: line.at(args[0]),
      section: args.length > 1 ? line.words[args[1]].toLowerCase() : '',
      loc: this.loc(line.at(0)),
    });
  }

  private model(line: Line): void {
    if (line.length < 3 || !line.allWords(1, 3)) {
      this.error(line.length < 2 ? 'missing-name' : 'missing-model', line.at(0), '.model needs a name and a type', 'write .model NAME nmos|pmos|d|… (param=value …)');
      return;
    }
    this.checkParentheses(line);
    this.add({ kind: 'model', name: line.words[1], type: line.words[2].toLowerCase(), params: this.params(line, 3, true), loc: this.loc(line.at(0)) });
  }

  // ---- CDL directives ----

  private directive(token: IToken, words: string[], offs: number[], kinds: Kind[] | null): void {
    if (this.control) return;
    const line = new Line(words, offs, kinds, this.base);
    const kind = token.image.slice(2).toLowerCase();
    const at = this.base + token.startOffset;
    if (kind === 'pininfo') {
      const entries: PinInfoEntry[] = [];
      for (let i = 0; i < line.length; i++) {
        const w = line.words[i];
        const colon = w.lastIndexOf(':');
        const dir = colon > 0 ? PIN_DIRECTIONS[w.slice(colon + 1).toLowerCase()] : undefined;
        if (!dir) {
          this.warning('bad-pininfo', line.at(i), `*.PININFO entry "${w}" is not name:I, name:O or name:B`);
          continue;
        }
        entries.push({ name: w.slice(0, colon), direction: dir, offset: line.at(i) });
      }
      this.add({ kind: 'pininfo', entries, loc: this.loc(at) });
    } else if (kind === 'scale') {
      const w = (line.words[0] ?? '').toLowerCase();
      const named: Record<string, number> = { meter: 1, meters: 1, metre: 1, micron: 1e-6, microns: 1e-6, um: 1e-6, nanometer: 1e-9, nm: 1e-9 };
      let value = named[w];
      if (value === undefined && w && looksNumeric(w)) {
        const r = this.numbers.parse(w);
        if (r.ok && r.value > 0) value = r.value;
      }
      if (value === undefined) {
        this.warning('bad-scale', line.length ? line.at(0) : at, `*.SCALE "${line.words[0] ?? ''}" is not METER, MICRON or a number; ignored`);
        return;
      }
      this.add({ kind: 'scale', value, loc: this.loc(at) });
    } else {
      const names = line.words.filter((_, i) => line.isWord(i));
      this.add({ kind: 'global', names, loc: this.loc(at) });
    }
  }

  // ---- values and parameters ----

  private itemProblem(line: Line, i: number): void {
    this.valueErrors++;
    const k = line.kind(i);
    if (k === Kind.Unclosed) {
      const open = line.words[i][0];
      this.error('unclosed-expression', line.at(i), `${open === '{' ? 'brace' : 'quote'} opened here is not closed on this line`, `close it with ${open === '{' ? '}' : open}`);
    } else if (k === Kind.Stray) {
      this.error('syntax', line.at(i), 'unexpected "}"', 'remove it, or open the expression with "{"');
    } else {
      this.error('syntax', line.at(i), `unexpected ${line.describe(i)}`);
    }
  }

  private checkParentheses(line: Line): void {
    let depth = 0;
    let lastOpen = -1;
    for (let i = 0; i < line.length; i++) {
      const k = line.kind(i);
      if (k === Kind.Open) {
        depth++;
        lastOpen = i;
      } else if (k === Kind.Close) {
        if (--depth < 0) {
          this.error('unbalanced-parenthesis', line.at(i), 'unexpected ")"', 'remove it, or add the "(" it should close');
          depth = 0;
        }
      }
    }
    if (depth > 0) this.error('unbalanced-parenthesis', line.at(lastOpen), '"(" is not closed', 'add the closing ")"');
  }

  /** The value of item `i`: a number, an expression, or a bare name. */
  private value(line: Line, i: number): Value | undefined {
    const k = line.kind(i);
    if (k === Kind.Brace || k === Kind.Quoted) return this.expression(line.words[i], line.at(i), false);
    if (k === Kind.Word) return this.wordValue(line.words[i], line.at(i));
    this.itemProblem(line, i);
    return undefined;
  }

  private wordValue(word: string, offset: number): Value | undefined {
    if (looksNumeric(word)) {
      const r = this.numbers.parse(word);
      if (r.ok) return r.value;
      this.valueErrors++;
      if (r.reason === 'non-finite') this.error('non-finite-number', offset, `number "${word}" is not finite`, 'use a value within double-precision range');
      else {
        // `2*w` without braces: an expression after all.
        const e = compileExpression(word);
        if (e.ok && /[*/^+\-()]/.test(word.slice(1))) {
          this.valueErrors--;
          return { kind: 'expr', text: word, compiled: e.expr, offset, bare: false };
        }
        this.error('malformed-number', offset, `malformed number "${word.slice(0, 40)}"`, 'numbers are digits with an optional exponent and scale factor: 1.5u, 10fF, 2e-6, 1MEG');
      }
      return undefined;
    }
    const e = compileExpression(word);
    if (e.ok) return { kind: 'expr', text: word, compiled: e.expr, offset, bare: e.expr.node.t === 'ref' };
    // Not an expression either (`topography=normal`-like words with odd characters): a bare name.
    return { kind: 'expr', text: word, compiled: { node: { t: 'ref', name: word.toLowerCase(), at: 0 }, refs: [word.toLowerCase()] }, offset, bare: true };
  }

  private expression(text: string, offset: number, bare: boolean): Expr | undefined {
    const e = compileExpression(text);
    if (!e.ok) {
      this.valueErrors++;
      this.error('bad-expression', offset + e.at, `${e.message} in "${text.length > 40 ? text.slice(0, 40) + '…' : text}"`, 'expressions use numbers, parameter names, + - * / ^, parentheses and sqrt exp log min max abs');
      return undefined;
    }
    return { kind: 'expr', text, compiled: e.expr, offset, bare };
  }

  /**
   * `name=value` pairs from item `from` on. Accepts `w=1u`, `w = 1u`, `w= {x}`, `w='x'`, and skips `params:`.
   * Positional leftovers are ignored when `lenient` (options, model flags), reported otherwise.
   */
  private params(line: Line, from: number, lenient = false): Param[] {
    const out: Param[] = [];
    const bareNames = lenient || line.words[0].charCodeAt(0) === 46;
    for (let i = from; i < line.length; ) i = this.paramAt(line, i, out, bareNames, lenient);
    return out;
  }

  /** Read the parameter starting at item `i` into `out`; returns the index after it. */
  private paramAt(line: Line, i: number, out: Param[], bareNames: boolean, lenient = false): number {
    const n = line.length;
    const k = line.kind(i);
    if (k === Kind.Open || k === Kind.Close) return i + 1;
    if (k !== Kind.Word) {
      if (!lenient || k === Kind.Unclosed || k === Kind.Stray) this.itemProblem(line, i);
      return i + 1;
    }
    const w = line.words[i];
    const eq = w.indexOf('=');
    if (eq < 0) {
      if (w.length === 7 && w.toLowerCase() === 'params:') return i + 1;
      // `name = value` or `name =value`
      if (i + 1 < n && line.isWord(i + 1) && line.words[i + 1].charCodeAt(0) === 61) {
        const next = line.words[i + 1];
        if (next.length > 1) {
          out.push({ name: w.toLowerCase(), value: this.wordValue(next.slice(1), line.at(i + 1) + 1), offset: line.at(i) });
          return i + 2;
        }
        if (i + 2 < n) {
          out.push({ name: w.toLowerCase(), value: this.value(line, i + 2), offset: line.at(i) });
          return i + 3;
        }
        this.error('missing-value', line.at(i + 1), `no value after "${w}="`);
        return i + 2;
      }
      // A name without a value: a declared parameter (`.subckt … params: w`) or a flag (`.option post`, `off`).
      if (bareNames) out.push({ name: w.toLowerCase(), value: undefined, offset: line.at(i) });
      return i + 1;
    }
    if (eq === 0) {
      this.error('missing-name', line.at(i), `"=" without a parameter name before it`);
      return i + 1;
    }
    const name = w.slice(0, eq).toLowerCase();
    if (eq < w.length - 1) {
      out.push({ name, value: this.wordValue(w.slice(eq + 1), line.at(i) + eq + 1), offset: line.at(i) });
      return i + 1;
    }
    if (i + 1 < n && line.kind(i + 1) !== Kind.Open && line.kind(i + 1) !== Kind.Close) {
      out.push({ name, value: this.value(line, i + 1), offset: line.at(i) });
      return i + 2;
    }
    this.error('missing-value', line.at(i), `no value after "${w}"`);
    return i + 1;
  }

  /** `.param` assignments, whose values may be unbraced expressions spread over several fields (`a = b * 2`). */
  private paramAssignments(line: Line): Param[] {
    const out: Param[] = [];
    let i = 1;
    const n = line.length;
    const isKeyAt = (j: number) =>
      line.isWord(j) && (line.words[j].indexOf('=') > 0 || (j + 1 < n && line.isWord(j + 1) && line.words[j + 1].charCodeAt(0) === 61));
    while (i < n) {
      if (!isKeyAt(i)) {
        if (line.isWord(i)) this.error('missing-value', line.at(i), `.param "${line.words[i]}" has no "=" and value`, 'write .param name=value');
        else this.itemProblem(line, i);
        i++;
        continue;
      }
      const w = line.words[i];
      const eq = w.indexOf('=');
      const name = (eq > 0 ? w.slice(0, eq) : w).toLowerCase();
      const keyOffset = line.at(i);
      // The value's pieces: rest of this word, then items until the next `name=`.
      const pieces: string[] = [];
      let valueOffset = -1;
      let onlyItem = -1;
      if (eq > 0 && eq < w.length - 1) {
        pieces.push(w.slice(eq + 1));
        valueOffset = keyOffset + eq + 1;
      }
      i++;
      if (eq < 0) {
        const next = line.words[i];
        if (next.length > 1) {
          pieces.push(next.slice(1));
          valueOffset = line.at(i) + 1;
        }
        i++;
      }
      while (i < n && !isKeyAt(i)) {
        if (valueOffset < 0) {
          valueOffset = line.at(i);
          onlyItem = i;
        } else onlyItem = -2;
        pieces.push(line.kind(i) === Kind.Brace ? `(${line.words[i]})` : line.kind(i) === Kind.Open ? '(' : line.kind(i) === Kind.Close ? ')' : line.words[i]);
        i++;
      }
      if (pieces.length === 0) {
        this.error('missing-value', keyOffset, `.param ${name} has no value`);
        continue;
      }
      let value: Value | undefined;
      if (onlyItem >= 0 && pieces.length === 1) value = this.value(line, onlyItem);
      else if (pieces.length === 1 && line.isWord(i - 1)) value = this.wordValue(pieces[0], valueOffset);
      else value = this.expression(pieces.join(' '), valueOffset, false);
      out.push({ name, value, offset: keyOffset });
    }
    return out;
  }

  // ---- end of file ----

  finish(): void {
    if (this.suppressed) {
      this.diagnostics.push({
        severity: 'error',
        code: 'too-many-problems',
        message: `${this.suppressed} more problems in this file are not listed`,
        hint: 'fix the ones above first; is this file a netlist?',
        file: this.path,
        line: this.starts.length,
        column: 1,
      });
    }
    while (this.stack.length) {
      const open = this.stack.pop()!;
      if (open.kind === 'subckt') {
        this.diagnostics.push({
          severity: 'error',
          code: 'unclosed-subckt',
          message: `.subckt ${open.name} is never closed`,
          hint: `add ".ends ${open.name}" after its last element`,
          ...open.loc,
        });
        open.end = this.text.length;
      } else {
        this.diagnostics.push({ severity: 'error', code: 'unclosed-lib', message: `.lib section ${open.name} is never closed`, hint: 'add ".endl" after its last statement', ...open.loc });
      }
    }
    if (this.control) {
      this.diagnostics.push({ severity: 'warning', code: 'unclosed-control', message: '.control block is never closed; the rest of the file was skipped', hint: 'add ".endc"', ...this.control });
    }
  }
}

/** One logical line's items. Offsets are relative to `base`. */
class Line {
  constructor(
    readonly words: string[],
    private readonly offs: number[],
    private readonly kinds: Kind[] | null,
    private readonly base: number,
  ) {}

  get length(): number {
    return this.words.length;
  }

  kind(i: number): Kind {
    return this.kinds ? this.kinds[i] : Kind.Word;
  }

  isWord(i: number): boolean {
    return i < this.words.length && (this.kinds === null || this.kinds[i] === Kind.Word);
  }

  allWords(from: number, to: number): boolean {
    if (to > this.words.length) return false;
    if (this.kinds === null) return true;
    for (let i = from; i < to; i++) if (this.kinds[i] !== Kind.Word) return false;
    return true;
  }

  at(i: number): number {
    return this.base + this.offs[Math.min(i, this.offs.length - 1)];
  }

  end(): number {
    const last = this.words.length - 1;
    return this.base + this.offs[last] + this.words[last].length;
  }

  describe(i: number): string {
    switch (this.kind(i)) {
      case Kind.Brace:
        return `expression {${this.words[i].slice(0, 20)}}`;
      case Kind.Quoted:
        return `quoted text '${this.words[i].slice(0, 20)}'`;
      case Kind.DollarModel:
        return `$[${this.words[i]}]`;
      case Kind.Open:
        return '"("';
      case Kind.Close:
        return '")"';
      default:
        return `"${this.words[i].slice(0, 20)}"`;
    }
  }
}

function firstLine(text: string): string {
  let end = 0;
  while (end < text.length) {
    const c = text.charCodeAt(end);
    if (c === 10 || c === 13) break;
    end++;
  }
  return text.slice(0, end);
}

/** Whether the first line of a deck reads as content rather than as its title (see the header comment). */
function firstLineIsContent(line: string, numbers: NumberCache): boolean {
  const trimmed = line.trim();
  if (trimmed === '' || trimmed[0] === '*') return true;
  if (trimmed[0] === '.') {
    const word = trimmed.split(/[\s(]/, 1)[0].toLowerCase();
    return KNOWN_COMMANDS.has(word);
  }
  if (!/^[mxcrvid]/i.test(trimmed)) return false;
  const probe = parseText('(first line)', line, numbers, 0);
  const s = probe.statements;
  return probe.diagnostics.length === 0 && s.length === 1 && s[0].kind !== 'subckt';
}

function parseText(path: string, text: string, numbers: NumberCache, from: number, chunkSize?: number): FileBuilder {
  const starts = lineStarts(text);
  const builder = new FileBuilder(path, text, starts, numbers);
  const parser = netlistParser();
  const previous = parser.sink;
  parser.sink = builder;
  try {
    const body = from > 0 ? text.slice(from) : text;
    for (const { start, end } of statementChunks(body, chunkSize)) {
      const piece = start === 0 && end === body.length ? body : body.slice(start, end);
      builder.base = from + start;
      const lexed = tokenize(piece);
      for (const e of lexed.errors) builder.report('error', 'syntax', builder.base + e.offset, e.message);
      const tokens = lexed.tokens;
      const last = tokens[tokens.length - 1];
      if (!last || last.tokenType !== Newline) {
        tokens.push(createTokenInstance(Newline, '', piece.length, piece.length, NaN, NaN, NaN, NaN));
      }
      parser.input = tokens;
      parser.netlist();
      for (const e of parser.errors) {
        const offset = Number.isFinite(e.token?.startOffset) ? e.token.startOffset : piece.length;
        builder.report('error', 'syntax', builder.base + offset, `cannot read this line: ${e.message}`);
      }
    }
  } finally {
    parser.sink = previous;
  }
  builder.finish();
  return builder;
}

/** Parse one file into its statements and diagnostics. Never throws for any input text. */
export function parseNetlist(path: string, text: string, options: ParseOptions = {}, numbers = new NumberCache()): FileAst {
  let title: string | undefined;
  let from = 0;
  if (options.simulationDeck) {
    const first = firstLine(text);
    if (!firstLineIsContent(first, numbers)) {
      title = first.trim();
      from = first.length;
    }
  }
  const builder = parseText(path, text, numbers, from, options.chunkSize);
  return {
    path,
    ...(title !== undefined ? { title } : {}),
    statements: builder.statements,
    nets: builder.topNets,
    lineStarts: builder.starts,
    lineCount: builder.starts.length,
    diagnostics: builder.diagnostics,
  };
}
