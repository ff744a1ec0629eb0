// Elaboration: parsed files → the hierarchical design model (grammar/design.ts).
//
//  1. Read the entry files' statements, splicing `.include`/`.lib` files in place
//     (only files of the uploaded set; cycles and paths leaving the set refused).
//  2. Collect definitions by scope (nested `.subckt`s are local to their parent),
//     global parameters, models, `.global` names and the length scale.
//  3. Resolve every `X` line statically: a subcircuit in scope, else a device by
//     its `.model` card or the deck's device map, else an unknown subcircuit.
//     Recursive instantiation is found on this static graph and cut.
//  4. Elaborate each definition once per distinct binding of the parameters its
//     body actually reads; instances point at the variant they bind. Nothing is
//     flattened, so a hierarchy of billions of devices costs its distinct cells.
//
// Zero-ohm ties (`r1 a b short`, or any resistor whose value is 0) are elaborated
// as real net merges: both names index the same net id, and the resistor stays in
// `others` with both ends on that net and value 0, so findings can still point at it.

import type { DeviceMapEntry } from '../shared/deck';
import { globMatcher, globToRegExp } from '../shared/deck';
import type {
  ElementStatement,
  FileAst,
  InstanceStatement,
  Param,
  PinInfoEntry,
  Statement,
  SubcktStatement,
  Value,
} from './ast';
import type { MosRow } from './ast';
import type { Cell, Design, Diagnostic, DiagnosticSeverity, ModelCard, MosPolarity, PinDirection, RailKind, SourceLoc } from './design';
import { evaluate } from './expression';
import { NumberCache } from './numbers';
import { parseNetlist } from './parser';
import { normalizePath, resolveInclude } from './paths';
import { NameTable } from './names';
import { LocationCursor, lineOf } from './source';
import { MosfetTable } from './mosfet-table';

export interface ReadOptions {
  /** Files to start from; default: every file no other file includes. */
  entry?: string[];
  /** Cell to check from (case-insensitive); default: the cells nobody instantiates. */
  top?: string;
  /** The caller's length scale (e.g. `--scale`), used when the netlist sets none. */
  scale?: number;
  /** The deck's default length scale. */
  defaultScale: number;
  deviceMap: DeviceMapEntry[];
  /**
   * The deck's power and ground name globs. Ground names serve as references of voltage
   * sources (`Vdd vdd vss 1.8` makes vdd a rail); naming rails by pattern in every cell
   * is the rule engine's part (rules/engine.ts `localRails`).
   */
  supplies: { power: string[]; ground: string[] };
}

/** Name of the synthetic cell that holds a deck's top-level elements. Parentheses cannot occur in netlist names. */
export const TOP_LEVEL_CELL = '(top level)';

/**
 * The zero-ohm tie device of open PDKs: CDL writes `r1 a b short`, layout extraction
 * `X0 a b sub short …` (a third terminal for the substrate). Either joins its first two nodes.
 */
const TIE_DEVICE = 'short';

/** SPICE3 defaults for a MOSFET without W or L (`.option defw/defl`): 100 µm. */
const SPICE_DEFAULT_SIZE = 100e-6;

const LIMITS = {
  variantsPerCell: 10_000,
  variants: 100_000,
  /** Elaborated elements beyond what the text holds (parameter variants); guards against exponential variant growth. */
  extraElements: 5_000_000,
};

type DeviceKind = DeviceMapEntry['kind'];

interface Scope {
  defs: Map<string, CellDef>;
  parent: Scope | null;
  /** Files already spliced into this scope (an include guard: repeating one only duplicates its definitions). */
  included: Set<string>;
}

interface CellDef {
  name: string;
  key: string;
  stmt: SubcktStatement | null;
  loc: SourceLoc;
  /** Scope for names used inside the body: its own nested definitions, then where it is defined. */
  scope: Scope;
  ports: string[];
  portOffsets: number[];
  headerParams: Param[];
  localParams: Param[];
  elements: ElementStatement[];
  /** Runs of `elements` that come from one body (the definition's own, or an included file's), with that body's node table. */
  segments: { nets: NameTable; file: string; start: number; end: number }[];
  /** The definition's own node table (ports first); the first entry file's for the top level. */
  ownNets: NameTable | null;
  pinInfo: PinInfoEntry[];
  /** Static resolution of each X line of the body, by index in `elements` (undefined for other elements). */
  targets: (Target | undefined)[];
  /** Header parameters the body reads (only they distinguish variants). */
  relevant: string[] | null;
  variants: Map<string, Cell>;
  defaultBinding: Binding | null;
}

type Binding = Map<string, number | undefined>;

type Target = CellDef | DeviceKind | 'tie' | 'unknown' | 'cut';

/** Parameter lookup: a value, undefined for an unknown name, null for a declared parameter without a value. */
type Lookup = (name: string) => number | undefined | null;

interface Pending {
  def: CellDef;
  cell: Cell;
  binding: Binding;
}

interface GlobalParam {
  value: Value | undefined;
  file: string;
  offset: number;
}

export function elaborate(files: ReadonlyMap<string, string> | Record<string, string>, options: ReadOptions): Design {
  return new Elaborator(files, options).run();
}

class Elaborator {
  private readonly texts = new Map<string, string>();
  private readonly asts = new Map<string, FileAst>();
  private readonly numbers = new NumberCache();
  private readonly diagnostics: Diagnostic[] = [];
  private readonly seenDiagnostics = new Set<string>();

  private readonly global: Scope = { defs: new Map(), parent: null, included: new Set() };
  private readonly top: CellDef;
  private readonly allDefs: CellDef[] = [];
  private readonly globalParams = new Map<string, GlobalParam>();
  private readonly globalValues = new Map<string, number | null>();
  private readonly evaluating = new Set<string>();
  private readonly models = new Map<string, ModelCard>();
  private readonly globals = new Set<string>();
  private readonly scales: { value: Value | undefined; file: string; offset: number }[] = [];
  private readonly defaultSizes: { defw?: Value; defl?: Value } = {};
  private readonly includeStack: string[] = [];
  private readonly deviceCache = new Map<string, DeviceKind | null>();
  private readonly deviceBySpelling = new Map<string, DeviceKind | null>();
  private readonly deviceMatchers: { re: RegExp; kind: DeviceKind }[];

  private entries = new Set<string>();
  private scale = 1;
  private defw = SPICE_DEFAULT_SIZE;
  private defl = SPICE_DEFAULT_SIZE;
  private variantCount = 0;
  private elementBudget = 0;
  private readonly cells = new Map<string, Cell>();

  constructor(
    files: ReadonlyMap<string, string> | Record<string, string>,
    private readonly options: ReadOptions,
  ) {
    const entries = files instanceof Map ? [...files.entries()] : Object.entries(files as Record<string, string>);
    for (const [path, text] of entries) {
      const norm = normalizePath(path) ?? path.replace(/\\/g, '/');
      this.texts.set(norm, text);
    }
    this.deviceMatchers = options.deviceMap.map((e) => ({ re: globToRegExp(e.pattern), kind: e.kind }));
    this.top = this.newDef(TOP_LEVEL_CELL, null, { file: '', line: 1, column: 1 }, this.global);
    this.top.key = TOP_LEVEL_CELL;
  }

  // ---------- diagnostics ----------

  private report(severity: DiagnosticSeverity, code: string, file: string, offset: number, message: string, hint?: string): void {
    const ast = this.asts.get(file);
    let line = 1;
    let column = 1;
    if (ast) {
      line = lineOf(ast.lineStarts, offset);
      column = offset - ast.lineStarts[line - 1] + 1;
    }
    this.reportAt(severity, code, { file, line, column }, message, hint);
  }

  private reportAt(severity: DiagnosticSeverity, code: string, loc: SourceLoc, message: string, hint?: string): void {
    const key = `${code}|${loc.file}|${loc.line}|${loc.column}`;
    if (this.seenDiagnostics.has(key)) return;
    this.seenDiagnostics.add(key);
    this.diagnostics.push({ severity, code, message, ...(hint ? { hint } : {}), file: loc.file, line: loc.line, column: loc.column });
  }

  // ---------- files ----------

  private parse(path: string, asDeck: boolean): FileAst {
    let ast = this.asts.get(path);
    if (!ast) {
      ast = parseNetlist(path, this.texts.get(path) ?? '', { simulationDeck: asDeck }, this.numbers);
      this.asts.set(path, ast);
    } else if (!asDeck && ast.title !== undefined) {
      // Parsed as a deck with a title line, but it is included: its first line is content.
      ast = parseNetlist(path, this.texts.get(path) ?? '', { simulationDeck: false }, this.numbers);
      this.asts.set(path, ast);
    }
    return ast;
  }

  private entryFiles(): string[] {
    const paths = [...this.texts.keys()];
    if (this.options.entry && this.options.entry.length) {
      const out: string[] = [];
      for (const e of this.options.entry) {
        const norm = normalizePath(e);
        if (norm && this.texts.has(norm)) out.push(norm);
        else this.reportAt('error', 'entry-not-found', { file: e, line: 1, column: 1 }, `entry file "${e}" is not among the files read`);
      }
      return out;
    }
    // Every file not included by another; files only reachable through include cycles start from their first member.
    const included = new Map<string, Set<string>>();
    for (const p of paths) {
      const ast = this.parse(p, true);
      const targets = new Set<string>();
      collectIncludeTargets(ast.statements, p, targets);
      included.set(p, targets);
    }
    const includedByOther = new Set<string>();
    for (const [from, targets] of included) for (const t of targets) if (t !== from) includedByOther.add(t);
    const entries = paths.filter((p) => !includedByOther.has(p));
    const reached = new Set<string>();
    const visit = (p: string) => {
      const stack = [p];
      while (stack.length) {
        const q = stack.pop()!;
        if (reached.has(q)) continue;
        reached.add(q);
        for (const t of included.get(q) ?? []) if (this.texts.has(t)) stack.push(t);
      }
    };
    entries.forEach(visit);
    for (const p of paths) {
      if (!reached.has(p)) {
        entries.push(p);
        visit(p);
      }
    }
    return entries;
  }

  // ---------- collection ----------

  private newDef(name: string, stmt: SubcktStatement | null, loc: SourceLoc, scope: Scope): CellDef {
    const def: CellDef = {
      name,
      key: name.toLowerCase(),
      stmt,
      loc,
      scope,
      ports: stmt ? stmt.ports : [],
      portOffsets: stmt ? stmt.portOffsets : [],
      headerParams: stmt ? stmt.params : [],
      localParams: [],
      elements: [],
      segments: [],
      ownNets: stmt ? stmt.nets : null,
      pinInfo: [],
      targets: [],
      relevant: null,
      variants: new Map(),
      defaultBinding: null,
    };
    this.allDefs.push(def);
    return def;
  }

  /**
   * Walk statements into `def` (the top level or a subcircuit body); `nets` is the node table of their body.
   * Nested definitions and included files are walked in place, in source order, with an explicit stack.
   */
  private collect(statements: readonly Statement[], root: CellDef, rootFile: string, rootNets: NameTable): void {
    const frames: { statements: readonly Statement[]; i: number; def: CellDef; file: string; nets: NameTable; included: boolean }[] = [
      { statements, i: 0, def: root, file: rootFile, nets: rootNets, included: false },
    ];
    while (frames.length) {
      const frame = frames[frames.length - 1];
      if (frame.i >= frame.statements.length) {
        frames.pop();
        if (frame.included) this.includeStack.pop();
        continue;
      }
      const s = frame.statements[frame.i++];
      const { def, file, nets } = frame;
      const scope = def === this.top ? this.global : def.scope;
      switch (s.kind) {
        case 'mos':
        case 'instance':
        case 'res':
        case 'cap':
        case 'vsrc':
        case 'isrc':
        case 'diode': {
          const last = def.segments[def.segments.length - 1];
          if (last && last.nets === nets && last.end === def.elements.length) last.end++;
          else def.segments.push({ nets, file, start: def.elements.length, end: def.elements.length + 1 });
          def.elements.push(s);
          break;
        }
        case 'subckt': {
          const child = this.define(s, scope, file);
          if (child) frames.push({ statements: s.body, i: 0, def: child, file, nets: s.nets, included: false });
          break;
        }
        case 'param':
          if (def === this.top) for (const p of s.params) this.globalParams.set(p.name, { value: p.value, file, offset: p.offset });
          else for (const p of s.params) def.localParams.push(p);
          break;
        case 'model':
          this.addModel(s.name, s.type, s.params, s.loc);
          break;
        case 'global':
          for (const n of s.names) this.globals.add(n.toLowerCase());
          break;
        case 'option':
          for (const p of s.params) {
            if (p.name === 'scale') this.scales.push({ value: p.value, file, offset: p.offset });
            else if (p.name === 'defw' || p.name === 'defl') this.defaultSizes[p.name] = p.value;
          }
          break;
        case 'scale':
          this.scales.push({ value: s.value, file, offset: -1 });
          break;
        case 'pininfo':
          if (def === this.top) this.reportAt('warning', 'pininfo-outside', s.loc, '*.PININFO outside a .subckt is ignored');
          else for (const e of s.entries) def.pinInfo.push(e);
          break;
        case 'include':
        case 'lib': {
          const target = this.includeTarget(s.path, s.pathOffset, s.kind === 'lib' ? s.section : '', file, scope);
          if (target) {
            this.includeStack.push(target.path);
            frames.push({ statements: target.statements, i: 0, def, file: target.path, nets: target.nets, included: true });
          }
          break;
        }
        case 'libsection':
          // A section definition is read only when a `.lib file section` names it.
          break;
      }
    }
  }

  /** Register a definition in its scope; null when it is not to be read (no name, or a repeat). */
  private define(s: SubcktStatement, scope: Scope, file: string): CellDef | null {
    if (!s.name) return null; // reported by the parser
    const key = s.name.toLowerCase();
    const existing = scope.defs.get(key);
    if (existing) {
      if (existing.stmt === s) return null;
      const a = existing.stmt ? this.definitionText(existing) : null;
      const b = this.texts.get(file)?.slice(s.start, s.end);
      if (a !== null && a === b) return null; // the same definition repeated verbatim (one macro's cells in two files)
      this.report('error', 'duplicate-subckt', file, s.nameOffset, `subcircuit ${s.name} is defined again (first at ${existing.loc.file}:${existing.loc.line})`, 'rename one of them or remove the repeat; the first definition is used');
      return null;
    }
    const inner: Scope = { defs: new Map(), parent: scope, included: new Set() };
    const def = this.newDef(s.name, s, s.loc, inner);
    scope.defs.set(key, def);
    return def;
  }

  private definitionText(def: CellDef): string | undefined {
    const s = def.stmt!;
    return this.texts.get(def.loc.file)?.slice(s.start, s.end);
  }

  /** The statements an `.include`/`.lib` brings into `scope`, or null (with a diagnostic when it is a problem). */
  private includeTarget(written: string, pathOffset: number, section: string, fromFile: string, scope: Scope): { path: string; statements: readonly Statement[]; nets: NameTable } | null {
    const resolved = resolveInclude(fromFile, written);
    const what = section ? `.lib "${written}" ${section}` : `.include "${written}"`;
    if ('outside' in resolved) {
      this.report('error', 'include-outside', fromFile, pathOffset, `${what} leaves the set of uploaded files`, 'include files by a path relative to the including file, inside the uploaded folder');
      return null;
    }
    let path = resolved.path;
    if (!this.texts.has(path)) {
      // Also accept a path relative to the root of the set, as simulators run from the deck's folder accept it.
      const fromRoot = normalizePath(written);
      if (fromRoot && this.texts.has(fromRoot)) path = fromRoot;
      else {
        const lower = path.toLowerCase();
        const near = [...this.texts.keys()].find((p) => p.toLowerCase() === lower);
        this.report('error', 'include-not-found', fromFile, pathOffset, `${what}: no such file among the uploaded files`, near ? `did you mean "${near}"? (names are case-sensitive)` : 'upload the file with the netlist, or remove the include');
        return null;
      }
    }
    if (this.includeStack.includes(path)) {
      this.report('error', 'include-cycle', fromFile, pathOffset, `${what} includes a file that is already being read (${[...this.includeStack, path].join(' → ')})`, 'remove the include that closes the cycle');
      return null;
    }
    const guard = `${path}#${section}`;
    if (scope.included.has(guard)) {
      // Reading a file twice into one scope would only repeat its definitions and element names.
      if (!(scope === this.global && this.entries.has(path) && !section)) {
        this.report('warning', 'repeated-include', fromFile, pathOffset, `${what} was already read into this scope; read once`);
      }
      return null;
    }
    scope.included.add(guard);
    const ast = this.parse(path, false);
    let statements: readonly Statement[] = ast.statements;
    let nets = ast.nets;
    if (section) {
      const found = ast.statements.find((s) => s.kind === 'libsection' && s.name === section);
      if (!found || found.kind !== 'libsection') {
        this.report('error', 'lib-section-not-found', fromFile, pathOffset, `${what}: the file has no section "${section}"`);
        return null;
      }
      statements = found.body;
      nets = found.nets;
    }
    return { path, statements, nets };
  }

  private addModel(name: string, type: string, params: Param[], loc: SourceLoc): void {
    const key = name.toLowerCase();
    if (this.models.has(key)) return; // first card wins, as for subcircuits; PDK libraries repeat cards per corner section
    const values: Record<string, number> = {};
    for (const p of params) {
      if (p.value === undefined) continue;
      const v = this.evalQuiet(p.value);
      if (v !== undefined) values[p.name] = v;
    }
    this.models.set(key, { name, type, params: values, loc });
  }

  // ---------- parameters ----------

  private globalValue(name: string): number | undefined {
    const known = this.globalValues.get(name);
    if (known !== undefined) return known ?? undefined;
    const p = this.globalParams.get(name);
    if (!p || p.value === undefined) return undefined;
    if (this.evaluating.has(name)) {
      this.report('error', 'param-cycle', p.file, p.offset, `parameter ${name} depends on itself`, 'break the cycle between the .param definitions');
      return undefined;
    }
    this.evaluating.add(name);
    const v = this.evalValue(p.value, p.file, (n) => this.globalValue(n));
    this.evaluating.delete(name);
    this.globalValues.set(name, v ?? null);
    return v;
  }

  /** Evaluate a value; reports expression errors against `file`. Bare words that name no parameter give undefined silently when `quietBare`. */
  /**
   * Evaluate a value; reports expression errors against `file`. `lookup` gives null for a
   * subcircuit parameter declared without a default that the instance does not give.
   * Bare words that name no parameter give undefined silently when `quietBare`.
   */
  private evalValue(value: Value, file: string, lookup: Lookup, quietBare = false): number | undefined {
    if (typeof value === 'number') return value;
    let unset: string | null = null;
    const read = (n: string) => {
      const v = lookup(n);
      if (v === null) unset ??= n;
      return v ?? undefined;
    };
    const unsetProblem = (at: number) => {
      this.report('error', 'unknown-parameter', file, at, `parameter "${unset}" has no value: it is declared without a default and the instance gives none`, `give it a default (params: ${unset}=…) or a value on the X line`);
    };
    if (value.bare && value.compiled.node.t === 'ref') {
      const v = read(value.compiled.node.name);
      if (v === undefined && unset) unsetProblem(value.offset);
      else if (v === undefined && !quietBare) this.report('error', 'unknown-parameter', file, value.offset, `unknown parameter "${value.text}"`, 'define it with .param, as a subcircuit parameter, or write a number');
      return v;
    }
    const r = evaluate(value.compiled.node, read);
    if (!r.ok) {
      if (unset) unsetProblem(value.offset + r.at);
      else this.report('error', r.message.startsWith('unknown parameter') ? 'unknown-parameter' : 'bad-expression', file, value.offset + r.at, `${r.message} in "${value.text}"`, 'define the parameters it uses, or write a number');
      return undefined;
    }
    return r.value;
  }

  private evalQuiet(value: Value): number | undefined {
    if (typeof value === 'number') return value;
    const r = evaluate(value.compiled.node, (n) => this.globalValue(n));
    return r.ok ? r.value : undefined;
  }

  // ---------- devices ----------

  /** What a model or unresolved subcircuit name is: by its `.model` card, else by the deck's device map. */
  private deviceKind(name: string): DeviceKind | null {
    // Keyed by the name as written first: model names are interned, so this is one lookup per device.
    const known = this.deviceBySpelling.get(name);
    if (known !== undefined) return known;
    const key = name.toLowerCase();
    const cached = this.deviceCache.get(key);
    if (cached !== undefined) {
      this.deviceBySpelling.set(name, cached);
      return cached;
    }
    let kind: DeviceKind | null = null;
    let card = this.models.get(key);
    if (!card) {
      // Binned cards: `nch.1`, `nch.2` … serve devices that name `nch`.
      for (const [k, m] of this.models) {
        if (k.startsWith(key + '.') && /^\d+$/.test(k.slice(key.length + 1))) {
          card = m;
          break;
        }
      }
    }
    if (card) kind = cardKind(card.type);
    if (kind === null) {
      for (const m of this.deviceMatchers) {
        if (m.re.test(name)) {
          kind = m.kind;
          break;
        }
      }
    }
    this.deviceCache.set(key, kind);
    this.deviceBySpelling.set(name, kind);
    return kind;
  }

  // ---------- structure ----------

  private lookupDef(scope: Scope, name: string): CellDef | undefined {
    const key = name.toLowerCase();
    for (let s: Scope | null = scope; s; s = s.parent) {
      const d = s.defs.get(key);
      if (d) return d;
    }
    return undefined;
  }

  private resolveTargets(): void {
    for (const def of this.allDefs) {
      const scope = def === this.top ? this.global : def.scope;
      const targets = (def.targets = new Array<Target | undefined>(def.elements.length).fill(undefined));
      for (let e = 0; e < def.elements.length; e++) {
        const el = def.elements[e];
        if (el.kind !== 'instance') continue;
        const target = this.lookupDef(scope, el.cell);
        if (target) targets[e] = target;
        else if (el.cell.toLowerCase() === TIE_DEVICE) targets[e] = 'tie';
        else {
          const kind = this.deviceKind(el.cell);
          if (kind) targets[e] = kind;
          else {
            targets[e] = 'unknown';
            this.report('error', 'unknown-subckt', el.loc.file, el.cellOffset, `${el.name}: unknown subcircuit "${el.cell}"`, 'define it, include the file that defines it, or map the name to a device kind in the deck\u2019s device map');
          }
        }
      }
    }
  }

  /** Find and cut instantiation cycles (iterative DFS over definitions). */
  private cutCycles(): void {
    const state = new Map<CellDef, 1 | 2>();
    for (const start of this.allDefs) {
      if (state.has(start)) continue;
      const stack: { def: CellDef; edges: [number, CellDef][]; i: number }[] = [];
      const push = (def: CellDef) => {
        state.set(def, 1);
        const edges: [number, CellDef][] = [];
        def.targets.forEach((t, e) => {
          if (typeof t === 'object') edges.push([e, t]);
        });
        stack.push({ def, edges, i: 0 });
      };
      push(start);
      while (stack.length) {
        const frame = stack[stack.length - 1];
        if (frame.i >= frame.edges.length) {
          state.set(frame.def, 2);
          stack.pop();
          continue;
        }
        const [e, child] = frame.edges[frame.i++];
        const inst = frame.def.elements[e] as InstanceStatement;
        const s = state.get(child);
        if (s === 1) {
          const chain = stack.slice(stack.findIndex((f) => f.def === child)).map((f) => f.def.name);
          frame.def.targets[e] = 'cut';
          this.reportAt('error', 'recursive-instance', inst.loc, `${inst.name} instantiates ${child.name} inside itself (${[...chain, child.name].join(' → ')})`, 'a subcircuit cannot contain itself, directly or through others; this instance is left out');
        } else if (s === undefined) push(child);
      }
    }
  }

  private roots(): CellDef[] {
    if (this.options.top) {
      const key = this.options.top.toLowerCase();
      const found = this.global.defs.get(key) ?? this.allDefs.find((d) => d !== this.top && d.key === key);
      if (found) return [found];
      const first = [...this.asts.keys()][0] ?? '';
      this.reportAt('error', 'unknown-top', { file: first, line: 1, column: 1 }, `no subcircuit named "${this.options.top}" to start from`, 'give the name of a .subckt defined in the files');
    }
    const instantiated = new Set<CellDef>();
    for (const def of this.allDefs) for (const t of def.targets) if (typeof t === 'object') instantiated.add(t);
    const roots = this.allDefs.filter((d) => d !== this.top && !instantiated.has(d));
    if (this.top.elements.length) roots.unshift(this.top);
    return roots;
  }

  // ---------- variants ----------

  /** Header parameters whose value can change what the body elaborates to. */
  private relevantParams(def: CellDef): string[] {
    if (def.relevant) return def.relevant;
    if (def.headerParams.length === 0) return (def.relevant = []);
    const used = new Set<string>();
    const addRefs = (v: Value | undefined) => {
      if (v !== undefined && typeof v !== 'number') for (const r of v.compiled.refs) used.add(r);
    };
    for (const el of def.elements) forEachValue(el, addRefs);
    // Through local .params and header defaults, transitively.
    const defining = new Map<string, Value | undefined>();
    for (const p of def.headerParams) defining.set(p.name, p.value);
    for (const p of def.localParams) defining.set(p.name, p.value);
    let grew = true;
    while (grew) {
      grew = false;
      for (const [name, v] of defining) {
        if (!used.has(name) || v === undefined || typeof v === 'number') continue;
        for (const r of v.compiled.refs) {
          if (!used.has(r)) {
            used.add(r);
            grew = true;
          }
        }
      }
    }
    const local = new Set(def.localParams.map((p) => p.name));
    def.relevant = def.headerParams.map((p) => p.name).filter((n) => used.has(n) && !local.has(n));
    return def.relevant;
  }

  /** Bind a definition's header parameters: overrides (already evaluated by the parent) over defaults. */
  private bind(def: CellDef, overrides: Map<string, number> | null): Binding {
    const binding: Binding = new Map();
    const file = def.loc.file;
    for (const p of def.headerParams) {
      if (overrides?.has(p.name)) binding.set(p.name, overrides.get(p.name));
      else if (p.value === undefined) binding.set(p.name, undefined);
      else binding.set(p.name, this.evalValue(p.value, file, (n) => (binding.has(n) ? binding.get(n) : this.globalValue(n))));
    }
    return binding;
  }

  private signature(def: CellDef, binding: Binding): string {
    const relevant = this.relevantParams(def);
    let sig = '';
    for (const name of relevant) sig += `${name}=${binding.get(name) ?? '?'};`;
    return sig;
  }

  /** The variant of `def` for `binding`, elaborating it on first use; null when limits stop it. */
  private variant(def: CellDef, binding: Binding, at: SourceLoc | null, queue: Pending[]): Cell | null {
    const sig = this.signature(def, binding);
    const known = def.variants.get(sig);
    if (known) return known;
    def.defaultBinding ??= this.bind(def, null);
    if (def.variants.size >= LIMITS.variantsPerCell || this.variantCount >= LIMITS.variants) {
      const why =
        def.variants.size >= LIMITS.variantsPerCell
          ? `${def.name} already has ${LIMITS.variantsPerCell} variants (distinct parameter bindings)`
          : `the design already has ${LIMITS.variants} cell variants in all`;
      if (at) this.reportAt('error', 'too-many-variants', at, `${why}; this instance of ${def.name} is left out`, 'fewer distinct parameter values, or parameters that do not change the devices');
      return null;
    }
    this.variantCount++;
    // The default binding keeps the plain key; others name the parameters that differ: `inv(wn=2e-6)`.
    const differing = this.relevantParams(def)
      .filter((n) => binding.get(n) !== def.defaultBinding!.get(n))
      .map((n) => `${n}=${binding.get(n) ?? '?'}`);
    let key = differing.length ? `${def.key}(${differing.join(',')})` : def.key;
    for (let k = 2; this.cells.has(key); k++) key = `${differing.length ? `${def.key}(${differing.join(',')})` : def.key}#${k}`;
    const params: Record<string, number> = {};
    for (const [n, v] of binding) if (v !== undefined) params[n] = v;
    const cell: Cell = {
      name: def.name,
      key,
      ports: [],
      portDirections: [],
      nets: [],
      netIndex: new Map(),
      netLocs: [],
      mosfets: new MosfetTable(),
      others: [],
      instances: [],
      loc: def === this.top ? (def.elements[0]?.loc ?? def.loc) : def.loc,
      isTopLevel: def === this.top,
      params,
    };
    def.variants.set(sig, cell);
    this.cells.set(key, cell);
    queue.push({ def, cell, binding });
    return cell;
  }

  // ---------- elaborating one variant ----------

  private fill({ def, cell, binding }: Pending, queue: Pending[]): void {
    const file = def.loc.file;
    const localValues = new Map<string, number | null>();
    const localDefs = new Map<string, Param>();
    for (const p of def.localParams) localDefs.set(p.name, p);
    const localEvaluating = new Set<string>();
    const lookup = (name: string): number | undefined | null => {
      const lp = localDefs.get(name);
      if (lp) {
        const known = localValues.get(name);
        if (known !== undefined) return known ?? undefined;
        if (lp.value === undefined || localEvaluating.has(name)) {
          if (localEvaluating.has(name)) this.report('error', 'param-cycle', file, lp.offset, `parameter ${name} depends on itself`);
          return undefined;
        }
        localEvaluating.add(name);
        const v = this.evalValue(lp.value, file, lookup);
        localEvaluating.delete(name);
        localValues.set(name, v ?? null);
        return v;
      }
      if (binding.has(name)) return binding.get(name) ?? null;
      return this.globalValue(name);
    };

    // Nets: the definition's own table serves every variant as is when all elements come from it;
    // elements spliced in from included files are mapped into a copy by name.
    const own = def.ownNets ?? def.segments[0]?.nets ?? new NameTable();
    const ownFile = def.stmt ? file : (def.segments[0]?.file ?? file);
    const foreign = def.segments.some((sg) => sg.nets !== own);
    const cellNets = foreign ? new CellNets(own, own.locations(this.cursor(ownFile))) : null;
    cell.nets = cellNets ? cellNets.names : own.names;
    cell.netIndex = cellNets ? cellNets.index : own.index;
    if (cellNets) cell.netLocs = cellNets.locs;
    else lazyNetLocs(cell, own, this.cursor(ownFile));

    if (def.stmt) {
      const seenPorts = new Set<number>();
      def.stmt.portIds.forEach((id, i) => {
        if (seenPorts.has(id)) this.report('warning', 'duplicate-port', file, def.portOffsets[i], `port ${def.ports[i]} is listed twice in .subckt ${def.name}`);
        seenPorts.add(id);
      });
      cell.ports = def.stmt.portIds.slice();
    }
    if (def.pinInfo.length) {
      const dirs = new Map<string, PinDirection>();
      const portNames = new Set(def.ports.map((p) => p.toLowerCase()));
      for (const e of def.pinInfo) {
        if (!portNames.has(e.name.toLowerCase())) this.report('warning', 'pininfo-unknown-pin', file, e.offset, `*.PININFO names ${e.name}, which is not a port of ${def.name}`);
        dirs.set(e.name.toLowerCase(), e.direction);
      }
      cell.portDirections = def.ports.map((p) => dirs.get(p.toLowerCase()));
    } else cell.portDirections = def.ports.map(() => undefined);

    const ties: [number, number][] = [];
    const num = (v: Value | undefined, elFile: string): number | undefined => (v === undefined ? undefined : typeof v === 'number' ? v : this.evalValue(v, elFile, lookup));
    const scale = this.scale;

    let lastModel: string | null = null;
    let lastKind: DeviceKind | null = null;
    for (const segment of def.segments) {
      let net: (id: number) => number = identity;
      if (segment.nets !== own) {
        const table = segment.nets;
        const locs = table.locations(this.cursor(segment.file));
        const remap = new Int32Array(table.size).fill(-1);
        net = (id) => (remap[id] >= 0 ? remap[id] : (remap[id] = cellNets!.id(table.names[id], locs[id])));
      }
      for (let e = segment.start; e < segment.end; e++) {
        const el = def.elements[e];
        const elFile = segment.file;
        switch (el.kind) {
          case 'mos': {
            const row = el as MosRow;
            const table = row.table;
            const model = table.models[row.row];
            const kind: DeviceKind | null = model === lastModel ? lastKind : this.deviceKind(model);
            lastModel = model;
            lastKind = kind;
            if (kind === 'ignore') break;
            if (kind !== 'nmos' && kind !== 'pmos') {
              this.modelProblem(el.name, el.model, kind, elFile, el.modelOffset);
              break;
            }
            this.mosfet(cell.mosfets, row, elFile, kind === 'nmos' ? 'n' : 'p', net, lookup, scale);
            break;
          }
          case 'instance': {
            const target = def.targets[e];
            if (target === undefined || target === 'unknown' || target === 'cut') break;
            if (typeof target === 'object') {
              if (el.nodes.length !== target.ports.length) {
                this.reportAt('error', 'pin-count', el.loc, `${el.name} connects ${el.nodes.length} node${el.nodes.length === 1 ? '' : 's'} to ${target.name}, which has ${target.ports.length} port${target.ports.length === 1 ? '' : 's'}`, `${target.name} is defined at ${target.loc.file}:${target.loc.line} with ports: ${target.ports.slice(0, 12).join(' ')}${target.ports.length > 12 ? ' …' : ''}`);
                break;
              }
              const overrides = new Map<string, number>();
              const evaluated: Record<string, number> = {};
              const declared = new Set(target.headerParams.map((p) => p.name));
              for (const p of el.params) {
                if (p.value === undefined) continue;
                const v = this.evalValue(p.value, elFile, lookup, !declared.has(p.name));
                if (v === undefined) continue;
                evaluated[p.name] = v;
                if (declared.has(p.name)) overrides.set(p.name, v);
              }
              const child = this.variant(target, this.bind(target, overrides), el.loc, queue);
              if (!child) break;
              cell.instances.push({ name: el.name, cell: child.key, pins: el.nodes.map(net), params: evaluated, loc: el.loc });
              break;
            }
            if (target === 'tie') {
              if (el.nodes.length < 2) {
                this.reportAt('error', 'pin-count', el.loc, `${el.name}: a short needs the two nodes it joins`);
                break;
              }
              const a = net(el.nodes[0]);
              const b = net(el.nodes[1]);
              ties.push([a, b]);
              cell.others.push({ kind: 'res', name: el.name, a, b, value: 0, model: el.cell, loc: el.loc });
              break;
            }
            this.mappedDevice(el, target, cell, net, lookup, scale, ties);
            break;
          }
          case 'res':
          case 'cap': {
            const value = num(el.value, elFile);
            const a = net(el.a);
            const b = net(el.b);
            if (el.kind === 'res') {
              const tie = (el.value === undefined && el.model?.toLowerCase() === TIE_DEVICE) || value === 0;
              if (tie) ties.push([a, b]);
              if (value === undefined && !tie) {
                if (el.value === undefined) this.reportAt('warning', 'missing-value', el.loc, `${el.name} has no resistance; left out`, 'give a value (R1 a b 1k); a zero-ohm tie is written with the model name short');
                break;
              }
              cell.others.push({ kind: 'res', name: el.name, a, b, value: value ?? 0, ...(el.model ? { model: el.model } : {}), loc: el.loc });
            } else {
              if (value === undefined) {
                if (el.value === undefined) this.reportAt('warning', 'missing-value', el.loc, `${el.name} has no capacitance; left out`, 'give a value (C1 a b 10f)');
                break;
              }
              cell.others.push({ kind: 'cap', name: el.name, a, b, value, ...(el.model ? { model: el.model } : {}), loc: el.loc });
            }
            break;
          }
          case 'vsrc':
          case 'isrc': {
            const dc = num(el.dc, elFile);
            cell.others.push({
              kind: el.kind,
              name: el.name,
              pos: net(el.pos),
              neg: net(el.neg),
              ...(dc !== undefined ? { dc } : {}),
              ...(el.waveform ? { waveform: el.waveform } : {}),
              loc: el.loc,
            });
            break;
          }
          case 'diode':
            cell.others.push({ kind: 'diode', name: el.name, anode: net(el.anode), cathode: net(el.cathode), model: el.model, loc: el.loc });
            break;
        }
      }
    }
    if (ties.length) mergeTies(cell, ties);
    this.elementBudget -= def.elements.length;
  }

  private modelProblem(name: string, model: string, kind: DeviceKind | null, file: string, offset: number): void {
    if (kind === null) {
      this.report('error', 'unknown-model', file, offset, `${name}: model "${model}" is neither a .model card nor in the deck\u2019s device map, so its polarity is unknown`, 'add a .model card (nmos or pmos), or a device-map pattern that matches the name');
    } else {
      this.report('error', 'model-kind', file, offset, `${name}: model "${model}" is a ${kind}, not a MOSFET`, 'check the model name or the deck\u2019s device map');
    }
  }

  private sizes(
    name: string,
    w: Value | undefined,
    l: Value | undefined,
    file: string,
    loc: SourceLoc,
    lookup: Lookup,
    scale: number,
  ): { w: number; l: number } | null {
    let wv = w === undefined ? undefined : typeof w === 'number' ? w : this.evalValue(w, file, lookup);
    let lv = l === undefined ? undefined : typeof l === 'number' ? l : this.evalValue(l, file, lookup);
    if ((w !== undefined && wv === undefined) || (l !== undefined && lv === undefined)) return null;
    if (wv === undefined || lv === undefined) {
      const missing = [wv === undefined ? 'W' : '', lv === undefined ? 'L' : ''].filter(Boolean).join(' and ');
      this.reportAt('warning', 'missing-size', loc, `${name} has no ${missing}; the SPICE default of 100 µm (or .option defw/defl) is used`, 'give w=… and l=… on the device line');
      return { w: wv !== undefined ? wv * scale : this.defw, l: lv !== undefined ? lv * scale : this.defl };
    }
    return { w: wv * scale, l: lv * scale };
  }

  /** Adds an M line's device to `into`, unless its size cannot be evaluated. */
  private mosfet(into: MosfetTable, row: MosRow, file: string, polarity: MosPolarity, net: (id: number) => number, lookup: Lookup, scale: number): void {
    const t = row.table;
    const r = row.row;
    const at = 4 * r;
    let w: number;
    let l: number;
    const wRaw = t.values[at];
    const lRaw = t.values[at + 1];
    if (wRaw === wRaw && lRaw === lRaw) {
      // The common case, a plain number for both: no evaluation, no temporary object.
      w = wRaw * scale;
      l = lRaw * scale;
    } else {
      const size = this.sizes(t.names[r], t.value(r, 0), t.value(r, 1), file, t.loc(r), lookup, scale);
      if (!size) return;
      w = size.w;
      l = size.l;
    }
    const mRaw = t.values[at + 2];
    const nfRaw = t.values[at + 3];
    let m: number | undefined;
    let nf = 1;
    if (mRaw === mRaw) m = mRaw;
    else {
      const v = t.value(r, 2);
      if (v !== undefined) m = typeof v === 'number' ? v : this.evalValue(v, file, lookup);
    }
    if (nfRaw === nfRaw) nf = nfRaw;
    else {
      const v = t.value(r, 3);
      if (v !== undefined) nf = typeof v === 'number' ? v : (this.evalValue(v, file, lookup) ?? 1);
    }
    let params = EMPTY_PARAMS;
    let mult: number | undefined;
    const extra = t.extra(r);
    if (extra) {
      params = {};
      for (const p of extra) {
        if (p.value === undefined) continue;
        const v = typeof p.value === 'number' ? p.value : this.evalValue(p.value, file, lookup, p.value.bare);
        if (v === undefined) continue;
        params[p.name] = scaleParam(p.name, v, scale);
        if (p.name === 'mult') mult = v;
      }
    }
    const line = t.lineOf(r);
    into.add(polarity, t.names[r], net(t.drain[r]), net(t.gate[r]), net(t.source[r]), net(t.bulk[r]), t.models[r], w, l, m ?? mult ?? 1, nf, params, t.file, line, t.columnOf(r, line));
  }

  /** An X line naming a PDK device rather than a subcircuit. */
  private mappedDevice(
    el: InstanceStatement,
    kind: DeviceKind,
    cell: Cell,
    net: (id: number) => number,
    lookup: Lookup,
    scale: number,
    ties: [number, number][],
  ): void {
    if (kind === 'ignore') return;
    const file = el.loc.file;
    if (kind === 'nmos' || kind === 'pmos') {
      if (el.nodes.length !== 4) {
        this.reportAt('error', 'pin-count', el.loc, `${el.name}: device ${el.cell} (a MOSFET) needs 4 nodes (drain gate source bulk), found ${el.nodes.length}`);
        return;
      }
      let wv: Value | undefined;
      let lv: Value | undefined;
      for (const p of el.params) {
        if (p.name === 'w') wv = p.value;
        else if (p.name === 'l') lv = p.value;
      }
      let w: number;
      let l: number;
      if (typeof wv === 'number' && typeof lv === 'number') {
        w = wv * scale;
        l = lv * scale;
      } else {
        const size = this.sizes(el.name, wv, lv, file, el.loc, lookup, scale);
        if (!size) return;
        w = size.w;
        l = size.l;
      }
      let params = EMPTY_PARAMS;
      let m: number | undefined;
      let mult: number | undefined;
      let nf = 1;
      for (const p of el.params) {
        if (p.value === undefined || p.name === 'w' || p.name === 'l') continue;
        const v = typeof p.value === 'number' ? p.value : this.evalValue(p.value, file, lookup, p.value.bare);
        if (v === undefined) continue;
        if (p.name === 'm') m = v;
        else if (p.name === 'nf') nf = v;
        else {
          if (params === EMPTY_PARAMS) params = {};
          params[p.name] = scaleParam(p.name, v, scale);
          if (p.name === 'mult') mult = v;
        }
      }
      const loc = el.loc;
      cell.mosfets.add(kind === 'nmos' ? 'n' : 'p', el.name, net(el.nodes[0]), net(el.nodes[1]), net(el.nodes[2]), net(el.nodes[3]), el.cell, w, l, m ?? mult ?? 1, nf, params, loc.file, loc.line, loc.column);
      return;
    }
    if (el.nodes.length !== 2) {
      this.reportAt('error', 'pin-count', el.loc, `${el.name}: device ${el.cell} (a ${kind}) needs 2 nodes, found ${el.nodes.length}`);
      return;
    }
    const a = net(el.nodes[0]);
    const b = net(el.nodes[1]);
    if (kind === 'diode') {
      cell.others.push({ kind: 'diode', name: el.name, anode: a, cathode: b, model: el.cell, loc: el.loc });
      return;
    }
    const valueNames = kind === 'resistor' ? ['r', 'resistance', 'value'] : ['c', 'capacitance', 'value'];
    const valueParam = el.params.find((q) => valueNames.includes(q.name));
    const value = valueParam?.value === undefined ? undefined : this.evalValue(valueParam.value, file, lookup);
    if (kind === 'resistor') {
      if (value === 0) ties.push([a, b]);
      if (value === undefined) {
        this.reportAt('warning', 'missing-value', el.loc, `${el.name}: resistor device ${el.cell} has no r=… value; left out`);
        return;
      }
      cell.others.push({ kind: 'res', name: el.name, a, b, value, model: el.cell, loc: el.loc });
    } else {
      if (value === undefined) {
        this.reportAt('warning', 'missing-value', el.loc, `${el.name}: capacitor device ${el.cell} has no c=… value; left out`);
        return;
      }
      cell.others.push({ kind: 'cap', name: el.name, a, b, value, model: el.cell, loc: el.loc });
    }
  }

  private readonly cursors = new Map<string, LocationCursor>();

  private cursor(file: string): LocationCursor {
    let c = this.cursors.get(file);
    if (!c) {
      c = new LocationCursor(file, this.asts.get(file)?.lineStarts ?? [0]);
      this.cursors.set(file, c);
    }
    return c;
  }

  // ---------- run ----------

  private resolveScale(): number {
    let chosen: number | undefined;
    let chosenAt: { file: string; offset: number } | undefined;
    for (const s of this.scales) {
      if (s.value === undefined) continue;
      const v = this.evalValue(s.value, s.file, (n) => this.globalValue(n));
      if (v === undefined) continue;
      if (!(v > 0)) {
        if (s.offset >= 0) this.report('error', 'bad-scale', s.file, s.offset, `scale must be positive, not ${v}`);
        continue;
      }
      if (chosen === undefined) {
        chosen = v;
        chosenAt = s;
      } else if (v !== chosen && s.offset >= 0) {
        this.report('warning', 'scale-conflict', s.file, s.offset, `scale ${v} differs from the scale ${chosen} set first${chosenAt ? ` in ${chosenAt.file}` : ''}; the first is used`);
      }
    }
    if (chosen !== undefined) {
      if (this.options.scale !== undefined && this.options.scale !== chosen && chosenAt) {
        this.report('warning', 'scale-override-ignored', chosenAt.file, Math.max(0, chosenAt.offset), `the netlist sets scale ${chosen}; the requested scale ${this.options.scale} applies only to netlists without one`);
      }
      return chosen;
    }
    return this.options.scale ?? this.options.defaultScale;
  }

  run(): Design {
    const entries = this.entryFiles();
    this.entries = new Set(entries);
    for (const entry of entries) {
      if (this.global.included.has(`${entry}#`)) continue;
      const ast = this.parse(entry, true);
      if (this.top.loc.file === '') this.top.loc = { file: entry, line: 1, column: 1 };
      this.global.included.add(`${entry}#`);
      this.includeStack.push(entry);
      this.top.ownNets ??= ast.nets;
      this.collect(ast.statements, this.top, entry, ast.nets);
      this.includeStack.pop();
    }
    this.scale = this.resolveScale();
    for (const [name, v] of Object.entries(this.defaultSizes)) {
      const n = v === undefined ? undefined : this.evalQuiet(v);
      if (n !== undefined && n > 0) this[name as 'defw' | 'defl'] = n * this.scale;
    }
    this.resolveTargets();
    this.cutCycles();
    let textElements = 0;
    for (const d of this.allDefs) textElements += d.elements.length;
    this.elementBudget = textElements + LIMITS.extraElements;

    const queue: Pending[] = [];
    const rootCells: string[] = [];
    for (const def of this.roots()) {
      const cell = this.variant(def, this.bind(def, null), null, queue);
      if (cell) rootCells.push(cell.key);
    }
    let head = 0;
    for (; head < queue.length; head++) {
      const next = queue[head];
      if (this.elementBudget < next.def.elements.length) {
        this.reportAt('error', 'elaboration-limit', next.def.loc, `elaboration stopped at ${next.def.name}: parameter variants would elaborate more than ${LIMITS.extraElements} elements beyond the netlist's own`, 'reduce the number of distinct parameter values passed to subcircuits');
        break;
      }
      this.fill(next, queue);
    }
    // Cells left unfilled after a stop must not be referenced half-built.
    for (const p of queue.slice(head)) this.cells.delete(p.cell.key);

    const design: Design = {
      cells: this.cells,
      roots: rootCells.filter((k) => this.cells.has(k)),
      globals: this.globals,
      models: this.models,
      sourcedRails: new Map(),
      files: [...this.asts.values()].map((a) => ({ path: a.path, lineCount: a.lineCount })),
      scale: this.scale,
      diagnostics: [],
    };
    design.sourcedRails = sourcedRails(design, this.cells.get(TOP_LEVEL_CELL), globMatcher(this.options.supplies.ground));
    design.diagnostics = this.allDiagnostics();
    return design;
  }

  private allDiagnostics(): Diagnostic[] {
    const order = new Map([...this.asts.keys()].map((p, i) => [p, i]));
    const all: Diagnostic[] = [];
    // (Loops, not spreads: a hostile file can carry a million diagnostics.)
    for (const ast of this.asts.values()) for (const d of ast.diagnostics) all.push(d);
    for (const d of this.diagnostics) all.push(d);
    return all.sort((a, b) => (order.get(a.file) ?? -1) - (order.get(b.file) ?? -1) || a.line - b.line || a.column - b.column);
  }
}

const EMPTY_PARAMS: Record<string, number> = Object.freeze({}) as Record<string, number>;

function cardKind(type: string): DeviceKind | null {
  switch (type) {
    case 'nmos':
      return 'nmos';
    case 'pmos':
      return 'pmos';
    case 'r':
    case 'res':
      return 'resistor';
    case 'c':
    case 'cap':
      return 'capacitor';
    case 'd':
      return 'diode';
    default:
      return null;
  }
}

/** SPICE applies the scale to lengths (W, L, PS, PD) and its square to areas (AS, AD). */
function scaleParam(name: string, v: number, scale: number): number {
  if (name === 'as' || name === 'ad') return v * scale * scale;
  if (name === 'ps' || name === 'pd') return v * scale;
  return v;
}

function forEachValue(el: ElementStatement, f: (v: Value | undefined) => void): void {
  switch (el.kind) {
    case 'mos':
      f(el.w);
      f(el.l);
      f(el.m);
      f(el.nf);
      el.extra?.forEach((p) => f(p.value));
      break;
    case 'instance':
      el.params.forEach((p) => f(p.value));
      break;
    case 'res':
    case 'cap':
      f(el.value);
      break;
    case 'vsrc':
    case 'isrc':
      f(el.dc);
      break;
  }
}

function collectIncludeTargets(statements: readonly Statement[], file: string, out: Set<string>): void {
  const stack: (readonly Statement[])[] = [statements];
  while (stack.length) {
    for (const s of stack.pop()!) {
      if (s.kind === 'include' || s.kind === 'lib') {
        const r = resolveInclude(file, s.path);
        if ('path' in r) out.add(r.path);
        const root = normalizePath(s.path);
        if (root) out.add(root);
      } else if (s.kind === 'subckt' || s.kind === 'libsection') stack.push(s.body);
    }
  }
}

const identity = (id: number) => id;

/**
 * `cell.netLocs` made on first read: a flat extraction has a location object per net,
 * and checks read them only to place a few findings. An own enumerable property, so
 * spreading or serialising a cell still sees the array.
 */
function lazyNetLocs(cell: Cell, nets: NameTable, cursor: LocationCursor): void {
  // Defined out here so that the getter holds only the table and the cursor, never the elaborator.
  let value: SourceLoc[] | undefined;
  Object.defineProperty(cell, 'netLocs', {
    enumerable: true,
    configurable: true,
    get: () => (value ??= nets.locations(cursor)),
    set: (v: SourceLoc[]) => {
      value = v;
    },
  });
}

/** A cell's nets when its elements come from several bodies: a copy of its own table, extended by name. */
class CellNets {
  readonly names: string[];
  readonly index: Map<string, number>;
  readonly locs: SourceLoc[];

  constructor(own: NameTable, ownLocs: SourceLoc[]) {
    this.names = own.names.slice();
    this.index = new Map(own.index);
    this.locs = ownLocs.slice();
  }

  id(name: string, loc: SourceLoc): number {
    const lower = name.toLowerCase();
    let id = this.index.get(lower);
    if (id === undefined) {
      id = this.names.length;
      this.names.push(name);
      this.index.set(lower, id);
      this.locs.push(loc);
    }
    return id;
  }
}

/** Merge the nets joined by zero-ohm ties; ports and first-mentioned names represent the merged net. */
function mergeTies(cell: Cell, ties: [number, number][]): void {
  const parent = cell.nets.map((_, i) => i);
  const find = (x: number): number => {
    while (parent[x] !== x) {
      parent[x] = parent[parent[x]];
      x = parent[x];
    }
    return x;
  };
  for (const [a, b] of ties) {
    const ra = find(a);
    const rb = find(b);
    if (ra !== rb) parent[Math.max(ra, rb)] = Math.min(ra, rb);
  }
  const newId = new Array<number>(cell.nets.length);
  const nets: string[] = [];
  const netLocs: SourceLoc[] = [];
  for (let i = 0; i < cell.nets.length; i++) {
    if (find(i) === i) {
      newId[i] = nets.length;
      nets.push(cell.nets[i]);
      netLocs.push(cell.netLocs[i]);
    }
  }
  const map = (x: number) => newId[find(x)];
  // New containers: variants of one definition share their unmerged tables.
  const index = new Map<string, number>();
  for (const [name, id] of cell.netIndex) index.set(name, map(id));
  cell.netIndex = index;
  cell.ports = cell.ports.map(map);
  cell.mosfets.remapNets(map);
  for (const d of cell.others) {
    if (d.kind === 'res' || d.kind === 'cap') {
      d.a = map(d.a);
      d.b = map(d.b);
    } else if (d.kind === 'diode') {
      d.anode = map(d.anode);
      d.cathode = map(d.cathode);
    } else {
      d.pos = map(d.pos);
      d.neg = map(d.neg);
    }
  }
  for (const inst of cell.instances) inst.pins = inst.pins.map(map);
  cell.nets = nets;
  cell.netLocs = netLocs;
}

/**
 * Nets held at a DC level by a voltage source against ground: node 0, `gnd` (which
 * simulators also take as ground), or a net the deck names as ground. Positive →
 * power, 0 V → ground. Sources count in the top-level cell, and in any cell on
 * `.global` nets. A source with a transient function drives a signal, not a rail.
 */
function sourcedRails(design: Design, top: Cell | undefined, isGroundName: (name: string) => boolean): Map<string, { rail: RailKind; volts: number }> {
  const rails = new Map<string, { rail: RailKind; volts: number }>();
  const sources: { pos: string; neg: string; dc: number }[] = [];
  for (const cell of design.cells.values()) {
    for (const d of cell.others) {
      if (d.kind !== 'vsrc' || d.dc === undefined || d.waveform) continue;
      const pos = cell.nets[d.pos].toLowerCase();
      const neg = cell.nets[d.neg].toLowerCase();
      if (cell === top || design.globals.has(pos) || design.globals.has(neg)) sources.push({ pos, neg, dc: d.dc });
    }
  }
  const level = new Map<string, number>([
    ['0', 0],
    ['gnd', 0],
  ]);
  rails.set('0', { rail: 'ground', volts: 0 });
  // Propagate levels through chains of sources (vss held at 0 by one source, vdd at 1.8 above vss by another).
  const propagate = () => {
    for (let changed = true, rounds = 0; changed && rounds < 50; rounds++) {
      changed = false;
      for (const s of sources) {
        const p = level.get(s.pos);
        const n = level.get(s.neg);
        if (n !== undefined && p === undefined) {
          level.set(s.pos, n + s.dc);
          changed = true;
        } else if (p !== undefined && n === undefined) {
          level.set(s.neg, p - s.dc);
          changed = true;
        }
      }
    }
  };
  propagate();
  // Then a net the deck names as ground, not tied to node 0 by any source, is a reference of its own (`Vdd vdd vss 1.8`).
  let added = false;
  for (const s of sources) {
    for (const name of [s.neg, s.pos]) {
      if (!level.has(name) && isGroundName(name)) {
        level.set(name, 0);
        added = true;
      }
    }
  }
  if (added) propagate();
  for (const [net, volts] of level) {
    if (net === '0') continue;
    if (net === 'gnd' && !sources.some((s) => s.pos === 'gnd' || s.neg === 'gnd')) continue;
    if (volts > 0) rails.set(net, { rail: 'power', volts });
    else if (volts === 0) rails.set(net, { rail: 'ground', volts });
  }
  return rails;
}

