// One logical line as the parser's actions collect it: a sequence of items
// (fields, expressions, parentheses, annotations) given by their position in the
// piece of text being parsed. Decoders read items in place; `word(i)` cuts out a
// string only when one is really needed.

import { fieldStore, unescapeField } from './lexer';

export enum Kind {
  Word = 0,
  Brace = 1,
  Quoted = 2,
  DollarModel = 3,
  Open = 4,
  Close = 5,
  Unclosed = 6,
  Stray = 7,
}

export class Line {
  /** The piece of text the positions refer to, and its offset in the file. */
  text = '';
  base = 0;
  private n = 0;
  /** When the whole line is one Fields token: index of its first field in `fieldStore`; otherwise -1. */
  private run = -1;
  private readonly starts: number[] = [];
  private readonly ends: number[] = [];
  private readonly kinds: Kind[] = [];
  private readonly escapes: boolean[] = [];
  private readonly equals: number[] = [];
  private readonly words: string[] = [];
  /** The line number (`stamp`) each entry of `words` was cut for: a stale entry is never read, so nothing is emptied per line. */
  private wordStamps = new Int32Array(64);
  private stamp = 1;
  /** Whether the arrays above hold items (a line with anything but a single Fields token). */
  private listed = false;

  clear(text: string, base: number): void {
    this.text = text;
    this.base = base;
    this.n = 0;
    this.run = -1;
    // Most lines never use the arrays; emptying them only when used keeps this cheap.
    if (this.listed) {
      this.starts.length = 0;
      this.ends.length = 0;
      this.kinds.length = 0;
      this.escapes.length = 0;
      this.equals.length = 0;
      this.listed = false;
    }
    if (++this.stamp === 0x40000000) {
      this.wordStamps.fill(0);
      this.stamp = 1;
    }
  }

  /** Append the fields of a Fields token (its payload is the index of its first field). */
  addFields(first: number): void {
    const end = fieldStore.runEnds[first];
    if (this.n === 0) {
      this.run = first;
      this.n = end - first;
      return;
    }
    this.materialise();
    for (let f = first; f < end; f++) this.push(fieldStore.starts[f], fieldStore.ends[f], Kind.Word, fieldStore.escaped[f] === 1, fieldStore.equals[f]);
  }

  /** Append a non-field item by the range of its content. */
  addItem(kind: Kind, start: number, end: number): void {
    this.materialise();
    this.push(start, end, kind, false, -1);
  }

  private push(start: number, end: number, kind: Kind, escaped: boolean, equals: number): void {
    this.listed = true;
    this.starts.push(start);
    this.ends.push(end);
    this.kinds.push(kind);
    this.escapes.push(escaped);
    this.equals.push(equals);
    this.n++;
  }

  private materialise(): void {
    if (this.run < 0) return;
    const first = this.run;
    const count = this.n;
    this.run = -1;
    this.n = 0;
    for (let f = first; f < first + count; f++) this.push(fieldStore.starts[f], fieldStore.ends[f], Kind.Word, fieldStore.escaped[f] === 1, fieldStore.equals[f]);
  }

  get length(): number {
    return this.n;
  }

  kind(i: number): Kind {
    return this.run >= 0 ? Kind.Word : this.kinds[i];
  }

  isWord(i: number): boolean {
    return i < this.n && (this.run >= 0 || this.kinds[i] === Kind.Word);
  }

  allWords(from: number, to: number): boolean {
    if (to > this.n) return false;
    if (this.run >= 0) return true;
    for (let i = from; i < to; i++) if (this.kinds[i] !== Kind.Word) return false;
    return true;
  }

  /** Position of item `i` within `text`. */
  start(i: number): number {
    return this.run >= 0 ? fieldStore.starts[this.run + i] : this.starts[i];
  }

  end(i: number): number {
    return this.run >= 0 ? fieldStore.ends[this.run + i] : this.ends[i];
  }

  escaped(i: number): boolean {
    return this.run >= 0 ? fieldStore.escaped[this.run + i] === 1 : this.escapes[i];
  }

  /** Offset of item `i` in its file (clamped to the last item). */
  at(i: number): number {
    return this.base + this.start(Math.min(i, this.n - 1));
  }

  /** Offset in the file just after the last item. */
  lineEnd(): number {
    return this.base + this.end(this.n - 1);
  }

  /** The item's text: a field with escapes resolved, or an expression's content. */
  word(i: number): string {
    if (i >= this.wordStamps.length) {
      const grown = new Int32Array(Math.max(2 * this.wordStamps.length, i + 1));
      grown.set(this.wordStamps);
      this.wordStamps = grown;
    }
    if (this.wordStamps[i] === this.stamp) return this.words[i];
    let w = this.text.substring(this.start(i), this.end(i));
    if (this.escaped(i)) w = unescapeField(w);
    this.words[i] = w;
    this.wordStamps[i] = this.stamp;
    return w;
  }

  charCode(i: number, k = 0): number {
    return this.text.charCodeAt(this.start(i) + k);
  }

  size(i: number): number {
    return this.end(i) - this.start(i);
  }

  /** Position of the first `=` in field `i`, relative to its start, or -1 (non-fields: -1). */
  eqIndex(i: number): number {
    return this.run >= 0 ? fieldStore.equals[this.run + i] : this.equals[i];
  }

  /** Whether field `i` is `lower` in any letter case (ASCII). */
  is(i: number, lower: string): boolean {
    if (!this.isWord(i) || this.size(i) !== lower.length) return false;
    const s = this.start(i);
    for (let k = 0; k < lower.length; k++) {
      let c = this.text.charCodeAt(s + k);
      if (c >= 65 && c <= 90) c |= 0x20;
      if (c !== lower.charCodeAt(k)) return false;
    }
    return true;
  }

  describe(i: number): string {
    const w = this.word(i).slice(0, 20);
    switch (this.kind(i)) {
      case Kind.Brace:
        return `expression {${w}}`;
      case Kind.Quoted:
        return `quoted text '${w}'`;
      case Kind.DollarModel:
        return `$[${w}]`;
      case Kind.Open:
        return '"("';
      case Kind.Close:
        return '")"';
      default:
        return `"${w}"`;
    }
  }
}
