// Structural signatures as numbers: a key is written into one reused buffer, hashed,
// and looked up in a table that compares candidate keys number by number. A memo over
// hundreds of thousands of stages or dynamic-node neighbourhoods then builds no strings
// and keeps a copy of a key only when it is new.

/** A key under construction. Doubles are kept exactly, so two keys are equal exactly when every number is. */
export class NumberKey {
  protected values = new Float64Array(256);
  private words = new Int32Array(this.values.buffer);
  length = 0;

  reset(): void {
    this.length = 0;
  }

  push(value: number): void {
    if (this.length === this.values.length) {
      const grown = new Float64Array(this.values.length * 2);
      grown.set(this.values);
      this.values = grown;
      this.words = new Int32Array(grown.buffer);
    }
    this.values[this.length++] = value;
  }

  /** FNV-1a over the key's numbers, taken as 32-bit halves. */
  hash(): number {
    let h = 0x811c9dc5;
    const w = this.words;
    for (let i = 0; i < 2 * this.length; i++) h = Math.imul(h ^ w[i], 0x01000193);
    return h;
  }

  /** Whether `other` holds the key now in the buffer. */
  equals(other: Float64Array): boolean {
    if (other.length !== this.length) return false;
    const v = this.values;
    for (let i = 0; i < other.length; i++) if (other[i] !== v[i]) return false;
    return true;
  }

  copy(): Float64Array {
    return this.values.slice(0, this.length);
  }
}

/** Values by key: buckets by hash, entries compared number by number. */
export class NumberKeyTable<V> {
  private readonly buckets = new Map<number, { key: Float64Array; value: V }[]>();
  size = 0;

  /**
   * The value stored under the key now in `key`; when there is none, `compute()` gives it and it is stored under a copy
   * of the key taken first (so `compute` may reuse the key's buffer).
   */
  getOrCompute(key: NumberKey, compute: () => V): V {
    const hash = key.hash();
    const found = this.buckets.get(hash);
    if (found) for (const e of found) if (key.equals(e.key)) return e.value;
    const stored = key.copy();
    const value = compute();
    const bucket = this.buckets.get(hash);
    if (bucket) bucket.push({ key: stored, value });
    else this.buckets.set(hash, [{ key: stored, value }]);
    this.size++;
    return value;
  }
}

const lowerNames = new Map<string, string>();

/** A model name in lower case (SPICE names are case-insensitive), converted once per distinct spelling. */
export function lowerCaseModel(name: string): string {
  let lower = lowerNames.get(name);
  if (lower === undefined) {
    lower = name.toLowerCase();
    if (lowerNames.size < 4096) lowerNames.set(name, lower);
  }
  return lower;
}

const modelCodes = new Map<string, number>();

/** A number per model name, the same for every spelling of it, for signatures. */
export function modelCode(name: string): number {
  const lower = lowerCaseModel(name);
  let code = modelCodes.get(lower);
  if (code === undefined) modelCodes.set(lower, (code = modelCodes.size));
  return code;
}
