// The netlist engine's public API: read a set of netlist files into the
// hierarchical design model. Problems are returned in `design.diagnostics`;
// nothing here throws for any input text.

import type { Design } from './design';
import { elaborate, type ReadOptions } from './elaborate';

export type { ReadOptions } from './elaborate';
export { TOP_LEVEL_CELL } from './elaborate';
export type * from './design';
export { instanceCounts, topologicalOrder, flattenedDeviceCount } from './design';
export type * from './ast';
export { parseNetlist, type ParseOptions } from './parser';
export { netlistLexer, netlistTokens, tokenize, statementChunks, type FieldsPayload } from './lexer';
export { compileExpression, evaluate, type ExprNode, type CompiledExpr } from './expression';
export { parseSpiceNumber, looksNumeric } from './numbers';
export { lineStarts, lineOf, LocationCursor } from './source';
export { normalizePath, resolveInclude, includeReferences } from './paths';

/** Read a set of files (relative path with forward slashes → text) into a design. */
export function readDesign(files: ReadonlyMap<string, string> | Record<string, string>, options: ReadOptions): Design {
  return elaborate(files, options);
}
