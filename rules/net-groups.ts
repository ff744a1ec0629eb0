// Union-find over numbered items (nets, channel elements), and the groups of nets
// that zero-ohm ties join into one. Pure computation.

import type { Cell } from '../grammar/design';

/** Disjoint sets over 0…n−1; every set is represented by its smallest member. */
export class UnionFind {
  readonly parent: Int32Array;
  constructor(n: number) {
    this.parent = new Int32Array(n);
    for (let i = 0; i < n; i++) this.parent[i] = i;
  }
  find(x: number): number {
    const p = this.parent;
    while (p[x] !== x) {
      p[x] = p[p[x]];
      x = p[x];
    }
    return x;
  }
  union(a: number, b: number): void {
    const ra = this.find(a);
    const rb = this.find(b);
    if (ra !== rb) this.parent[Math.max(ra, rb)] = Math.min(ra, rb);
  }
}

const aliases = new WeakMap<Cell, Int32Array>();

/** Net → representative of the nets joined to it by zero-ohm resistors (the smallest id of each group); one array per cell, not to be written to. */
export function zeroOhmAlias(cell: Cell): Int32Array {
  const known = aliases.get(cell);
  if (known) return known;
  const n = cell.nets.length;
  const wires = new UnionFind(n);
  for (const o of cell.others) if (o.kind === 'res' && o.value === 0) wires.union(o.a, o.b);
  const alias = new Int32Array(n);
  for (let i = 0; i < n; i++) alias[i] = wires.find(i);
  aliases.set(cell, alias);
  return alias;
}
