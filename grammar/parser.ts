// The netlist parser: a Chevrotain grammar over logical lines with embedded actions
// that decode each line into a typed statement (grammar/ast.ts). No CST is built.
//
//   netlist := ( Directive? item* ( Newline | FieldsEnd ) )*
//   item    := Fields | Brace | Quoted | DollarModel | LParen | RParen | Unclosed | Stray
//
// (FieldsEnd is a run of fields that ends its line; most element lines are that one
// token. The line is inlined into `netlist` so that a line costs no rule call.)
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
import { MosRow, MosTable } from './ast';
import type { FileAst, InstanceStatement, Param, PinInfoEntry, Statement, SubcktStatement, LibSectionStatement, Value, Expr } from './ast';
import type { Diagnostic, DiagnosticSeverity, PinDirection, SourceLoc } from './design';
import { compileExpression } from './expression';
import {
  Brace,
  DollarModel,
  Directive,
  Fields,
  FieldsEnd,
  LParen,
  Newline,
  netlistTokens,
  Quoted,
  RParen,
  statementChunks,
  Stray,
  tokenize,
  Unclosed,
} from './lexer';
import { looksNumeric, NumberCache } from './numbers';
import { Kind, Line } from './line';
import { NameTable } from './names';
import { hashRange, RangeIndex, rangeEquals } from './text-hash';
import { LocationCursor, lineStarts } from './source';

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

// Actions call the sink directly instead of through ACTION closures (one fewer closure per
// token): the sink is null while Chevrotain records the grammar, so nothing runs then.
class NetlistParser extends EmbeddedActionsParser {
  sink: FileBuilder | null = null;
  // Cached alternatives: building them per call would allocate on every line.
  private itemAlts?: { ALT: () => void }[];
  private endAlts?: { ALT: () => void }[];

  constructor() {
    // No error recovery: the grammar accepts every token sequence that ends with a line end
    // (parseText appends one), so there is never anything to recover from, and with recovery
    // on Chevrotain prepares a recovery attempt after every line's item loop.
    super(netlistTokens, { recoveryEnabled: false });
    this.performSelfAnalysis();
  }

  // The bodies of OPTION and MANY2 are made once, not per line.
  private readonly directiveBody = () => this.CONSUME(Directive);
  private readonly itemBody = () =>
    this.OR(
      (this.itemAlts ??= [
        { ALT: () => { const t = this.CONSUME(Fields); this.sink?.fields(t); } },
        { ALT: () => { const t = this.CONSUME(Brace); this.sink?.item(Kind.Brace, t); } },
        { ALT: () => { const t = this.CONSUME(Quoted); this.sink?.item(Kind.Quoted, t); } },
        { ALT: () => { const t = this.CONSUME(DollarModel); this.sink?.item(Kind.DollarModel, t); } },
        { ALT: () => { const t = this.CONSUME(LParen); this.sink?.item(Kind.Open, t); } },
        { ALT: () => { const t = this.CONSUME(RParen); this.sink?.item(Kind.Close, t); } },
        { ALT: () => { const t = this.CONSUME(Unclosed); this.sink?.item(Kind.Unclosed, t); } },
        { ALT: () => { const t = this.CONSUME(Stray); this.sink?.item(Kind.Stray, t); } },
      ]),
    );

  netlist = this.RULE('netlist', () => {
    this.MANY(() => {
      const directive = this.OPTION(this.directiveBody);
      this.MANY2(this.itemBody);
      this.OR2(
        (this.endAlts ??= [
          { ALT: () => { this.CONSUME(Newline); } },
          { ALT: () => { const t = this.CONSUME(FieldsEnd); this.sink?.fields(t); } },
        ]),
      );
      this.sink?.endLine(directive);
    });
  });
}

let sharedParser: NetlistParser | null = null;
function netlistParser(): NetlistParser {
  return (sharedParser ??= new NetlistParser());
}


/** Builds one file's statements from decoded lines. */
/** Builds one file's statements from decoded lines. */
class FileBuilder {
  readonly statements: Statement[] = [];
  readonly topNets = new NameTable();
  readonly diagnostics: Diagnostic[] = [];
  private readonly stack: (SubcktStatement | LibSectionStatement)[] = [];
  private readonly cursor: LocationCursor;
  private readonly models = new Interner();
  /** The file's M lines. */
  private readonly mosTable: MosTable;
  /** The piece being parsed and its offset within the file. */
  private piece = '';
  base = 0;
  /** The line being collected, reset per line (decoding is synchronous and keeps no reference to it). */
  private readonly line = new Line();
  private ended = false;
  private suppressed = 0;
  /** Values that could not be read so far; an element whose count changed is left out. */
  private valueErrors = 0;
  private control: SourceLoc | null = null;
  /** End offset of the line being decoded (for `.ends`, the end of a definition's text). */
  private lineEnd = 0;

  constructor(
    readonly path: string,
    readonly text: string,
    readonly starts: number[],
    private readonly numbers: NumberCache,
  ) {
    this.cursor = new LocationCursor(path, starts);
    this.mosTable = new MosTable(path, starts);
  }

  /** Start a new piece of the file: positions of its tokens are relative to `base`. */
  beginPiece(piece: string, base: number): void {
    this.piece = piece;
    this.base = base;
    this.line.clear(piece, base);
  }

  // ---- collecting items ----

  fields(t: IToken): void {
    this.line.addFields(t.payload as number);
  }

  item(kind: Kind, t: IToken): void {
    let start = t.startOffset;
    let end = t.startOffset + t.image.length;
    if (kind === Kind.Brace || kind === Kind.Quoted) {
      start++;
      end--;
    } else if (kind === Kind.DollarModel) {
      start += 2;
      end--;
    }
    this.line.addItem(kind, start, end);
  }

  endLine(directive: IToken | undefined): void {
    const line = this.line;
    try {
      if (this.ended || (line.length === 0 && !directive)) return;
      if (directive) {
        if (!this.control) this.directive(directive, line);
        return;
      }
      if (this.control) {
        if (line.is(0, '.endc')) this.control = null;
        return;
      }
      this.lineEnd = line.lineEnd();
      this.statement(line);
    } finally {
      line.clear(this.piece, this.base);
    }
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

  /** The node table of the body being read. */
  private nets(): NameTable {
    const top = this.stack[this.stack.length - 1];
    return top ? top.nets : this.topNets;
  }

  /** Net id of field `i` in the current body, read in place. */
  private node(line: Line, i: number, nets: NameTable): number {
    if (line.escaped(i)) return nets.id(line.word(i), line.at(i));
    return nets.idAt(this.piece, line.start(i), line.end(i), line.at(i));
  }

  /** A model or cell name: one string per distinct spelling. */
  private name(line: Line, i: number): string {
    if (line.escaped(i)) return line.word(i);
    return this.models.intern(this.piece, line.start(i), line.end(i));
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
    const c0 = line.charCode(0);
    if (c0 === 46 /* . */) return this.command(line);
    switch (c0 | 0x20) {
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
    const first = line.word(0);
    if (c0 === 43 /* + */) {
      this.error('stray-continuation', line.at(0), 'a "+" continuation line with no statement before it to continue', 'join it to the statement it belongs to, or remove the "+"');
      return;
    }
    const what = UNREAD_ELEMENTS[String.fromCharCode(c0 | 0x20)];
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
      if (!line.isWord(i)) continue;
      const eq = line.eqIndex(i);
      if (eq >= 0) return eq === 0 && i > from ? i - 1 : i;
      if (line.is(i, 'params:')) return i;
    }
    return i;
  }

  private mosfet(line: Line): void {
    const end = this.positionalEnd(line, 1);
    const form = 'an M element is: M<name> drain gate source bulk model [w=… l=…]';
    const positional = end - 1;
    if (positional >= 5 && !line.allWords(1, 6)) {
      for (let i = 1; i < 6; i++) if (!line.isWord(i)) return this.itemProblem(line, i);
    }
    if (positional === 4) {
      this.error('missing-model', line.at(0), `${line.word(0)}: four fields where drain, gate, source, bulk and a model name are needed; is the model name (or the bulk node) missing?`, form);
      return;
    }
    if (positional < 4) {
      this.error('missing-nodes', line.at(0), `${line.word(0)}: an M element needs drain, gate, source and bulk nodes and a model name (found ${positional} field${positional === 1 ? '' : 's'})`, form);
      return;
    }
    const failures = this.valueErrors;
    let w: Value | undefined;
    let l: Value | undefined;
    let m: Value | undefined;
    let nf: Value | undefined;
    let extra: Param[] | undefined;
    // Positional flags after the model (`off`) are simulator hints: skipped by paramAt.
    for (let i = end; i < line.length; ) {
      const eq = line.isWord(i) ? line.eqIndex(i) : -1;
      if ((eq === 1 || eq === 2) && eq < line.size(i) - 1) {
        // Fast path for the sizes every line carries: w=…, l=…, m=…, nf=…
        const c = line.charCode(i) | 0x20;
        if (eq === 1 && (c === 119 || c === 108 || c === 109)) {
          const v = this.valueIn(line, i, 2);
          if (c === 119) w = v;
          else if (c === 108) l = v;
          else m = v;
          i++;
          continue;
        }
        if (eq === 2 && c === 110 && (line.charCode(i, 1) | 0x20) === 102) {
          nf = this.valueIn(line, i, 3);
          i++;
          continue;
        }
      }
      const params: Param[] = [];
      i = this.paramAt(line, i, params, false);
      for (const p of params) {
        if (p.name === 'w') w = p.value;
        else if (p.name === 'l') l = p.value;
        else if (p.name === 'm') m = p.value;
        else if (p.name === 'nf') nf = p.value;
        else (extra ??= []).push(p);
      }
    }
    // A device with an unreadable value is left out (the value's diagnostic says why).
    if (this.valueErrors !== failures) return;
    const nets = this.nets();
    const row = this.mosTable.add(
      line.word(0),
      this.node(line, 1, nets),
      this.node(line, 2, nets),
      this.node(line, 3, nets),
      this.node(line, 4, nets),
      this.name(line, 5),
      line.at(0),
      line.at(5),
      w,
      l,
      m,
      nf,
      extra,
    );
    this.add(new MosRow(this.mosTable, row));
  }

  private instance(line: Line): void {
    const end = this.positionalEnd(line, 1);
    const name = line.word(0);
    // CDL writes `nodes / cell` (or `nodes /cell`); names such as x1/x2/n5 never start with "/".
    let slash = -1;
    for (let i = 1; i < end; i++) {
      if (line.isWord(i) && line.charCode(i) === 47) {
        slash = i;
        break;
      }
    }
    let nodeEnd: number;
    let cellIndex = -1;
    let cellSkip = 0;
    if (slash >= 0) {
      nodeEnd = slash;
      if (line.size(slash) > 1) {
        cellIndex = slash;
        cellSkip = 1;
      } else if (slash + 1 < end && line.isWord(slash + 1)) cellIndex = slash + 1;
      if (cellIndex >= 0 && cellIndex + 1 < end) {
        this.error('syntax', line.at(cellIndex + 1), `${name}: unexpected ${line.describe(cellIndex + 1)} after the subcircuit name`);
        return;
      }
    } else {
      nodeEnd = end - 1;
      if (end - 1 >= 1 && line.isWord(end - 1)) cellIndex = end - 1;
    }
    if (cellIndex < 0) {
      this.error('missing-subckt-name', slash >= 0 ? line.at(slash) : line.at(0), `${name}: no subcircuit name`, 'an X element is: X<name> node… subckt [name=value…]');
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
    for (let i = 1; i < nodeEnd; i++) nodes[i - 1] = this.node(line, i, nets);
    const cell = cellSkip ? line.word(cellIndex).slice(cellSkip) : this.name(line, cellIndex);
    const stmt: InstanceStatement = {
      kind: 'instance',
      name,
      nodes,
      cell,
      cellOffset: line.at(cellIndex) + cellSkip,
      params,
      loc: this.loc(line.at(0)),
    };
    this.add(stmt);
  }

  private twoTerminal(line: Line, kind: 'res' | 'cap'): void {
    const name = line.word(0);
    const what = kind === 'res' ? 'resistor' : 'capacitor';
    if (line.length < 3 || !line.allWords(1, 3) || line.eqIndex(1) >= 0 || line.eqIndex(2) >= 0) {
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
      const numeric = k === Kind.Brace || k === Kind.Quoted || (k === Kind.Word && this.numericAt(line, i, 0));
      if (k === Kind.DollarModel || (k === Kind.Word && !numeric)) {
        if (model === undefined) model = k === Kind.DollarModel ? line.word(i) : this.name(line, i);
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
    const a = this.node(line, 1, nets);
    const b = this.node(line, 2, nets);
    this.add({ kind, name, a, b, value, valueOffset, model, loc: this.loc(line.at(0)) });
  }

  private source(line: Line, kind: 'vsrc' | 'isrc'): void {
    const name = line.word(0);
    const form = `a source is: ${kind === 'vsrc' ? 'V' : 'I'}<name> node+ node- [DC] value [AC mag [phase]] [pulse(…)|sin(…)|pwl(…)|exp(…)]`;
    if (line.length < 3 || !line.allWords(1, 3)) {
      this.error('missing-nodes', line.at(0), `${name}: a source needs two nodes`, form);
      return;
    }
    const failures = this.valueErrors;
    let dc: Value | undefined;
    let waveform: string | undefined;
    let i = 3;
    while (i < line.length) {
      const k = line.kind(i);
      if (k === Kind.Word) {
        if (line.is(i, 'dc') && i + 1 < line.length) {
          dc = this.value(line, i + 1);
          i += 2;
          continue;
        }
        if (line.eqIndex(i) === 2 && (line.charCode(i) | 0x20) === 100 && (line.charCode(i, 1) | 0x20) === 99) {
          // dc=1.8 or dc= 1.8
          if (line.size(i) > 3) dc = this.valueIn(line, i, 3);
          else if (i + 1 < line.length) dc = this.value(line, ++i);
          i++;
          continue;
        }
        if (line.is(i, 'ac')) {
          // AC magnitude and phase: skip the numbers that follow.
          i++;
          while (i < line.length && line.kind(i) !== Kind.Open && (line.kind(i) !== Kind.Word || this.numericAt(line, i, 0))) i++;
          continue;
        }
        const lw = line.word(i).toLowerCase();
        if (SOURCE_FUNCTIONS.has(lw)) {
          // A transient function, with or without parentheses: the rest of the line is its arguments.
          waveform = lw;
          break;
        }
        if (this.numericAt(line, i, 0)) {
          if (dc === undefined) dc = this.value(line, i);
          i++;
          continue;
        }
        this.error('syntax', line.at(i), `${name}: unexpected "${line.word(i).slice(0, 24)}" in a source`, form);
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
    const pos = this.node(line, 1, nets);
    const neg = this.node(line, 2, nets);
    this.add({ kind, name, pos, neg, dc, ...(waveform ? { waveform } : {}), loc: this.loc(line.at(0)) });
  }

  private diode(line: Line): void {
    const name = line.word(0);
    if (line.length < 4 || !line.allWords(1, 4) || line.eqIndex(3) >= 0) {
      this.error(line.length >= 3 ? 'missing-model' : 'missing-nodes', line.at(0), `${name}: a diode needs anode, cathode and a model name`, 'a diode is: D<name> anode cathode model [area]');
      return;
    }
    const nets = this.nets();
    const anode = this.node(line, 1, nets);
    const cathode = this.node(line, 2, nets);
    this.add({ kind: 'diode', name, anode, cathode, model: this.name(line, 3), loc: this.loc(line.at(0)) });
  }

  // ---- dot commands ----

  private command(line: Line): void {
    const cmd = line.word(0).toLowerCase();
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
        for (let i = 1; i < line.length; i++) if (line.isWord(i)) names.push(line.word(i));
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
          this.error('missing-path', line.at(0), `${line.word(0)}: no file name`, 'write .include "relative/path"');
          return;
        }
        this.add({ kind: 'include', path: line.word(1), pathOffset: line.at(1), loc: this.loc(line.at(0)) });
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
    this.warning('unknown-command', line.at(0), `unknown dot command "${line.word(0).slice(0, 24)}" ignored`);
  }

  private subckt(line: Line): void {
    if (line.length < 2 || !line.isWord(1) || line.eqIndex(1) >= 0) {
      this.error('missing-name', line.at(0), `${line.word(0)} without a subcircuit name`, 'write .subckt NAME port… [params: name=value…]');
      // Still open a block so that the matching .ends does not read as stray.
      this.stack.push({ kind: 'subckt', name: '', nameOffset: line.at(0), ports: [], portOffsets: [], portIds: [], params: [], body: [], nets: new NameTable(), loc: this.loc(line.at(0)), start: line.at(0), end: line.at(0), closed: false });
      return;
    }
    const end = this.positionalEnd(line, 2);
    const nets = new NameTable();
    const ports: string[] = [];
    const portOffsets: number[] = [];
    const portIds: number[] = [];
    for (let i = 2; i < end; i++) {
      if (!line.isWord(i)) {
        this.itemProblem(line, i);
        continue;
      }
      ports.push(line.word(i));
      portOffsets.push(line.at(i));
      portIds.push(this.node(line, i, nets));
    }
    const stmt: SubcktStatement = {
      kind: 'subckt',
      name: line.word(1),
      nameOffset: line.at(1),
      ports,
      portOffsets,
      portIds,
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
      this.error('stray-ends', line.at(0), `${line.word(0)} without a matching .subckt`, 'remove it, or add the .subckt line it should close');
      return;
    }
    this.stack.pop();
    top.closed = true;
    top.end = this.lineEnd;
    if (line.length > 1 && line.isWord(1)) {
      const endName = line.word(1);
      top.endName = endName;
      if (top.name && endName.toLowerCase() !== top.name.toLowerCase()) {
        this.warning('ends-mismatch', line.at(1), `.ends ${endName} closes .subckt ${top.name}`, `write .ends ${top.name}, or check that the definitions are nested as intended`);
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
      const section: LibSectionStatement = { kind: 'libsection', name: line.word(args[0]).toLowerCase(), body: [], nets: new NameTable(), loc: this.loc(line.at(0)), closed: false };
      this.add(section);
      this.stack.push(section);
      return;
    }
    this.add({
      kind: 'lib',
      path: line.word(args[0]),
      pathOffset: line.at(args[0]),
      section: args.length > 1 ? line.word(args[1]).toLowerCase() : '',
      loc: this.loc(line.at(0)),
    });
  }

  private model(line: Line): void {
    if (line.length < 3 || !line.allWords(1, 3)) {
      this.error(line.length < 2 ? 'missing-name' : 'missing-model', line.at(0), '.model needs a name and a type', 'write .model NAME nmos|pmos|d|… (param=value …)');
      return;
    }
    this.checkParentheses(line);
    this.add({ kind: 'model', name: line.word(1), type: line.word(2).toLowerCase(), params: this.params(line, 3, true), loc: this.loc(line.at(0)) });
  }

  // ---- CDL directives ----

  private directive(token: IToken, line: Line): void {
    const kind = token.image.slice(2).toLowerCase();
    const at = this.base + token.startOffset;
    if (kind === 'pininfo') {
      const entries: PinInfoEntry[] = [];
      for (let i = 0; i < line.length; i++) {
        const w = line.word(i);
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
      const w = line.length ? line.word(0).toLowerCase() : '';
      const named: Record<string, number> = { meter: 1, meters: 1, metre: 1, micron: 1e-6, microns: 1e-6, um: 1e-6, nanometer: 1e-9, nm: 1e-9 };
      let value = named[w];
      if (value === undefined && w && looksNumeric(w)) {
        const r = this.numbers.parse(w);
        if (r.ok && r.value > 0) value = r.value;
      }
      if (value === undefined) {
        this.warning('bad-scale', line.length ? line.at(0) : at, `*.SCALE "${w}" is not METER, MICRON or a number; ignored`);
        return;
      }
      this.add({ kind: 'scale', value, loc: this.loc(at) });
    } else {
      const names: string[] = [];
      for (let i = 0; i < line.length; i++) if (line.isWord(i)) names.push(line.word(i));
      this.add({ kind: 'global', names, loc: this.loc(at) });
    }
  }

  // ---- values and parameters ----

  private itemProblem(line: Line, i: number): void {
    this.valueErrors++;
    const k = line.kind(i);
    if (k === Kind.Unclosed) {
      const open = this.piece[line.start(i)];
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

  /** Whether field `i` from character `from` on starts like a number. */
  private numericAt(line: Line, i: number, from: number): boolean {
    const s = line.start(i) + from;
    const e = line.end(i);
    let p = s;
    let c = this.piece.charCodeAt(p);
    if (c === 43 || c === 45) c = this.piece.charCodeAt(++p);
    if (c === 46) c = this.piece.charCodeAt(++p);
    return p < e && c >= 48 && c <= 57;
  }

  /** The value of item `i`: a number, an expression, or a bare name. */
  private value(line: Line, i: number): Value | undefined {
    const k = line.kind(i);
    if (k === Kind.Brace || k === Kind.Quoted) return this.expression(line.word(i), line.at(i), false);
    if (k === Kind.Word) return this.valueIn(line, i, 0);
    this.itemProblem(line, i);
    return undefined;
  }

  /** The value written in field `i` from character `from` on (after `name=`), read in place when it is a number. */
  private valueIn(line: Line, i: number, from: number): Value | undefined {
    if (!line.escaped(i) && this.numericAt(line, i, from)) {
      const r = this.numbers.parseAt(this.piece, line.start(i) + from, line.end(i));
      if (r.ok) return r.value;
    }
    return this.wordValue(from ? line.word(i).slice(from) : line.word(i), line.at(i) + from);
  }

  private wordValue(word: string, offset: number): Value | undefined {
    if (looksNumeric(word)) {
      const r = this.numbers.parse(word);
      if (r.ok) return r.value;
      // `2*w` without braces: an expression after all.
      const e = compileExpression(word);
      if (r.reason === 'malformed' && e.ok && /[*/^+\-()]/.test(word.slice(1))) return { kind: 'expr', text: word, compiled: e.expr, offset, bare: false };
      this.valueErrors++;
      if (r.reason === 'non-finite') this.error('non-finite-number', offset, `number "${word.slice(0, 40)}" is not finite`, 'use a value within double-precision range');
      else this.error('malformed-number', offset, `malformed number "${word.slice(0, 40)}"`, 'numbers are digits with an optional exponent and scale factor: 1.5u, 10fF, 2e-6, 1MEG');
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
    const bareNames = lenient || line.charCode(0) === 46;
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
    const eq = line.eqIndex(i);
    if (eq < 0) {
      if (line.is(i, 'params:')) return i + 1;
      const key = line.word(i).toLowerCase();
      // `name = value` or `name =value`
      if (i + 1 < n && line.isWord(i + 1) && line.charCode(i + 1) === 61) {
        if (line.size(i + 1) > 1) {
          out.push({ name: key, value: this.valueIn(line, i + 1, 1), offset: line.at(i) });
          return i + 2;
        }
        if (i + 2 < n) {
          out.push({ name: key, value: this.value(line, i + 2), offset: line.at(i) });
          return i + 3;
        }
        this.error('missing-value', line.at(i + 1), `no value after "${line.word(i)}="`);
        return i + 2;
      }
      // A name without a value: a declared parameter (`.subckt … params: w`) or a flag (`.option post`, `off`).
      if (bareNames) out.push({ name: key, value: undefined, offset: line.at(i) });
      return i + 1;
    }
    if (eq === 0) {
      this.error('missing-name', line.at(i), '"=" without a parameter name before it');
      return i + 1;
    }
    const name = line.word(i).slice(0, eq).toLowerCase();
    if (eq < line.size(i) - 1) {
      out.push({ name, value: this.valueIn(line, i, eq + 1), offset: line.at(i) });
      return i + 1;
    }
    if (i + 1 < n && line.kind(i + 1) !== Kind.Open && line.kind(i + 1) !== Kind.Close) {
      out.push({ name, value: this.value(line, i + 1), offset: line.at(i) });
      return i + 2;
    }
    this.error('missing-value', line.at(i), `no value after "${line.word(i)}"`);
    return i + 1;
  }

  /** `.param` assignments, whose values may be unbraced expressions spread over several fields (`a = b * 2`). */
  private paramAssignments(line: Line): Param[] {
    const out: Param[] = [];
    let i = 1;
    const n = line.length;
    const isKeyAt = (j: number) => line.isWord(j) && (line.eqIndex(j) > 0 || (j + 1 < n && line.isWord(j + 1) && line.charCode(j + 1) === 61));
    while (i < n) {
      if (!isKeyAt(i)) {
        if (line.isWord(i)) this.error('missing-value', line.at(i), `.param "${line.word(i)}" has no "=" and value`, 'write .param name=value');
        else this.itemProblem(line, i);
        i++;
        continue;
      }
      const w = line.word(i);
      const eq = line.eqIndex(i);
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
        const next = line.word(i);
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
        const k = line.kind(i);
        pieces.push(k === Kind.Brace ? `(${line.word(i)})` : k === Kind.Open ? '(' : k === Kind.Close ? ')' : line.word(i));
        i++;
      }
      if (pieces.length === 0) {
        this.error('missing-value', keyOffset, `.param ${name} has no value`);
        continue;
      }
      let value: Value | undefined;
      if (onlyItem >= 0 && pieces.length === 1) value = this.value(line, onlyItem);
      else if (pieces.length === 1) value = this.wordValue(pieces[0], valueOffset);
      else value = this.expression(pieces.join(' '), valueOffset, false);
      out.push({ name, value, offset: keyOffset });
    }
    return out;
  }

  // ---- end of file ----

  finish(): void {
    while (this.stack.length) {
      const open = this.stack.pop()!;
      const at = open.kind === 'subckt' ? open.start : this.cursorOffset(open.loc);
      if (open.kind === 'subckt') {
        this.report('error', 'unclosed-subckt', at, `.subckt ${open.name} is never closed`, `add ".ends ${open.name}" after its last element`);
        open.end = this.text.length;
      } else {
        this.report('error', 'unclosed-lib', at, `.lib section ${open.name} is never closed`, 'add ".endl" after its last statement');
      }
    }
    if (this.control) this.report('warning', 'unclosed-control', this.cursorOffset(this.control), '.control block is never closed; the rest of the file was skipped', 'add ".endc"');
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
  }

  private cursorOffset(loc: SourceLoc): number {
    return this.starts[loc.line - 1] + loc.column - 1;
  }
}

/** One string per distinct spelling of a model or cell name: a million lines name `nch` a million times. */
class Interner {
  private readonly names: string[] = [];
  private readonly index = new RangeIndex((e) => this.names[e], false, 256);
  /**
   * The last two names returned for each slot of (length, first, middle and last character):
   * lines repeat a handful of models (`nch`, `pch`, `hv_nfet_01`, `hv_pfet_01`, …), so most
   * lookups end here after comparing a few characters, before any hashing.
   */
  private readonly recent: string[] = new Array<string>(128).fill('');

  intern(text: string, start: number, end: number): string {
    const n = end - start;
    const slot = n === 0 ? 0 : 2 * (Math.imul(n ^ (text.charCodeAt(start) << 8) ^ (text.charCodeAt(start + (n >> 1)) << 16) ^ (text.charCodeAt(end - 1) << 24), 0x9e3779b1) >>> 26);
    const recent = this.recent;
    const first = recent[slot];
    if (first.length === n && rangeEquals(text, start, end, first, false)) return first;
    const second = recent[slot + 1];
    if (second.length === n && rangeEquals(text, start, end, second, false)) {
      recent[slot + 1] = first;
      recent[slot] = second;
      return second;
    }
    const name = this.lookup(text, start, end);
    recent[slot + 1] = first;
    recent[slot] = name;
    return name;
  }

  private lookup(text: string, start: number, end: number): string {
    const h = hashRange(text, start, end, false);
    const e = this.index.find(text, start, end, h);
    if (e >= 0) return this.names[e];
    const name = text.substring(start, end);
    // Bounded: frequent names arrive early; a huge table of one-off names only costs memory.
    if (this.names.length < 50_000) {
      this.names.push(name);
      this.index.add(h);
    }
    return name;
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
      const lexed = tokenize(piece);
      builder.beginPiece(piece, from + start);
      for (const e of lexed.errors) builder.report('error', 'syntax', builder.base + e.offset, e.message);
      const tokens = lexed.tokens;
      const last = tokens[tokens.length - 1];
      if (!last || (last.tokenType !== Newline && last.tokenType !== FieldsEnd)) {
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
    // The parser is shared by every read in the process; its last tokens would keep this text alive.
    parser.input = [];
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
