// Splits a cell into stages.
//
// Channel-connected components are devices joined through drain/source (and resistor)
// terminals, cut at the rails and at gates; zero-ohm ties are wires. A component is
// then split at its observed nets (nets that drive a gate, leave the cell through a
// port or an instance pin, or connect straight to both rails): the devices joined
// through unobserved nets form blocks; a block touching one observed net and the
// rails drives that net, a block joining observed nets without touching a rail is a
// pass stage (a pass device or transmission gate). Each driven net's blocks become
// one stage with its pull-up and pull-down networks as series/parallel trees.

import type { Cell, RailKind, SourceLoc } from '../../grammar/design';
import type { Network } from '../electrical/network';
import { reduceSeriesParallel } from './series-parallel';
import { classifyStage } from './classify';
import type { AuxiliaryDevice, CellStages, Stage, StageElement, StageOptions } from './stage';
import { GROUND_END, POWER_END } from './stage';

class UnionFind {
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
  union(a: number, b: number) {
    const ra = this.find(a);
    const rb = this.find(b);
    if (ra !== rb) this.parent[Math.max(ra, rb)] = Math.min(ra, rb);
  }
}

interface Edge {
  element: StageElement;
  a: number;
  b: number;
  /** Gate net (mos), -1 for resistors. */
  gate: number;
  polarity: 'n' | 'p' | 'r';
  loc: SourceLoc;
}

export function extractStages(cell: Cell, rails: readonly (RailKind | undefined)[], options: StageOptions = {}): CellStages {
  const netCount = cell.nets.length;

  // Zero-ohm ties are wires.
  const wires = new UnionFind(netCount);
  for (const o of cell.others) if (o.kind === 'res' && o.value === 0) wires.union(o.a, o.b);
  const alias = new Int32Array(netCount);
  for (let i = 0; i < netCount; i++) alias[i] = wires.find(i);
  const rail: (RailKind | undefined)[] = new Array(netCount);
  for (let i = 0; i < netCount; i++) if (rails[i]) rail[alias[i]] = rails[i];
  const railOf = (net: number) => rail[alias[net]];

  const edges: Edge[] = [];
  cell.mosfets.forEach((m, index) => {
    const a = alias[m.drain];
    const b = alias[m.source];
    if (railOf(a) && railOf(b)) return; // both ends on rails: a decoupling or tie device, no stage
    edges.push({ element: { kind: 'mos', index }, a, b, gate: alias[m.gate], polarity: m.polarity, loc: m.loc });
  });
  cell.others.forEach((o, index) => {
    if (o.kind !== 'res' || o.value === 0) return;
    const a = alias[o.a];
    const b = alias[o.b];
    if (railOf(a) && railOf(b)) return;
    edges.push({ element: { kind: 'res', index }, a, b, gate: -1, polarity: 'r', loc: o.loc });
  });

  // Observed nets.
  const observed = new Uint8Array(netCount);
  for (const m of cell.mosfets) observed[alias[m.gate]] = 1;
  for (const p of cell.ports) observed[alias[p]] = 1;
  for (const inst of cell.instances) for (const p of inst.pins) observed[alias[p]] = 1;
  const toPower = new Uint8Array(netCount);
  const toGround = new Uint8Array(netCount);
  const markRailNeighbour = (x: number, y: number) => {
    const r = railOf(y);
    if (r === 'power') toPower[x] = 1;
    else if (r === 'ground') toGround[x] = 1;
  };
  for (const e of edges) {
    markRailNeighbour(e.a, e.b);
    markRailNeighbour(e.b, e.a);
  }
  for (let i = 0; i < netCount; i++) if (toPower[i] && toGround[i]) observed[i] = 1;
  for (let i = 0; i < netCount; i++) if (railOf(i)) observed[i] = 0;

  // Channel-connected components (cut at rails) and blocks (cut at rails and observed nets).
  const components = new UnionFind(edges.length);
  const blocks = new UnionFind(edges.length);
  const firstOnNet = new Int32Array(netCount).fill(-1);
  const firstOnInternal = new Int32Array(netCount).fill(-1);
  const join = (x: number, i: number) => {
    if (railOf(x)) return;
    if (firstOnNet[x] < 0) firstOnNet[x] = i;
    else components.union(firstOnNet[x], i);
    if (observed[x]) return;
    if (firstOnInternal[x] < 0) firstOnInternal[x] = i;
    else blocks.union(firstOnInternal[x], i);
  };
  edges.forEach((e, i) => {
    join(e.a, i);
    join(e.b, i);
  });
  const blockMembers = new Map<number, number[]>();
  edges.forEach((_, i) => {
    const root = blocks.find(i);
    const list = blockMembers.get(root);
    if (list) list.push(i);
    else blockMembers.set(root, [i]);
  });

  const endOf = (net: number) => {
    const r = railOf(net);
    return r === 'power' ? POWER_END : r === 'ground' ? GROUND_END : net;
  };

  interface BlockInfo {
    edges: number[];
    observed: number[];
    power: boolean;
    ground: boolean;
  }
  const describe = (list: number[]): BlockInfo => {
    const obs = new Set<number>();
    let power = false;
    let ground = false;
    const visit = (x: number) => {
      const r = railOf(x);
      if (r === 'power') power = true;
      else if (r === 'ground') ground = true;
      else if (observed[x]) obs.add(x);
    };
    for (const i of list) {
      visit(edges[i].a);
      visit(edges[i].b);
    }
    return { edges: list, observed: [...obs], power, ground };
  };

  const drivers = new Map<number, BlockInfo[]>();
  const passGroups = new Map<string, BlockInfo[]>();
  const loose: BlockInfo[] = [];
  for (const list of blockMembers.values()) {
    let info = describe(list);
    if (info.observed.length === 0) {
      const out = guessOutput(list);
      if (out !== null) {
        observed[out] = 1;
        info = describe(list);
      }
    }
    if (info.observed.length === 1) {
      const o = info.observed[0];
      const g = drivers.get(o);
      if (g) g.push(info);
      else drivers.set(o, [info]);
    } else if (info.observed.length >= 2 && !info.power && !info.ground) {
      const key = info.observed.slice().sort((x, y) => x - y).join(',');
      const g = passGroups.get(key);
      if (g) g.push(info);
      else passGroups.set(key, [info]);
    } else loose.push(info);
  }

  // An unobserved block (an unused output, a top-level deck without ports): the net that splits it into a pull-up and a pull-down side.
  function guessOutput(list: number[]): number | null {
    if (list.length > 64) return null;
    const degree = new Map<number, number>();
    for (const i of list) for (const x of [edges[i].a, edges[i].b]) if (!railOf(x)) degree.set(x, (degree.get(x) ?? 0) + 1);
    const candidates = [...degree].sort((p, q) => q[1] - p[1] || p[0] - q[0]).map(([x]) => x);
    for (const c of candidates) {
      const sides = splitAt(list, c);
      if (sides && sides.up.length && sides.down.length) return c;
    }
    return null;
  }

  // Edges of `list` grouped into pieces joined through nets other than `out`; each piece must touch one rail kind.
  function splitAt(list: number[], out: number): { up: number[]; down: number[]; dangling: number[] } | null {
    const uf = new UnionFind(list.length);
    const first = new Map<number, number>();
    list.forEach((ei, k) => {
      for (const x of [edges[ei].a, edges[ei].b]) {
        if (x === out || railOf(x)) continue;
        const f = first.get(x);
        if (f === undefined) first.set(x, k);
        else uf.union(f, k);
      }
    });
    const pieces = new Map<number, { list: number[]; power: boolean; ground: boolean }>();
    list.forEach((ei, k) => {
      const r = uf.find(k);
      let p = pieces.get(r);
      if (!p) pieces.set(r, (p = { list: [], power: false, ground: false }));
      p.list.push(ei);
      for (const x of [edges[ei].a, edges[ei].b]) {
        const rk = railOf(x);
        if (rk === 'power') p.power = true;
        else if (rk === 'ground') p.ground = true;
      }
    });
    const up: number[] = [];
    const down: number[] = [];
    const dangling: number[] = [];
    for (const p of pieces.values()) {
      if (p.power && p.ground) return null;
      (p.power ? up : p.ground ? down : dangling).push(...p.list);
    }
    return { up, down, dangling };
  }

  const stages: Stage[] = [];
  const driverOf = new Map<number, number>();
  const rank = options.fileRank ?? (() => 0);

  function makeStage(edgeList: number[], base: Partial<Stage> & Pick<Stage, 'kind' | 'output' | 'terminals'>, local: Map<number, number>): Stage {
    const sorted = edgeList.slice().sort((x, y) => compareLoc(edges[x].loc, edges[y].loc, rank) || x - y);
    const elements = sorted.map((i) => edges[i].element);
    sorted.forEach((ei, k) => local.set(ei, k));
    const stageNets = new Set<number>();
    for (const i of sorted) {
      if (!railOf(edges[i].a)) stageNets.add(edges[i].a);
      if (!railOf(edges[i].b)) stageNets.add(edges[i].b);
    }
    const inputs: number[] = [];
    const feedback: number[] = [];
    for (const i of sorted) {
      const g = edges[i].gate;
      if (g < 0 || railOf(g)) continue;
      const list = stageNets.has(g) ? feedback : inputs;
      if (!list.includes(g)) list.push(g);
    }
    const terminals = base.terminals;
    return {
      id: stages.length,
      component: components.find(sorted[0]),
      kind: base.kind,
      output: base.output,
      terminals,
      inputs,
      feedback,
      elements,
      internal: [...stageNets].filter((x) => !terminals.includes(x)).sort((x, y) => x - y),
      pullUp: base.pullUp ?? null,
      pullDown: base.pullDown ?? null,
      channel: base.channel ?? null,
      auxiliary: base.auxiliary ?? [],
      dynamic: null,
      anchor: edges[sorted[0]].loc,
      notes: base.notes ?? [],
    };
  }

  const leafOf = (ei: number, local: Map<number, number>): Network => ({
    kind: 'leaf',
    element: local.get(ei)!,
    a: endOf(edges[ei].a),
    b: endOf(edges[ei].b),
  });

  for (const [out, infos] of drivers) {
    const all = infos.flatMap((i) => i.edges);
    const notes: string[] = [];
    let up: number[] = [];
    let down: number[] = [];
    const auxiliary: { edge: number; node: number; rail: 'power' | 'ground' }[] = [];
    let ok = true;
    for (const info of infos) {
      if (info.power && !info.ground) up.push(...info.edges);
      else if (info.ground && !info.power) down.push(...info.edges);
      else if (info.power && info.ground) {
        // Joined through the output itself (an output found by `guessOutput`), or a secondary precharge on a stack node.
        const split = splitAt(info.edges, out) ?? splitMixed(info.edges, out);
        if (!split) {
          ok = false;
          notes.push('a path joins the rails without passing through the output');
          continue;
        }
        up.push(...split.up);
        down.push(...split.down);
        if ('auxiliary' in split) auxiliary.push(...split.auxiliary);
      }
    }
    const local = new Map<number, number>();
    const stage = makeStage(all, { kind: 'other', output: out, terminals: [out], notes }, local);
    stage.auxiliary = auxiliary.map((x) => ({ element: local.get(x.edge)!, node: x.node, rail: x.rail }) satisfies AuxiliaryDevice);
    if (ok) {
      const auxSet = new Set(auxiliary.map((x) => x.edge));
      up = up.filter((e) => !auxSet.has(e));
      down = down.filter((e) => !auxSet.has(e));
      const pu = reduceSeriesParallel(up.map((e) => leafOf(e, local)), out, POWER_END);
      const pd = reduceSeriesParallel(down.map((e) => leafOf(e, local)), out, GROUND_END);
      stage.pullUp = pu.network;
      stage.pullDown = pd.network;
      if (pu.network === null && up.length) notes.push(`pull-up is not series/parallel (${pu.reason})`);
      if (pd.network === null && down.length) notes.push(`pull-down is not series/parallel (${pd.reason})`);
      if (pu.dangling.length + pd.dangling.length) notes.push('devices with a floating end are left out of the networks');
    }
    classifyStage(stage, cell, railOf, options.isClock ?? (() => false));
    driverOf.set(out, stage.id);
    stages.push(stage);
  }

  // A block touching both rails: devices of one polarity tying a stack node (not the output) to the rail they pull towards
  // are auxiliary (a secondary precharge); the rest must then split into a pull-up and a pull-down side.
  function splitMixed(list: number[], out: number) {
    for (const [polarity, railKind] of [
      ['p', 'power'],
      ['n', 'ground'],
    ] as const) {
      const aux = list.filter((ei) => {
        const e = edges[ei];
        if (e.polarity !== polarity) return false;
        const ra = railOf(e.a);
        const rb = railOf(e.b);
        return (ra === railKind && e.b !== out && !rb) || (rb === railKind && e.a !== out && !ra);
      });
      if (!aux.length) continue;
      const rest = list.filter((ei) => !aux.includes(ei));
      const sides = splitAt(rest, out);
      if (!sides) continue;
      return {
        up: sides.up,
        down: sides.down,
        auxiliary: aux.map((ei) => ({ edge: ei, node: railOf(edges[ei].a) ? edges[ei].b : edges[ei].a, rail: railKind })),
      };
    }
    return null;
  }

  for (const infos of passGroups.values()) {
    const all = infos.flatMap((i) => i.edges);
    const terminals = infos[0].observed.slice().sort((x, y) => x - y);
    const local = new Map<number, number>();
    const stage = makeStage(all, { kind: 'pass', output: null, terminals }, local);
    if (terminals.length === 2) {
      stage.channel = reduceSeriesParallel(all.map((e) => leafOf(e, local)), terminals[0], terminals[1]).network;
    } else stage.notes.push(`joins ${terminals.length} observed nets`);
    stages.push(stage);
  }

  for (const info of loose) {
    const local = new Map<number, number>();
    const terminals = info.observed.slice().sort((x, y) => x - y);
    const stage = makeStage(info.edges, { kind: 'other', output: null, terminals }, local);
    stage.notes.push(
      info.observed.length === 0 ? 'no observed output' : 'joins several observed nets and the rails through shared internal nodes',
    );
    stages.push(stage);
  }

  // Netlist order of anchors, so reports read top to bottom.
  stages.sort((x, y) => compareLoc(x.anchor, y.anchor, rank));
  stages.forEach((s, i) => {
    s.id = i;
    if (s.output !== null && s.kind !== 'pass') driverOf.set(s.output, i);
  });
  return { stages, driverOf, alias };
}

function compareLoc(x: SourceLoc, y: SourceLoc, rank: (file: string) => number): number {
  if (x.file !== y.file) return rank(x.file) - rank(y.file) || (x.file < y.file ? -1 : 1);
  return x.line - y.line || x.column - y.column;
}
