// Netlist tokens.
//
// SPICE is a card language: a statement is one logical line (physical lines joined
// by `+` continuations), and its meaning is positional. The token set is small on
// purpose, for speed on million-line extractions:
//
//   Fields        a run of plain whitespace-separated fields on one logical line,
//                 continuations included (one token per typical element line, not
//                 ten); the fields' positions go to `fieldStore`, and the token's
//                 payload is the index of its first field there. No string is cut
//                 out per field: the parser reads names and numbers in place.
//   Brace/Quoted  an expression `{…}` or a quoted string/expression `'…'` `"…"`
//   DollarModel   CDL `$[model]`
//   LParen/RParen the groups of `.model … (…)` and source functions `pulse(…)`
//   Directive     CDL comment directives `*.PININFO`, `*.SCALE`, `*.GLOBAL`
//   FieldsEnd     a Fields run that ends its statement, line break included
//   Newline       end of a statement, with any blank and `*` comment lines after it
//   Unclosed      `{`, `'` or `"` that never closes on its line; Stray: a lone `}`
//
// Skipped: inline whitespace (commas count as whitespace, as in SPICE3), `+`
// continuations with any comment lines between them, `*` comment lines, `$`/`;`
// inline comments, and CDL `$name=value` annotations.

import { createToken, Lexer, type CustomPatternMatcherReturn, type TokenType } from 'chevrotain';

/** Positions of the fields of the text being tokenized, shared by all its Fields tokens. */
export class FieldStore {
  starts = new Int32Array(4096);
  ends = new Int32Array(4096);
  /** 1 where the field holds a backslash escape (`B_reg\[3\]`), to be resolved when read as a name. */
  escaped = new Uint8Array(4096);
  /** Position of the field's first `=` relative to its start, or -1 (found while scanning, so never searched again). */
  equals = new Int32Array(4096);
  /** For the first field of each run: the index after its last field. */
  runEnds = new Int32Array(4096);
  count = 0;

  reset(): void {
    this.count = 0;
  }

  push(start: number, end: number, equals: number, escaped: boolean): void {
    if (this.count === this.starts.length) this.grow();
    const i = this.count++;
    this.starts[i] = start;
    this.ends[i] = end;
    this.equals[i] = equals;
    this.escaped[i] = escaped ? 1 : 0;
  }

  private grow(): void {
    const n = this.starts.length * 2;
    const grow32 = (a: Int32Array) => {
      const b = new Int32Array(n);
      b.set(a);
      return b;
    };
    this.starts = grow32(this.starts);
    this.ends = grow32(this.ends);
    this.runEnds = grow32(this.runEnds);
    this.equals = grow32(this.equals);
    const e = new Uint8Array(n);
    e.set(this.escaped);
    this.escaped = e;
  }
}

/** The field positions of the most recent `tokenize` call (valid until the next one). */
export const fieldStore = new FieldStore();

// Characters that end a field. Everything else, control characters and U+FFFD
// included, is a field character: junk reads as names and fails later with a
// clear message instead of stopping the lexer.
const ENDS_FIELD = new Uint8Array(65536);
const INLINE_SPACE = new Uint8Array(65536);
for (const ch of ' \t\f\v,\u00a0\ufeff\u1680\u2028\u2029\u202f\u205f\u3000') INLINE_SPACE[ch.charCodeAt(0)] = 1;
for (let c = 0x2000; c <= 0x200a; c++) INLINE_SPACE[c] = 1;
for (let c = 0; c < 65536; c++) if (INLINE_SPACE[c]) ENDS_FIELD[c] = 1;
for (const ch of '\r\n{}()\'";') ENDS_FIELD[ch.charCodeAt(0)] = 1;

/** What the field scanner does with each character, one table read per character: 0 part of the field, 1 ends it, 2 a backslash, 3 an `=`. */
const FIELD_CHAR = new Uint8Array(65536);
for (let c = 0; c < 65536; c++) if (ENDS_FIELD[c]) FIELD_CHAR[c] = 1;
FIELD_CHAR[92] = 2;
FIELD_CHAR[61] = 3;

const DOLLAR = 36;
const CR = 13;
const LF = 10;

const DIRECTIVE = /\*\.(?:pininfo|scale|global)(?![A-Za-z0-9_])/iy;

function atLineStart(text: string, offset: number): boolean {
  for (let i = offset - 1; i >= 0; i--) {
    const c = text.charCodeAt(i);
    if (c === LF || c === CR) return true;
    if (c !== 32 && c !== 9) return false;
  }
  return true;
}

/**
 * From a line break, skip blank and `*` comment lines; report where that run ends
 * and whether the next line continues the statement with `+`. Memoised for the
 * Continuation/Newline pair, which both start at the same line break.
 */
class BreakScanner {
  private from = -1;
  end = 0;
  continues = false;

  /** Forget the memo; called before each new text is tokenized. */
  reset(): void {
    this.from = -1;
  }

  scan(text: string, offset: number): void {
    if (offset === this.from) return;
    this.from = offset;
    const n = text.length;
    let i = offset;
    for (;;) {
      const c = text.charCodeAt(i);
      if (c === CR) {
        i++;
        if (text.charCodeAt(i) === LF) i++;
      } else if (c === LF) i++;
      else break;
      let j = i;
      while (j < n) {
        const d = text.charCodeAt(j);
        if (d === 32 || d === 9) j++;
        else break;
      }
      const d = text.charCodeAt(j);
      if (d === LF || d === CR) {
        i = j;
        continue;
      }
      if (d === 42 /* * */) {
        DIRECTIVE.lastIndex = j;
        if (DIRECTIVE.test(text)) break;
        let k = j;
        while (k < n) {
          const e = text.charCodeAt(k);
          if (e === LF || e === CR) break;
          k++;
        }
        i = k;
        continue;
      }
      if (d === 43 /* + */) {
        this.end = j + 1;
        this.continues = true;
        return;
      }
      break;
    }
    this.end = i;
    this.continues = false;
  }
}

const breaks = new BreakScanner();

// One result array for every custom match: the lexer reads the image and payload at once
// and keeps neither the array nor a reference to it, so a million lines cost no million arrays.
const matched = [''] as unknown as CustomPatternMatcherReturn & { payload?: unknown };

function match(text: string, offset: number, end: number, payload?: unknown): CustomPatternMatcherReturn {
  matched[0] = text.substring(offset, end);
  matched.payload = payload;
  return matched;
}

/** A field's text with backslash escapes resolved (`B_reg\[106\]` → `B_reg[106]`). */
export function unescapeField(word: string): string {
  return word.replace(/\\(.)/gs, '$1');
}

/**
 * One scan of a run of fields, shared by the FieldsEnd and Fields patterns that are
 * tried in turn at the same offset: where the run ends, and whether the statement
 * ends with it (a line break that no `+` continues, or the end of the text).
 */
class FieldScanner {
  private from = -1;
  first = 0;
  lastEnd = 0;
  /** End of the line break (and the blank and comment lines after it) when the run ends the statement; -1 otherwise. */
  statementEnd = -1;

  reset(): void {
    this.from = -1;
  }

  /** False when no run of fields starts at `offset`. */
  scan(text: string, offset: number): boolean {
    if (offset === this.from) return true;
    const n = text.length;
    let i = offset;
    let c = text.charCodeAt(i);
    if (ENDS_FIELD[c] || c === DOLLAR) return false;
    if (c === 42 /* * */ && atLineStart(text, offset)) return false;
    const store = fieldStore;
    const first = store.count;
    let lastEnd = i;
    let statementEnd = -1;
    for (;;) {
      const start = i;
      let escaped = false;
      let equals = -1;
      while (i < n) {
        const k = FIELD_CHAR[text.charCodeAt(i)];
        if (k !== 0) {
          if (k === 1) break;
          if (k === 2 && i + 1 < n && text.charCodeAt(i + 1) !== LF && text.charCodeAt(i + 1) !== CR) {
            escaped = true;
            i += 2;
            continue;
          }
          if (k === 3 && equals < 0) equals = i - start;
        }
        i++;
      }
      store.push(start, i, equals, escaped);
      lastEnd = i;
      for (;;) {
        while (i < n && INLINE_SPACE[text.charCodeAt(i)]) i++;
        c = text.charCodeAt(i);
        if (c === LF || c === CR) {
          breaks.scan(text, i);
          if (breaks.continues) {
            i = breaks.end;
            continue;
          }
          statementEnd = breaks.end;
        } else if (i >= n) statementEnd = n;
        break;
      }
      if (statementEnd >= 0 || ENDS_FIELD[c] || c === DOLLAR) break;
    }
    store.runEnds[first] = store.count;
    this.from = offset;
    this.first = first;
    this.lastEnd = lastEnd;
    this.statementEnd = statementEnd;
    return true;
  }
}

const runs = new FieldScanner();

function fieldStartHints(): number[] {
  const hints: number[] = [];
  for (let c = 0; c < 256; c++) if (!ENDS_FIELD[c] && c !== DOLLAR) hints.push(c);
  // Chevrotain buckets code points above 255 by 255; one representative per bucket.
  for (let c = 256; c < 65536; c += 255) hints.push(c);
  hints.push(65535);
  return hints;
}

export const Whitespace = createToken({
  name: 'Whitespace',
  pattern: /[ \t\f\v,\u00a0\ufeff\u1680\u2000-\u200a\u2028\u2029\u202f\u205f\u3000]+/,
  group: Lexer.SKIPPED,
});
export const LParen = createToken({ name: 'LParen', pattern: '(' });
export const RParen = createToken({ name: 'RParen', pattern: ')' });
export const Stray = createToken({ name: 'Stray', pattern: '}' });
export const Continuation = createToken({
  name: 'Continuation',
  group: Lexer.SKIPPED,
  line_breaks: true,
  start_chars_hint: ['\n', '\r'],
  pattern: {
    exec: (text: string, offset: number) => {
      breaks.scan(text, offset);
      return breaks.continues ? match(text, offset, breaks.end) : null;
    },
  },
});
export const Newline = createToken({
  name: 'Newline',
  line_breaks: true,
  start_chars_hint: ['\n', '\r'],
  pattern: {
    exec: (text: string, offset: number) => {
      breaks.scan(text, offset);
      return breaks.continues ? null : match(text, offset, breaks.end);
    },
  },
});
export const Directive = createToken({
  name: 'Directive',
  start_chars_hint: ['*'],
  pattern: {
    exec: (text: string, offset: number) => {
      if (!atLineStart(text, offset)) return null;
      DIRECTIVE.lastIndex = offset;
      return DIRECTIVE.test(text) ? match(text, offset, DIRECTIVE.lastIndex) : null;
    },
  },
});
export const Comment = createToken({
  name: 'Comment',
  group: Lexer.SKIPPED,
  start_chars_hint: ['*'],
  pattern: {
    exec: (text: string, offset: number) => {
      if (!atLineStart(text, offset)) return null;
      let end = offset;
      while (end < text.length) {
        const c = text.charCodeAt(end);
        if (c === LF || c === CR) break;
        end++;
      }
      return match(text, offset, end);
    },
  },
});
export const DollarModel = createToken({ name: 'DollarModel', pattern: /\$\[[^\]\r\n]*\]/ });
export const DollarAnnotation = createToken({ name: 'DollarAnnotation', pattern: /\$[A-Za-z_][A-Za-z0-9_]*=[^\s$;]*/, group: Lexer.SKIPPED });
export const InlineComment = createToken({ name: 'InlineComment', pattern: /[$;][^\r\n]*/, group: Lexer.SKIPPED });
export const Brace = createToken({ name: 'Brace', pattern: /\{[^{}\r\n]*\}/ });
export const Quoted = createToken({ name: 'Quoted', pattern: /'[^'\r\n]*'|"[^"\r\n]*"/ });
export const Unclosed = createToken({ name: 'Unclosed', pattern: /[{'"][^\r\n]*/ });
/** A run of fields that ends its statement, line break included: most element lines are this one token. */
export const FieldsEnd = createToken({
  name: 'FieldsEnd',
  line_breaks: true,
  start_chars_hint: fieldStartHints(),
  pattern: {
    exec: (text: string, offset: number) =>
      runs.scan(text, offset) && runs.statementEnd >= 0 ? match(text, offset, runs.statementEnd, runs.first) : null,
  },
});
export const Fields = createToken({
  name: 'Fields',
  line_breaks: true,
  start_chars_hint: fieldStartHints(),
  pattern: {
    exec: (text: string, offset: number) => (runs.scan(text, offset) && runs.statementEnd < 0 ? match(text, offset, runs.lastEnd, runs.first) : null),
  },
});

/** Order matters: the first pattern that matches wins. */
export const netlistTokens: TokenType[] = [
  Whitespace,
  LParen,
  RParen,
  Stray,
  Continuation,
  Newline,
  Directive,
  Comment,
  DollarModel,
  DollarAnnotation,
  InlineComment,
  Brace,
  Quoted,
  Unclosed,
  FieldsEnd,
  Fields,
];

export const netlistLexer = new Lexer(netlistTokens, {
  positionTracking: 'onlyOffset',
  ensureOptimizations: true,
  // Every character belongs to some token, so the lexer cannot fail; keep recovery on anyway.
  recoveryEnabled: true,
});

/** Tokenize one piece of text (a whole file or a chunk from `statementChunks`). */
export function tokenize(text: string) {
  breaks.reset();
  runs.reset();
  fieldStore.reset();
  return netlistLexer.tokenize(text);
}

/**
 * Split a file's text into pieces that start at a statement boundary (a line that
 * begins with a letter or a dot), so that each piece is tokenized and parsed on
 * its own and a million-line file never holds all its tokens at once.
 */
export function* statementChunks(text: string, target = 64 * 1024): Generator<{ start: number; end: number }> {
  let start = 0;
  const n = text.length;
  while (start < n) {
    let end = start + target;
    if (end >= n) end = n;
    else {
      for (;;) {
        const nl = text.indexOf('\n', end);
        if (nl < 0) {
          end = n;
          break;
        }
        end = nl + 1;
        const c = text.charCodeAt(end);
        if ((c >= 65 && c <= 90) || (c >= 97 && c <= 122) || c === 46) break;
      }
    }
    yield { start, end };
    start = end;
  }
}
