// Hashing of text ranges, so that names and numbers that recur millions of times
// are recognised in place, without cutting a new string out of the source for
// every mention. ASCII letters may be folded to lower case (netlist names are
// case-insensitive); other characters compare exactly.

const SEED = 0x811c9dc5;
const MULTIPLIER = 0x9e3779b1;

/**
 * A multiplicative hash of the range, two UTF-16 units per step (half the dependent
 * multiplications of a byte-at-a-time hash), with a final avalanche so that the low bits
 * that index the tables depend on every character.
 */
export function hashRange(text: string, start: number, end: number, fold: boolean): number {
  let h = SEED;
  let i = start;
  for (; i + 1 < end; i += 2) {
    let a = text.charCodeAt(i);
    let b = text.charCodeAt(i + 1);
    if (fold) {
      if (a >= 65 && a <= 90) a |= 0x20;
      if (b >= 65 && b <= 90) b |= 0x20;
    }
    h = Math.imul(h ^ (a | (b << 16)), MULTIPLIER);
  }
  if (i < end) {
    let a = text.charCodeAt(i);
    if (fold && a >= 65 && a <= 90) a |= 0x20;
    h = Math.imul(h ^ a, MULTIPLIER);
  }
  h ^= h >>> 16;
  h = Math.imul(h, 0x85ebca6b);
  h ^= h >>> 13;
  return h >>> 0;
}

export function rangeEquals(text: string, start: number, end: number, other: string, fold: boolean): boolean {
  const n = end - start;
  if (other.length !== n) return false;
  for (let i = 0; i < n; i++) {
    let a = text.charCodeAt(start + i);
    let b = other.charCodeAt(i);
    if (a !== b) {
      if (!fold) return false;
      if (a >= 65 && a <= 90) a |= 0x20;
      if (b >= 65 && b <= 90) b |= 0x20;
      if (a !== b) return false;
    }
  }
  return true;
}

/** Lower-case ASCII letters only, matching the folding above. */
export function foldAscii(text: string): string {
  for (let i = 0; i < text.length; i++) {
    const c = text.charCodeAt(i);
    if (c >= 65 && c <= 90) return text.replace(/[A-Z]+/g, (m) => m.toLowerCase());
  }
  return text;
}

/**
 * Open-addressing map from text ranges to entry numbers 0, 1, 2 …; the caller keeps
 * the entries' strings and data in its own arrays, indexed by entry number. Each
 * slot holds an entry and its hash side by side, so a probe touches one cache line
 * and reads the key string only on a hash match.
 */
export class RangeIndex {
  /** Pairs: entry + 1 (0 = empty), hash. */
  private slots: Int32Array;
  /** Hash of each entry, as int32 (a plain array would box every hash above 2^31). */
  private hashes = new Int32Array(16);
  private count = 0;
  private mask: number;

  constructor(
    private readonly keyOf: (entry: number) => string,
    readonly fold: boolean,
    initialSlots = 1024,
  ) {
    this.slots = new Int32Array(initialSlots * 2);
    this.mask = initialSlots - 1;
  }

  get size(): number {
    return this.count;
  }

  /** Entry whose key equals the range, or -1. */
  find(text: string, start: number, end: number, hash = hashRange(text, start, end, this.fold)): number {
    const slots = this.slots;
    const h = hash | 0;
    for (let i = hash & this.mask; ; i = (i + 1) & this.mask) {
      const v = slots[2 * i];
      if (v === 0) return -1;
      if (slots[2 * i + 1] === h && rangeEquals(text, start, end, this.keyOf(v - 1), this.fold)) return v - 1;
    }
  }

  /** Record the entry numbered `size` (the caller has already stored its key). */
  add(hash: number): number {
    const entry = this.count++;
    if (entry === this.hashes.length) {
      const grown = new Int32Array(entry * 2);
      grown.set(this.hashes);
      this.hashes = grown;
    }
    this.hashes[entry] = hash | 0;
    if (this.count * 2 > this.mask + 1) this.grow();
    else this.place(entry, hash);
    return entry;
  }

  private place(entry: number, hash: number): void {
    const slots = this.slots;
    let i = hash & this.mask;
    while (slots[2 * i] !== 0) i = (i + 1) & this.mask;
    slots[2 * i] = entry + 1;
    slots[2 * i + 1] = hash | 0;
  }

  private grow(): void {
    const n = (this.mask + 1) * 2;
    this.slots = new Int32Array(n * 2);
    this.mask = n - 1;
    for (let e = 0; e < this.count; e++) this.place(e, this.hashes[e]);
  }
}
