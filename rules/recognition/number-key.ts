// Structural signatures as numbers: a key is written into one reused buffer, hashed,
// and looked up in a table that compares candidate keys number by number. A memo
// over hundreds of thousands of neighbourhoods then builds no strings and keeps a copy
// of a key only when it is new.

/** A key under construction. Doubles are kept exactly, so two keys are equal exactly when every number is. */
export class NumberKey {
  private buffer = new Float64Array(256);
  private words = new Int32Array(this.buffer.buffer);
  length = 0;

  reset(): void {
    this.length = 0;
  }

  push(value: number): void {
    if (this.length === this.buffer.length) {
      const grown = new Float64Array(this.buffer.length * 2);
      grown.set(this.buffer);
      this.buffer = grown;
      this.words = new Int32Array(grown.buffer);
    }
    this.buffer[this.length++] = value;
  }

  /** FNV-1a over the key's bytes, taken as 32-bit words. */
  hash(): number {
    let h = 0x811c9dc5;
    const w = this.words;
    for (let i = 0; i < 2 * this.length; i++) h = Math.imul(h ^ w[i], 0x01000193);
    return h;
  }

  equals(other: Float64Array): boolean {
    if (other.length !== this.length) return false;
    const b = this.buffer;
    for (let i = 0; i < other.length; i++) if (other[i] !== b[i]) return false;
    return true;
  }

  copy(): Float64Array {
    return this.buffer.slice(0, this.length);
  }
}

/** Values by key: buckets by hash, entries compared number by number. */
export class NumberKeyTable<V> {
  private readonly buckets = new Map<number, { key: Float64Array; value: V }[]>();
  size = 0;

  /** The value stored under the key now in `key`, computed (and stored under a copy of the key) when there is none. */
  getOrCompute(key: NumberKey, compute: () => V): V {
    const hash = key.hash();
    let bucket = this.buckets.get(hash);
    if (bucket) for (const e of bucket) if (key.equals(e.key)) return e.value;
    const stored = key.copy();
    const value = compute();
    if (!bucket) this.buckets.set(hash, (bucket = []));
    bucket.push({ key: stored, value });
    this.size++;
    return value;
  }
}

/** Small integer codes of strings (model names, kinds), the same for the whole process. */
export class StringCodes {
  private readonly codes = new Map<string, number>();
  of(text: string): number {
    let code = this.codes.get(text);
    if (code === undefined) this.codes.set(text, (code = this.codes.size));
    return code;
  }
}
