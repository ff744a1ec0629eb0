// The source map: offsets in a file's text to the 1-based line and column an
// editor shows. Every physical line counts (comments, blank and continuation
// lines included); a line ends at \n, \r\n or a lone \r, as editors split them.
// Columns count UTF-16 code units from 1, a tab being one column.

import type { SourceLoc } from './design';

/** Offsets at which each physical line starts; entry 0 is 0. */
export function lineStarts(text: string): number[] {
  const starts = [0];
  if (text.indexOf('\r') < 0) {
    for (let i = text.indexOf('\n'); i >= 0; i = text.indexOf('\n', i + 1)) starts.push(i + 1);
    return starts;
  }
  const n = text.length;
  for (let i = 0; i < n; i++) {
    const c = text.charCodeAt(i);
    if (c === 10) starts.push(i + 1);
    else if (c === 13) {
      if (text.charCodeAt(i + 1) === 10) i++;
      starts.push(i + 1);
    }
  }
  return starts;
}

/** 1-based line of an offset (binary search). */
export function lineOf(starts: readonly number[], offset: number): number {
  let lo = 0;
  let hi = starts.length - 1;
  while (lo < hi) {
    const mid = (lo + hi + 1) >>> 1;
    if (starts[mid] <= offset) lo = mid;
    else hi = mid - 1;
  }
  return lo + 1;
}

/** Converts offsets of one file to locations; fast for offsets that only grow, correct for any. */
export class LocationCursor {
  private line = 0;
  constructor(
    readonly file: string,
    readonly starts: readonly number[],
  ) {}

  at(offset: number): SourceLoc {
    const line = this.lineIndex(offset);
    return { file: this.file, line: line + 1, column: offset - this.starts[line] + 1 };
  }

  /** 0-based index of the line holding `offset`. */
  lineIndex(offset: number): number {
    const s = this.starts;
    let line = this.line;
    if (offset < s[line]) line = lineOf(s, offset) - 1;
    else {
      // advance linearly a few steps, then fall back to binary search
      let steps = 0;
      while (line + 1 < s.length && s[line + 1] <= offset) {
        line++;
        if (++steps > 16) {
          line = lineOf(s, offset) - 1;
          break;
        }
      }
    }
    this.line = line;
    return line;
  }
}
