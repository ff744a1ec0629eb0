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
  private polarityCode = new Uint8Array(0);
  drain = new Int32Array(0);
  gate = new Int32Array(0);
  source = new Int32Array(0);
  bulk = new Int32Array(0);
  /** Channel width in metres, scale applied (all fingers of one device). */
  w = new Float64Array(0);
  /** Channel length in metres, scale applied. */
  l = new Float64Array(0);
  /** Parallel multiplier (M). */
  m = new Float64Array(0);
  /** Finger count (NF), 1 when absent. */
  nf = new Float64Array(0);
  /** 1-based physical line and column of each device's element name. */
  line = new Int32Array(0);
  column = new Int32Array(0);
  private fileCode = new Int32Array(0);
  /** Element names as written. */
  readonly names: string[] = [];
  /** Model or PDK device names as written. */
  readonly models: string[] = [];
  private readonly files: string[] = [];
  /** Other numeric parameters of each device (as, ad, ps, pd, …; a shared empty record for most), read through `at`. */
  private readonly paramList: Record<string, number>[] = [];

  constructor(capacity = 16) {
    this.resize(Math.max(1, capacity));
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
    if (this.length === this.drain.length) this.resize(2 * this.length);
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

  /** Room for `n` rows in every column, the rows so far kept. */
  private resize(n: number): void {
    const copy = <T extends Uint8Array | Int32Array | Float64Array>(a: T, b: T): T => {
      b.set(a);
      return b;
    };
    this.polarityCode = copy(this.polarityCode, new Uint8Array(n));
    this.fileCode = copy(this.fileCode, new Int32Array(n));
    this.drain = copy(this.drain, new Int32Array(n));
    this.gate = copy(this.gate, new Int32Array(n));
    this.source = copy(this.source, new Int32Array(n));
    this.bulk = copy(this.bulk, new Int32Array(n));
    this.line = copy(this.line, new Int32Array(n));
    this.column = copy(this.column, new Int32Array(n));
    this.w = copy(this.w, new Float64Array(n));
    this.l = copy(this.l, new Float64Array(n));
    this.m = copy(this.m, new Float64Array(n));
    this.nf = copy(this.nf, new Float64Array(n));
  }
}
