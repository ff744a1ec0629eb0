// Reduction of a two-terminal graph of channel elements to a series/parallel tree:
// merge parallel edges, merge series pairs at internal nodes of degree two, drop
// dangling edges; what remains is one edge (a series/parallel network) or a bridge.

import type { Network } from '../electrical/network';
import { reverseNetwork } from '../electrical/network';

export type Reduction = { network: Network; dangling: number[] } | { network: null; reason: 'empty' | 'bridge' | 'too-large'; dangling: number[] };

const MAX_EDGES = 4000;

function flattenSeries(n: Network): { children: Network[]; nodes: number[] } {
  return n.kind === 'series' ? { children: n.children, nodes: n.nodes } : { children: [n], nodes: [] };
}

function series(first: Network, second: Network): Network {
  // first ends where second starts.
  const f = flattenSeries(first);
  const s = flattenSeries(second);
  return { kind: 'series', a: first.a, b: second.b, children: [...f.children, ...s.children], nodes: [...f.nodes, first.b, ...s.nodes] };
}

function parallel(edges: Network[]): Network {
  const a = edges[0].a;
  const b = edges[0].b;
  const children: Network[] = [];
  for (const e of edges) {
    const oriented = e.a === a ? e : reverseNetwork(e);
    if (oriented.kind === 'parallel') children.push(...oriented.children);
    else children.push(oriented);
  }
  return { kind: 'parallel', a, b, children: children.slice() };
}

function leavesOf(n: Network, out: number[]) {
  if (n.kind === 'leaf') out.push(n.element);
  else for (const c of n.children) leavesOf(c, out);
}

/** The common shapes without the general reduction: one element, elements all in parallel, or one simple chain. */
function directNetwork(edges: readonly Network[], from: number, to: number): Network | null {
  if (edges.length === 0) return null;
  let allDirect = true;
  for (const e of edges) if (!((e.a === from && e.b === to) || (e.a === to && e.b === from))) allDirect = false;
  if (allDirect) {
    const oriented: Network[] = new Array(edges.length);
    for (let i = 0; i < edges.length; i++) oriented[i] = edges[i].a === from ? edges[i] : reverseNetwork(edges[i]);
    return oriented.length === 1 ? oriented[0] : { kind: 'parallel', a: from, b: to, children: oriented };
  }
  // A simple chain: walk from `from`, each step along the only unused edge at the current node.
  const children: Network[] = [];
  const nodes: number[] = [];
  const used = new Uint8Array(edges.length);
  let at = from;
  while (at !== to) {
    let next = -1;
    for (let i = 0; i < edges.length; i++) {
      if (used[i] || (edges[i].a !== at && edges[i].b !== at)) continue;
      if (next >= 0) return null;
      next = i;
    }
    if (next < 0) return null;
    used[next] = 1;
    const e = edges[next].a === at ? edges[next] : reverseNetwork(edges[next]);
    children.push(e);
    at = e.b;
    if (at !== to) nodes.push(at);
    if (children.length > edges.length) return null;
  }
  if (children.length !== edges.length || nodes.includes(from)) return null;
  for (let i = 0; i < nodes.length; i++) if (nodes.indexOf(nodes[i]) !== i) return null;
  // Copies of exact length: the networks live as long as the check, and an array grown by push keeps room for 17.
  return { kind: 'series', a: from, b: to, children: children.slice(), nodes: nodes.slice() };
}

/** Reduce `edges` between terminals `from` and `to`; the result runs from `from` (a) to `to` (b). */
export function reduceSeriesParallel(edges: readonly Network[], from: number, to: number): Reduction {
  const dangling: number[] = [];
  if (edges.length > MAX_EDGES) return { network: null, reason: 'too-large', dangling };
  const fast = directNetwork(edges, from, to);
  if (fast) return { network: fast, dangling };
  let live: Network[] = edges.filter((e) => {
    if (e.a !== e.b) return true;
    leavesOf(e, dangling);
    return false;
  });
  for (let changed = true; changed && live.length > 1; ) {
    changed = false;
    // Parallel merges.
    const groups = new Map<string, Network[]>();
    for (const e of live) {
      const key = e.a < e.b ? `${e.a},${e.b}` : `${e.b},${e.a}`;
      const g = groups.get(key);
      if (g) g.push(e);
      else groups.set(key, [e]);
    }
    if (groups.size < live.length) {
      live = [...groups.values()].map((g) => (g.length === 1 ? g[0] : parallel(g)));
      changed = true;
    }
    // Series merges and dangling edges, one node at a time.
    const incident = new Map<number, number[]>();
    live.forEach((e, i) => {
      for (const x of [e.a, e.b]) {
        const list = incident.get(x);
        if (list) list.push(i);
        else incident.set(x, [i]);
      }
    });
    const removed = new Set<number>();
    const added: Network[] = [];
    for (const [node, list] of incident) {
      if (node === from || node === to) continue;
      if (list.some((i) => removed.has(i))) continue;
      if (list.length === 1) {
        removed.add(list[0]);
        leavesOf(live[list[0]], dangling);
        changed = true;
      } else if (list.length === 2) {
        let [e1, e2] = [live[list[0]], live[list[1]]];
        if (e1.b !== node) e1 = reverseNetwork(e1);
        if (e2.a !== node) e2 = reverseNetwork(e2);
        removed.add(list[0]);
        removed.add(list[1]);
        added.push(series(e1, e2));
        changed = true;
      }
    }
    if (removed.size) live = [...live.filter((_, i) => !removed.has(i)), ...added];
  }
  if (live.length === 0) return { network: null, reason: 'empty', dangling };
  if (live.length === 1) {
    const e = live[0];
    if (e.a === from && e.b === to) return { network: e, dangling };
    if (e.a === to && e.b === from) return { network: reverseNetwork(e), dangling };
    leavesOf(e, dangling);
    return { network: null, reason: 'empty', dangling };
  }
  return { network: null, reason: 'bridge', dangling };
}
