// Node names of one body of statements (a file's top level, a `.subckt`, a `.lib`
// section) interned to small integers as they are parsed, case-insensitively, with
// the spelling and offset of their first mention. Statements refer to nodes by
// these ids, so elaboration maps names once per body instead of once per mention.

import type { SourceLoc } from './design';
import { LocationCursor } from './source';

export class NameTable {
  /** Each name as first written; index = id. */
  readonly names: string[] = [];
  /** Offset (in the body's file) of each name's first mention. */
  readonly firstOffsets: number[] = [];
  /** Lower-case name → id. */
  readonly index = new Map<string, number>();
  /** Spellings that are not all lower case → id (so that `VGND` needs one lookup, not a lower-casing and two). */
  private readonly spellings = new Map<string, number>();
  private locs: SourceLoc[] | null = null;

  get size(): number {
    return this.names.length;
  }

  id(name: string, offset: number): number {
    let id = this.index.get(name);
    if (id !== undefined) return id;
    const lower = name.toLowerCase();
    if (lower !== name) {
      id = this.spellings.get(name) ?? this.index.get(lower);
      if (id !== undefined) {
        this.spellings.set(name, id);
        return id;
      }
      this.spellings.set(name, this.names.length);
    }
    id = this.names.length;
    this.names.push(name);
    this.firstOffsets.push(offset);
    this.index.set(lower, id);
    return id;
  }

  /** First-mention locations, computed once. */
  locations(cursor: LocationCursor): SourceLoc[] {
    if (!this.locs) this.locs = this.firstOffsets.map((o) => cursor.at(o));
    return this.locs;
  }
}
