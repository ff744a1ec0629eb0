// The MOSFETs of one cell, column by column. A flat extraction holds a million
// transistors in one cell; as objects they cost a record, a location and boxed
// sizes each (a fifth of a gigabyte, and the collector's time to trace it), as
// columns a few typed arrays. Hot loops read the columns; `at(i)` gives a record
// for code that reports one device.

import type { MosPolarity, Mosfet, SourceLoc } from './design';

const POLARITY_N = 0;
const POLARITY_P = 1;
const NO_PARAMS: Readonly<Record<string, number>> = Object.freeze({});

export class MosfetTable implements Iterable<Mosfet> {
  length = 0;
  /** 0 for n-channel, 1 for p-channel: read it through `isN` / `polarityOf`. */
  private polarityCode: Uint8Array;
  drain: Int32Array;
  gate: Int32Array;
  source: Int32Array;
  bulk: Int32Array;
  /** Channel width in metres, scale applied (all fingers of one device). */
  w: Float64Array;
  /** Channel length in metres, scale applied. */
  l: Float64Array;
  /** Parallel multiplier (M). */
  m: Float64Array;
  /** Finger count (NF), 1 when absent. */
  nf: Float64Array;
  /** 1-based physical line and column of each device's element name. */
  line: Int32Array;
  column: Int32Array;
  private fileCode: Int32Array;
  /** Element names as written. */
  readonly names: string[] = [];
  /** Model or PDK device names as written. */
  readonly models: string[] = [];
  private readonly files: string[] = [];
  /** Other numeric parameters of each device (as, ad, ps, pd, …; a shared empty record for most), read through `at`. */
  private readonly paramList: Record<string, number>[] = [];

  constructor(capacity = 16) {
    const n = Math.max(1, capacity);
    this.polarityCode = new Uint8Array(n);
    this.drain = new Int32Array(n);
    this.gate = new Int32Array(n);
    this.source = new Int32Array(n);
    this.bulk = new Int32Array(n);
    this.w = new Float64Array(n);
    this.l = new Float64Array(n);
    this.m = new Float64Array(n);
    this.nf = new Float64Array(n);
    this.line = new Int32Array(n);
    this.column = new Int32Array(n);
    this.fileCode = new Int32Array(n);
  }

  static from(mosfets: Iterable<Mosfet>): MosfetTable {
    const table = new MosfetTable();
    for (const m of mosfets) table.push(m);
    return table;
  }

  /** The devices at `indices`, in that order, as a table of their own (terminals keep their net numbers). */
  subset(indices: readonly number[]): MosfetTable {
    const out = new MosfetTable(indices.length);
    for (const i of indices) {
      out.add(this.polarityOf(i), this.names[i], this.drain[i], this.gate[i], this.source[i], this.bulk[i], this.models[i], this.w[i], this.l[i], this.m[i], this.nf[i], this.paramList[i], this.file(i), this.line[i], this.column[i]);
    }
    return out;
  }

  /** Appends one device; returns its index. */
  add(
    polarity: MosPolarity,
    name: string,
    drain: number,
    gate: number,
    source: number,
    bulk: number,
    model: string,
    w: number,
    l: number,
    m: number,
    nf: number,
    params: Record<string, number> | undefined,
    file: string,
    line: number,
    column: number,
  ): number {
    if (this.length === this.drain.length) this.grow();
    const i = this.length++;
    this.polarityCode[i] = polarity === 'n' ? POLARITY_N : POLARITY_P;
    this.drain[i] = drain;
    this.gate[i] = gate;
    this.source[i] = source;
    this.bulk[i] = bulk;
    this.w[i] = w;
    this.l[i] = l;
    this.m[i] = m;
    this.nf[i] = nf;
    this.line[i] = line;
    this.column[i] = column;
    this.fileCode[i] = this.fileId(file);
    this.names.push(name);
    this.models.push(model);
    this.paramList.push(params ?? NO_PARAMS);
    return i;
  }

  push(d: Mosfet): number {
    return this.add(d.polarity, d.name, d.drain, d.gate, d.source, d.bulk, d.model, d.w, d.l, d.m, d.nf, d.params, d.loc.file, d.loc.line, d.loc.column);
  }

  isN(i: number): boolean {
    return this.polarityCode[i] === POLARITY_N;
  }

  polarityOf(i: number): MosPolarity {
    return this.polarityCode[i] === POLARITY_N ? 'n' : 'p';
  }

  file(i: number): string {
    return this.files[this.fileCode[i]];
  }

  loc(i: number): SourceLoc {
    return { file: this.files[this.fileCode[i]], line: this.line[i], column: this.column[i] };
  }

  /** Device `i` as a record of its own: changing its fields leaves the table as it is (its `params` object is the table's). */
  at(i: number): Mosfet {
    return {
      kind: 'mos',
      polarity: this.polarityOf(i),
      name: this.names[i],
      drain: this.drain[i],
      gate: this.gate[i],
      source: this.source[i],
      bulk: this.bulk[i],
      model: this.models[i],
      w: this.w[i],
      l: this.l[i],
      m: this.m[i],
      nf: this.nf[i],
      params: this.paramList[i],
      loc: this.loc(i),
    };
  }

  *[Symbol.iterator](): Iterator<Mosfet> {
    for (let i = 0; i < this.length; i++) yield this.at(i);
  }

  /** Renumbers every terminal through `map` (net merging). */
  remapNets(map: (net: number) => number): void {
    for (let i = 0; i < this.length; i++) {
      this.drain[i] = map(this.drain[i]);
      this.gate[i] = map(this.gate[i]);
      this.source[i] = map(this.source[i]);
      this.bulk[i] = map(this.bulk[i]);
    }
  }

  private fileId(file: string): number {
    const files = this.files;
    // Devices of one cell come from one file or a few: the last one is nearly always the one.
    for (let k = files.length - 1; k >= 0; k--) if (files[k] === file) return k;
    return files.push(file) - 1;
  }

  private grow(): void {
    const n = this.drain.length * 2;
    const grow = <T extends Uint8Array | Int32Array | Float64Array>(a: T, make: (n: number) => T): T => {
      const b = make(n);
      b.set(a);
      return b;
    };
    this.polarityCode = grow(this.polarityCode, (k) => new Uint8Array(k));
    this.fileCode = grow(this.fileCode, (k) => new Int32Array(k));
    this.drain = grow(this.drain, (k) => new Int32Array(k));
    this.gate = grow(this.gate, (k) => new Int32Array(k));
    this.source = grow(this.source, (k) => new Int32Array(k));
    this.bulk = grow(this.bulk, (k) => new Int32Array(k));
    this.line = grow(this.line, (k) => new Int32Array(k));
    this.column = grow(this.column, (k) => new Int32Array(k));
    this.w = grow(this.w, (k) => new Float64Array(k));
    this.l = grow(this.l, (k) => new Float64Array(k));
    this.m = grow(this.m, (k) => new Float64Array(k));
    this.nf = grow(this.nf, (k) => new Float64Array(k));
  }
}
