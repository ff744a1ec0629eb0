// Node names of one body of statements (a file's top level, a `.subckt`, a `.lib`
// section) interned to small integers as they are parsed, case-insensitively (ASCII
// letters), with the spelling and offset of their first mention. Statements refer
// to nodes by these ids, so elaboration maps names once per body instead of once
// per mention, and a name seen before is recognised in the source text without
// cutting out a new string.

import type { SourceLoc } from './design';
import { LocationCursor } from './source';
import { foldAscii, hashRange, RangeIndex, rangeEquals } from './text-hash';

const RECENT_SLOTS = 4096;
const RECENT_AFTER = 4096;

export class NameTable {
  /** Each name as first written; index = id. */
  readonly names: string[] = [];
  /** Offset (in the body's file) of each name's first mention. */
  readonly firstOffsets: number[] = [];
  private readonly lookup = new RangeIndex((e) => this.names[e], true, 16);
  /**
   * A small direct-mapped cache of recently seen names (id + 1 by hash), in front of the
   * big table: a net is usually mentioned again a few lines after its first mention, and
   * the rails on every line, so most lookups stay in a few cache-resident kilobytes.
   * Made only once a table is large (a small table is cache-resident itself).
   */
  private recent: Int32Array | null = null;
  private recentHash: Int32Array | null = null;
  private map: NameIndex | null = null;
  private locs: SourceLoc[] | null = null;

  get size(): number {
    return this.names.length;
  }

  /** Id of the name written at `text[start, end)`, first mentioned at `offset` of its file. */
  idAt(text: string, start: number, end: number, offset: number): number {
    const h = hashRange(text, start, end, true);
    const recent = this.recent;
    if (recent === null) {
      const known = this.lookup.find(text, start, end, h);
      if (known >= 0) return known;
      const id = this.append(text.substring(start, end), h, offset);
      if (id >= RECENT_AFTER) {
        this.recent = new Int32Array(RECENT_SLOTS);
        this.recentHash = new Int32Array(RECENT_SLOTS);
      }
      return id;
    }
    const slot = h & (RECENT_SLOTS - 1);
    const cached = recent[slot] - 1;
    if (cached >= 0 && this.recentHash![slot] === (h | 0) && rangeEquals(text, start, end, this.names[cached], true)) return cached;
    let id = this.lookup.find(text, start, end, h);
    if (id < 0) id = this.append(text.substring(start, end), h, offset);
    recent[slot] = id + 1;
    this.recentHash![slot] = h | 0;
    return id;
  }

  /** Id of a name given as a string (escaped names, callers outside the parser). */
  id(name: string, offset: number): number {
    return this.idAt(name, 0, name.length, offset);
  }

  private append(name: string, hash: number, offset: number): number {
    const id = this.names.length;
    this.names.push(name);
    this.firstOffsets.push(offset);
    this.lookup.add(hash);
    this.locs = null;
    return id;
  }

  /** Lower-case name → id, as a Map that fills itself on first use (a million-net cell may never be asked). */
  get index(): Map<string, number> {
    return (this.map ??= new NameIndex(this.names));
  }

  /** First-mention locations, computed once. */
  locations(cursor: LocationCursor): SourceLoc[] {
    if (!this.locs) this.locs = this.firstOffsets.map((o) => cursor.at(o));
    return this.locs;
  }
}

/** A Map from lower-case names to ids that fills itself from a (growing) name list whenever it is read. */
class NameIndex extends Map<string, number> {
  private filled = 0;

  constructor(private readonly names: readonly string[]) {
    super();
  }

  private fill(): this {
    if (this.filled < this.names.length) this.fillTo(this.names.length);
    return this;
  }

  private fillTo(n: number): void {
    for (let id = this.filled; id < n; id++) {
      const key = foldAscii(this.names[id]);
      if (!super.has(key)) super.set(key, id);
    }
    this.filled = n;
  }

  override get(key: string): number | undefined {
    return this.fill() && super.get(key);
  }
  override has(key: string): boolean {
    return this.fill() && super.has(key);
  }
  override get size(): number {
    return this.fill() && super.size;
  }
  override set(key: string, value: number): this {
    this.fill();
    return super.set(key, value);
  }
  override delete(key: string): boolean {
    return this.fill() && super.delete(key);
  }
  override clear(): void {
    this.fill();
    super.clear();
  }
  override forEach(f: (value: number, key: string, map: Map<string, number>) => void, thisArg?: unknown): void {
    this.fill();
    super.forEach(f, thisArg);
  }
  override entries(): MapIterator<[string, number]> {
    return this.fill() && super.entries();
  }
  override keys(): MapIterator<string> {
    return this.fill() && super.keys();
  }
  override values(): MapIterator<number> {
    return this.fill() && super.values();
  }
  override [Symbol.iterator](): MapIterator<[string, number]> {
    return this.fill() && super[Symbol.iterator]();
  }
}
