// JSON Patch (RFC 6902) operations add, remove and replace over RFC 6901 pointers,
// applied to a copy of a deck's content. `move`, `copy` and `test` are not offered:
// the editor never needs them, and the draft's lockVersion already guards against
// editing a document that changed underneath.

import type { PatchOperation } from '../../shared/api/decks';

export class PatchError extends Error {
  constructor(
    readonly pointer: string,
    message: string,
  ) {
    super(message);
  }
}

/** RFC 6901 §3–4: split on `/`, then `~1` → `/` and `~0` → `~` (in that order). */
export function parsePointer(pointer: string): string[] {
  if (pointer === '') return [];
  if (!pointer.startsWith('/')) throw new PatchError(pointer, 'a JSON pointer starts with "/"');
  return pointer
    .slice(1)
    .split('/')
    .map((t) => t.replace(/~1/g, '/').replace(/~0/g, '~'));
}

// Keys that would reach an object's prototype instead of its own members.
const FORBIDDEN_KEYS = new Set(['__proto__', 'constructor', 'prototype']);

type Container = Record<string, unknown> | unknown[];

function isContainer(value: unknown): value is Container {
  return typeof value === 'object' && value !== null;
}

/** RFC 6901 §4: an array index is `0` or digits without a leading zero. */
function arrayIndex(token: string, length: number, pointer: string, allowEnd: boolean): number {
  if (allowEnd && token === '-') return length;
  if (!/^(0|[1-9][0-9]*)$/.test(token)) throw new PatchError(pointer, `"${token}" is not an array index`);
  const index = Number(token);
  if (index > length || (!allowEnd && index === length)) throw new PatchError(pointer, `index ${index} is past the end of the list (${length} entries)`);
  return index;
}

function parentOf(doc: unknown, tokens: string[], pointer: string): Container {
  let node: unknown = doc;
  for (const token of tokens.slice(0, -1)) {
    if (Array.isArray(node)) node = node[arrayIndex(token, node.length, pointer, false)];
    else if (isContainer(node) && Object.hasOwn(node, token)) node = (node as Record<string, unknown>)[token];
    else throw new PatchError(pointer, `nothing at "${token}" on the way to this path`);
  }
  if (!isContainer(node)) throw new PatchError(pointer, 'the parent of this path is not an object or a list');
  return node;
}

function applyOne(doc: unknown, op: PatchOperation): unknown {
  const tokens = parsePointer(op.path);
  if (tokens.length === 0) throw new PatchError(op.path, 'the whole deck cannot be patched; replace its content instead');
  const last = tokens[tokens.length - 1];
  if (tokens.some((t) => FORBIDDEN_KEYS.has(t))) throw new PatchError(op.path, `"${last}" is not a deck field`);
  const parent = parentOf(doc, tokens, op.path);
  const value = op.op === 'remove' ? undefined : structuredClone(op.value);
  if (op.op !== 'remove' && value === undefined) throw new PatchError(op.path, `"${op.op}" needs a value`);

  if (Array.isArray(parent)) {
    if (op.op === 'add') parent.splice(arrayIndex(last, parent.length, op.path, true), 0, value);
    else {
      const index = arrayIndex(last, parent.length, op.path, false);
      if (op.op === 'remove') parent.splice(index, 1);
      else parent[index] = value;
    }
    return doc;
  }
  if (op.op !== 'add' && !Object.hasOwn(parent, last)) throw new PatchError(op.path, `nothing at "${last}" to ${op.op}`);
  if (op.op === 'remove') delete parent[last];
  else parent[last] = value;
  return doc;
}

/** Apply the operations in order to a copy of `document`; the first failing operation throws a PatchError and nothing is applied. */
export function applyPatch<T>(document: T, operations: readonly PatchOperation[]): unknown {
  let doc: unknown = structuredClone(document);
  for (const op of operations) doc = applyOne(doc, op);
  return doc;
}
