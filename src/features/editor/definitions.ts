// Where a subcircuit is defined, for go-to-definition from an `X` instance line. Plain text
// work over the run's files, no Monaco: `.subckt NAME` (or `.macro NAME`) lines, matched
// case-insensitively as SPICE matches names, and the subcircuit an instance names: after a CDL
// `/`, else the last positional word before its parameters (SPICE3 `Xname nodes… subckt params`).

export interface NetlistText {
  path: string;
  text: string;
}

export interface Definition {
  name: string;
  path: string;
  /** 1-based, of the `.subckt` line and of the name on it. */
  line: number;
  column: number;
}

const SUBCKT_LINE = /^(\s*\.(?:subckt|macro)\s+)([^\s$;(]+)/i;

/** Every `.subckt` of the files by lower-case name; the first definition in file order wins, as a reader meets it first. */
export function indexSubcircuits(files: readonly NetlistText[]): Map<string, Definition> {
  const index = new Map<string, Definition>();
  for (const file of files) {
    const lines = file.text.split(/\r\n|\r|\n/);
    for (let i = 0; i < lines.length; i++) {
      const m = SUBCKT_LINE.exec(lines[i]);
      if (!m) continue;
      const key = m[2].toLowerCase();
      if (!index.has(key)) index.set(key, { name: m[2], path: file.path, line: i + 1, column: m[1].length + 1 });
    }
  }
  return index;
}

export interface Reference {
  name: string;
  /** 1-based line and columns of the name (end exclusive), as Monaco ranges want them. */
  line: number;
  startColumn: number;
  endColumn: number;
}

interface Word {
  text: string;
  line: number;
  start: number;
}

/** Words of one physical line, without its comment; `=`, `(`, `)` and `,` stand apart. */
function wordsOf(text: string, line: number, continuation: boolean): Word[] {
  const words: Word[] = [];
  const re = /[^\s=(),]+|=/g;
  let body = text;
  const comment = /(^|\s)[$;]/.exec(body);
  if (comment) body = body.slice(0, comment.index + comment[1].length);
  let m: RegExpExecArray | null;
  while ((m = re.exec(body))) {
    if (continuation && words.length === 0 && m[0] === '+') continue;
    let word = m[0];
    let start = m.index;
    if (continuation && words.length === 0 && word.startsWith('+')) {
      word = word.slice(1);
      start += 1;
      if (!word) continue;
    }
    words.push({ text: word, line, start: start + 1 });
  }
  return words;
}

/** The word naming the subcircuit of an instance statement, or null if it is not an instance. */
function subcircuitWord(words: Word[]): Word | null {
  if (words.length < 2 || !/^x/i.test(words[0].text)) return null;
  const slash = words.findIndex((w, i) => i > 0 && w.text.startsWith('/'));
  if (slash > 0) {
    const w = words[slash];
    if (w.text.length > 1) return { text: w.text.slice(1), line: w.line, start: w.start + 1 };
    return words[slash + 1] ?? null;
  }
  let last: Word | null = null;
  for (let i = 1; i < words.length; i++) {
    const w = words[i];
    if (w.text === '=' || w.text.includes('=') || words[i + 1]?.text === '=' || /^params:$/i.test(w.text)) break;
    last = w;
  }
  return last;
}

/**
 * The subcircuit reference under the cursor, if the cursor is on the subcircuit name of an
 * instance statement (continuation lines `+ …` included).
 */
export function referenceAt(lines: readonly string[], lineNumber: number, column: number): Reference | null {
  let first = lineNumber - 1;
  while (first > 0 && /^\s*\+/.test(lines[first])) first--;
  if (first < 0 || /^\s*[*.+]/.test(lines[first] ?? '')) return null;
  const words: Word[] = [];
  for (let i = first; i < lines.length && (i === first || /^\s*\+/.test(lines[i])); i++) words.push(...wordsOf(lines[i], i + 1, i !== first));
  const target = subcircuitWord(words);
  if (!target || target.line !== lineNumber) return null;
  const end = target.start + target.text.length;
  if (column < target.start || column > end) return null;
  return { name: target.text, line: target.line, startColumn: target.start, endColumn: end };
}

export function findDefinition(files: readonly NetlistText[], path: string, lineNumber: number, column: number, index = indexSubcircuits(files)): { reference: Reference; definition: Definition } | null {
  const file = files.find((f) => f.path === path);
  if (!file) return null;
  const reference = referenceAt(file.text.split(/\r\n|\r|\n/), lineNumber, column);
  if (!reference) return null;
  const definition = index.get(reference.name.toLowerCase());
  return definition ? { reference, definition } : null;
}
