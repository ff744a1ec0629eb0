// Builds grammar/design.ts Cells and Designs directly, for tests that need a cell
// without going through the netlist parser. Every element gets its own line number
// (the `.subckt` line is line 1) so anchors can be checked.

import type { Capacitor, Cell, Design, ModelCard, Mosfet, Resistor, SourceLoc } from '../../grammar/design';
import { MosfetTable } from '../../grammar/mosfet-table';

export interface MosSize {
  w: number;
  l: number;
  m?: number;
  model?: string;
  /** Where the device is written, when not on the builder's next line of its own file. */
  at?: SourceLoc;
}

export class CellBuilder {
  private readonly nets: string[] = [];
  private readonly netIndex = new Map<string, number>();
  private readonly netLocs: SourceLoc[] = [];
  private readonly mosfets: Mosfet[] = [];
  private readonly others: Cell['others'] = [];
  private line = 1;
  private readonly ports: number[];

  constructor(
    readonly name: string,
    ports: string[],
    readonly file = `${name}.sp`,
  ) {
    this.ports = ports.map((p) => this.net(p));
  }

  net(name: string): number {
    const key = name.toLowerCase();
    let id = this.netIndex.get(key);
    if (id === undefined) {
      id = this.nets.length;
      this.nets.push(name);
      this.netIndex.set(key, id);
      this.netLocs.push(this.loc());
    }
    return id;
  }

  private loc(): SourceLoc {
    return { file: this.file, line: this.line, column: 1 };
  }

  private mos(polarity: 'n' | 'p', name: string, d: string, g: string, s: string, b: string, size: MosSize): this {
    this.line++;
    const device: Mosfet = {
      kind: 'mos',
      polarity,
      name,
      drain: this.net(d),
      gate: this.net(g),
      source: this.net(s),
      bulk: this.net(b),
      model: size.model ?? (polarity === 'n' ? 'nch' : 'pch'),
      w: size.w,
      l: size.l,
      m: size.m ?? 1,
      nf: 1,
      params: {},
      loc: size.at ?? this.loc(),
    };
    this.mosfets.push(device);
    return this;
  }

  nmos(name: string, d: string, g: string, s: string, b: string, size: MosSize): this {
    return this.mos('n', name, d, g, s, b, size);
  }

  pmos(name: string, d: string, g: string, s: string, b: string, size: MosSize): this {
    return this.mos('p', name, d, g, s, b, size);
  }

  res(name: string, a: string, b: string, value: number): this {
    this.line++;
    const r: Resistor = { kind: 'res', name, a: this.net(a), b: this.net(b), value, loc: this.loc() };
    this.others.push(r);
    return this;
  }

  cap(name: string, a: string, b: string, value: number): this {
    this.line++;
    const c: Capacitor = { kind: 'cap', name, a: this.net(a), b: this.net(b), value, loc: this.loc() };
    this.others.push(c);
    return this;
  }

  build(): Cell {
    return {
      name: this.name,
      key: this.name.toLowerCase(),
      ports: this.ports.slice(),
      portDirections: this.ports.map(() => undefined),
      nets: this.nets.slice(),
      netIndex: new Map(this.netIndex),
      netLocs: this.netLocs.slice(),
      mosfets: MosfetTable.from(this.mosfets),
      others: this.others.slice(),
      instances: [],
      loc: { file: this.file, line: 1, column: 1 },
      isTopLevel: false,
      params: {},
    };
  }
}

export function mosCard(name: string, type: 'nmos' | 'pmos', params: Record<string, number>): ModelCard {
  return { name, type, params: { level: 1, ...params }, loc: { file: 'models.sp', line: 1, column: 1 } };
}

export function designOf(cells: Cell[], models: ModelCard[] = []): Design {
  return {
    cells: new Map(cells.map((c) => [c.key, c])),
    roots: cells.map((c) => c.key),
    globals: new Set(),
    models: new Map(models.map((m) => [m.name.toLowerCase(), m])),
    sourcedRails: new Map(),
    files: [...new Set(cells.map((c) => c.loc.file))].map((path) => ({ path, lineCount: 1000 })),
    scale: 1,
    diagnostics: [],
  };
}
