// Paths inside an uploaded set of files: forward slashes, relative, no `.` or `..`
// segments. An include may only name a file of the set; a path that climbs out of
// the set's root or is absolute is refused.

/** Normalise a path given by a caller or written in a netlist; null when it leaves the root or is absolute. */
export function normalizePath(path: string): string | null {
  const p = path.replace(/\\/g, '/');
  if (p.startsWith('/') || /^[A-Za-z]:\//.test(p) || p.startsWith('~')) return null;
  const out: string[] = [];
  for (const seg of p.split('/')) {
    if (seg === '' || seg === '.') continue;
    if (seg === '..') {
      if (out.length === 0) return null;
      out.pop();
    } else out.push(seg);
  }
  return out.length ? out.join('/') : null;
}

export function dirname(path: string): string {
  const i = path.lastIndexOf('/');
  return i < 0 ? '' : path.slice(0, i);
}

/** Resolve an include written in `fromFile` (itself a normalised set path). */
export function resolveInclude(fromFile: string, written: string): { path: string } | { outside: true } {
  const raw = written.replace(/\\/g, '/');
  if (raw.startsWith('/') || /^[A-Za-z]:\//.test(raw) || raw.startsWith('~')) return { outside: true };
  const dir = dirname(fromFile);
  const joined = normalizePath(dir ? `${dir}/${raw}` : raw);
  return joined === null ? { outside: true } : { path: joined };
}

const INCLUDE_LINE = /^[ \t]*\.(?:include|inc|lib)[ \t]+(?:"([^"\r\n]*)"|'([^'\r\n]*)'|([^\s'"]+))/gim;

/**
 * The file names a netlist's `.include`/`.inc`/`.lib` lines mention, as written,
 * found without a full parse (so that a command line can load them before reading
 * the set). `.lib SECTION` section headers appear too; callers ignore names that are
 * not files.
 */
export function includeReferences(text: string): string[] {
  const out: string[] = [];
  INCLUDE_LINE.lastIndex = 0;
  for (let m = INCLUDE_LINE.exec(text); m; m = INCLUDE_LINE.exec(text)) out.push(m[1] ?? m[2] ?? m[3]);
  return out;
}
