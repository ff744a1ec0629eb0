// The netlist engine's public API: read a set of netlist files into the
// hierarchical design model. Problems are returned in `design.diagnostics`;
// nothing here throws for any input text.

import type { Design } from './design';
import { elaborate, type ReadOptions } from './elaborate';

export type { ReadOptions } from './elaborate';
export { TOP_LEVEL_CELL } from './elaborate';
export type * from './design';
export { instanceCounts, topologicalOrder, occurringOrder, flattenedTotals, flattenedDeviceCount } from './design';
export { MosfetTable } from './mosfet-table';
export type * from './ast';
export { parseNetlist, type ParseOptions } from './parser';
export { netlistLexer, netlistTokens, tokenize, statementChunks, fieldStore, FieldStore } from './lexer';
export { NameTable } from './names';
export { compileExpression, evaluate, type ExprNode, type CompiledExpr } from './expression';
export { parseSpiceNumber, looksNumeric } from './numbers';
export { lineStarts, lineOf, LocationCursor } from './source';
export { normalizePath, resolveInclude, includeReferences } from './paths';

/** Read a set of files (relative path with forward slashes → text) into a design. */
export function readDesign(files: ReadonlyMap<string, string> | Record<string, string>, options: ReadOptions): Design {
  try {
    return elaborate(files, options);
  } catch (e) {
    // A defect of the reader must still reach the user as a diagnostic, never as a stack trace.
    const first = files instanceof Map ? [...files.keys()][0] : Object.keys(files)[0];
    return {
      cells: new Map(),
      roots: [],
      globals: new Set(),
      models: new Map(),
      sourcedRails: new Map(),
      files: [],
      scale: options.scale ?? options.defaultScale,
      diagnostics: [
        {
          severity: 'error',
          code: 'internal-error',
          message: `the netlist reader failed: ${e instanceof Error ? e.message : String(e)}`,
          hint: 'please report this with the netlist that caused it',
          file: first ?? '',
          line: 1,
          column: 1,
        },
      ],
    };
  }
}
