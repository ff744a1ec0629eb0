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
//
// A flat netlist can hold a million devices in one cell, so the work per device is
// kept to typed arrays and loops (no callbacks on the per-stage path: tsx names every
// closure it creates, which costs more than the work inside).

import type { Cell, RailKind, SourceLoc } from '../../grammar/design';
import type { Network } from '../electrical/network';
import { UnionFind, zeroOhmAlias } from '../net-groups';
import { reduceSeriesParallel } from './series-parallel';
import { classifyStage } from './classify';
import type { AuxiliaryDevice, CellStages, Stage, StageElement, StageOptions } from './stage';
import { GROUND_END, POWER_END, mosElement, resistorElement } from './stage';

const POLARITY_N = 0;
const POLARITY_P = 1;
const POLARITY_R = 2;
const RAIL_NONE = 0;
const RAIL_POWER = 1;
const RAIL_GROUND = 2;

interface BlockInfo {
  edges: number[];
  observed: number[];
  power: boolean;
  ground: boolean;
}

export function extractStages(cell: Cell, rails: readonly (RailKind | undefined)[], options: StageOptions = {}): CellStages {
  const netCount = cell.nets.length;

  // Zero-ohm ties are wires.
  const alias = zeroOhmAlias(cell);
  const railCode = new Uint8Array(netCount);
  for (let i = 0; i < netCount; i++) {
    const r = rails[i];
    if (r) railCode[alias[i]] = r === 'power' ? RAIL_POWER : RAIL_GROUND;
  }
  const railAt = (net: number) => railCode[alias[net]];
  const railOf = (net: number): RailKind | undefined => {
    const c = railCode[alias[net]];
    return c === RAIL_POWER ? 'power' : c === RAIL_GROUND ? 'ground' : undefined;
  };

  // Channel elements as parallel typed arrays.
  const total = cell.mosfets.length + cell.others.length;
  const edgeA = new Int32Array(total);
  const edgeB = new Int32Array(total);
  const edgeGate = new Int32Array(total);
  const edgePolarity = new Uint8Array(total);
  const edgeIndex = new Int32Array(total);
  let edgeCount = 0;
  const mos = cell.mosfets;
  for (let i = 0; i < mos.length; i++) {
    const a = alias[mos.drain[i]];
    const b = alias[mos.source[i]];
    if (railCode[a] && railCode[b]) continue; // both ends on rails: a decoupling or tie device, no stage
    edgeA[edgeCount] = a;
    edgeB[edgeCount] = b;
    edgeGate[edgeCount] = alias[mos.gate[i]];
    edgePolarity[edgeCount] = mos.isN(i) ? POLARITY_N : POLARITY_P;
    edgeIndex[edgeCount++] = i;
  }
  const firstResistor = edgeCount;
  for (let i = 0; i < cell.others.length; i++) {
    const o = cell.others[i];
    if (o.kind !== 'res' || o.value === 0) continue;
    const a = alias[o.a];
    const b = alias[o.b];
    if (railCode[a] && railCode[b]) continue;
    edgeA[edgeCount] = a;
    edgeB[edgeCount] = b;
    edgeGate[edgeCount] = -1;
    edgePolarity[edgeCount] = POLARITY_R;
    edgeIndex[edgeCount++] = i;
  }
  const elementOf = (e: number): StageElement => (e < firstResistor ? mosElement(edgeIndex[e]) : resistorElement(edgeIndex[e]));
  const locOf = (e: number): SourceLoc => (e < firstResistor ? mos.loc(edgeIndex[e]) : cell.others[edgeIndex[e]].loc);
  const fileOf = (e: number): string => (e < firstResistor ? mos.file(edgeIndex[e]) : cell.others[edgeIndex[e]].loc.file);

  // Observed nets.
  const observed = new Uint8Array(netCount);
  for (let i = 0; i < mos.length; i++) observed[alias[mos.gate[i]]] = 1;
  for (const p of cell.ports) observed[alias[p]] = 1;
  for (const inst of cell.instances) for (const p of inst.pins) observed[alias[p]] = 1;
  const railNeighbours = new Uint8Array(netCount);
  for (let e = 0; e < edgeCount; e++) {
    railNeighbours[edgeA[e]] |= railCode[edgeB[e]];
    railNeighbours[edgeB[e]] |= railCode[edgeA[e]];
  }
  for (let i = 0; i < netCount; i++) {
    if (railNeighbours[i] === (RAIL_POWER | RAIL_GROUND)) observed[i] = 1;
    if (railCode[i]) observed[i] = 0;
  }

  // Channel-connected components (cut at rails) and blocks (cut at rails and observed nets).
  const components = new UnionFind(edgeCount);
  const blocks = new UnionFind(edgeCount);
  const firstOnNet = new Int32Array(netCount).fill(-1);
  const firstOnInternal = new Int32Array(netCount).fill(-1);
  for (let e = 0; e < edgeCount; e++) {
    for (let side = 0; side < 2; side++) {
      const x = side === 0 ? edgeA[e] : edgeB[e];
      if (railCode[x]) continue;
      if (firstOnNet[x] < 0) firstOnNet[x] = e;
      else components.union(firstOnNet[x], e);
      if (observed[x]) continue;
      if (firstOnInternal[x] < 0) firstOnInternal[x] = e;
      else blocks.union(firstOnInternal[x], e);
    }
  }
  // Members of each block as linked lists (roots precede their members: union keeps the smaller index).
  const blockHead = new Int32Array(edgeCount).fill(-1);
  const blockNext = new Int32Array(edgeCount).fill(-1);
  const blockTail = new Int32Array(edgeCount).fill(-1);
  const roots: number[] = [];
  for (let e = 0; e < edgeCount; e++) {
    const r = blocks.find(e);
    if (blockHead[r] < 0) {
      blockHead[r] = e;
      roots.push(r);
    } else blockNext[blockTail[r]] = e;
    blockTail[r] = e;
  }

  const describe = (list: number[]): BlockInfo => {
    const obs: number[] = [];
    let power = false;
    let ground = false;
    for (const e of list) {
      for (let side = 0; side < 2; side++) {
        const x = side === 0 ? edgeA[e] : edgeB[e];
        const r = railCode[x];
        if (r === RAIL_POWER) power = true;
        else if (r === RAIL_GROUND) ground = true;
        else if (observed[x] && !obs.includes(x)) obs.push(x);
      }
    }
    return { edges: list, observed: obs, power, ground };
  };

  // Edges of `list` grouped into pieces joined through nets other than `out`; each piece must touch one rail kind.
  const splitAt = (list: number[], out: number): { up: number[]; down: number[]; dangling: number[] } | null => {
    const uf = new UnionFind(list.length);
    const first = new Map<number, number>();
    for (let k = 0; k < list.length; k++) {
      for (let side = 0; side < 2; side++) {
        const x = side === 0 ? edgeA[list[k]] : edgeB[list[k]];
        if (x === out || railCode[x]) continue;
        const f = first.get(x);
        if (f === undefined) first.set(x, k);
        else uf.union(f, k);
      }
    }
    const rail = new Uint8Array(list.length);
    for (let k = 0; k < list.length; k++) rail[uf.find(k)] |= railCode[edgeA[list[k]]] | railCode[edgeB[list[k]]];
    const up: number[] = [];
    const down: number[] = [];
    const dangling: number[] = [];
    for (let k = 0; k < list.length; k++) {
      const r = rail[uf.find(k)];
      if (r === (RAIL_POWER | RAIL_GROUND)) return null;
      (r === RAIL_POWER ? up : r === RAIL_GROUND ? down : dangling).push(list[k]);
    }
    return { up, down, dangling };
  };

  // An unobserved block (an unused output, a top-level deck without ports): the net that splits it into a pull-up and a pull-down side.
  const guessOutput = (list: number[]): number | null => {
    if (list.length > 64) return null;
    const degree = new Map<number, number>();
    for (const e of list) {
      for (let side = 0; side < 2; side++) {
        const x = side === 0 ? edgeA[e] : edgeB[e];
        if (!railCode[x]) degree.set(x, (degree.get(x) ?? 0) + 1);
      }
    }
    // Of the nets that split the block, the one whose sides are purest (p-channel towards the supply, n-channel
    // towards ground, as in static CMOS) and then most balanced: a stack node also splits it, with a device on the wrong side.
    let best: number | null = null;
    let bestScore = Infinity;
    // First the nets touched by both polarities (a static output; a stack node sees one), then, failing those, every net.
    const mixed = new Map<number, number>();
    for (const e of list) {
      const bit = edgePolarity[e] === POLARITY_N ? 1 : edgePolarity[e] === POLARITY_P ? 2 : 3;
      mixed.set(edgeA[e], (mixed.get(edgeA[e]) ?? 0) | bit);
      mixed.set(edgeB[e], (mixed.get(edgeB[e]) ?? 0) | bit);
    }
    const first: number[] = [];
    for (const [c] of degree) if (mixed.get(c) === 3) first.push(c);
    for (const pass of [first, [...degree.keys()]]) {
      for (const c of pass.sort(ascending)) {
        const sides = splitAt(list, c);
        if (!sides || !sides.up.length || !sides.down.length) continue;
        let wrong = 0;
        for (const e of sides.up) if (edgePolarity[e] === POLARITY_N) wrong++;
        for (const e of sides.down) if (edgePolarity[e] === POLARITY_P) wrong++;
        const score = wrong * 1000 + Math.abs(sides.up.length - sides.down.length);
        if (score < bestScore) {
          bestScore = score;
          best = c;
        }
      }
      if (best !== null) return best;
    }
    return best;
  };

  // Blocks are grouped without an object per block: a block driving one observed net joins that net's chain of blocks
  // (by root edge), with its rail contacts as a bit mask; only pass and loose blocks, a few in a flat netlist, keep lists.
  const groupFirst = new Int32Array(netCount).fill(-1);
  const groupLast = new Int32Array(netCount).fill(-1);
  const nextInGroup = new Int32Array(edgeCount).fill(-1);
  const blockRails = new Uint8Array(edgeCount);
  const driven: number[] = [];
  const joinDriverGroup = (net: number, root: number, railMask: number) => {
    blockRails[root] = railMask;
    if (groupFirst[net] < 0) {
      groupFirst[net] = root;
      driven.push(net);
    } else nextInGroup[groupLast[net]] = root;
    groupLast[net] = root;
  };
  const passGroups = new Map<string, BlockInfo[]>();
  const loose: BlockInfo[] = [];
  for (const r of roots) {
    // The block's observed net when it has exactly one (−1 for none, −2 for several), and its rail contacts.
    let only = -1;
    let railMask = 0;
    for (let e = blockHead[r]; e >= 0; e = blockNext[e]) {
      for (let side = 0; side < 2; side++) {
        const x = side === 0 ? edgeA[e] : edgeB[e];
        const c = railCode[x];
        if (c) railMask |= c;
        else if (observed[x] && only !== x) only = only === -1 ? x : -2;
      }
    }
    if (only >= 0) {
      joinDriverGroup(only, r, railMask);
      continue;
    }
    const list: number[] = [];
    for (let e = blockHead[r]; e >= 0; e = blockNext[e]) list.push(e);
    let info = describe(list);
    if (info.observed.length === 0) {
      const out = guessOutput(list);
      if (out !== null) {
        observed[out] = 1;
        info = describe(list);
      }
    }
    if (info.observed.length === 1) {
      joinDriverGroup(info.observed[0], r, (info.power ? RAIL_POWER : 0) | (info.ground ? RAIL_GROUND : 0));
    } else if (info.observed.length >= 2 && !info.power && !info.ground) {
      const key = sortAscending(info.observed).join(',');
      const g = passGroups.get(key);
      if (g) g.push(info);
      else passGroups.set(key, [info]);
    } else loose.push(info);
  }

  const stages: Stage[] = [];
  const driverOf = new Map<number, number>();
  const rank = options.fileRank;
  const byLoc = (x: number, y: number) => compareLoc(locOf(x), locOf(y), rank) || x - y;
  const endOf = (net: number) => {
    const r = railAt(net);
    return r === RAIL_POWER ? POWER_END : r === RAIL_GROUND ? GROUND_END : net;
  };

  // Each edge belongs to one stage: its position among that stage's elements, shared by every stage (no map per stage).
  const elementAt = new Int32Array(edgeCount);
  const makeStage = (edgeList: number[], kind: Stage['kind'], output: number | null, terminals: number[]): Stage => {
    const sorted = edgeList; // every caller passes a list of its own
    // Transistors come in netlist order already; only mixed or multi-file stages need the full comparison.
    if (sorted.length > 1) {
      let plain = true;
      const file = fileOf(sorted[0]);
      for (const e of sorted) if (e >= firstResistor || fileOf(e) !== file) plain = false;
      if (plain) sortAscending(sorted);
      else sorted.sort(byLoc);
    }
    const elements: StageElement[] = new Array(sorted.length);
    const stageNets: number[] = [];
    for (let k = 0; k < sorted.length; k++) {
      const e = sorted[k];
      elements[k] = elementOf(e);
      elementAt[e] = k;
      if (!railCode[edgeA[e]] && !stageNets.includes(edgeA[e])) stageNets.push(edgeA[e]);
      if (!railCode[edgeB[e]] && !stageNets.includes(edgeB[e])) stageNets.push(edgeB[e]);
    }
    const inputs: number[] = [];
    const feedback: number[] = [];
    for (const e of sorted) {
      const g = edgeGate[e];
      if (g < 0 || railCode[g]) continue;
      const list = stageNets.includes(g) ? feedback : inputs;
      if (!list.includes(g)) list.push(g);
    }
    const internal: number[] = [];
    for (const x of stageNets) if (!terminals.includes(x)) internal.push(x);
    sortAscending(internal);
    // Copies of exact length: stages live as long as the check, and an array grown by push keeps room for 17.
    return {
      id: stages.length,
      component: components.find(sorted[0]),
      kind,
      output,
      terminals,
      inputs: inputs.length ? inputs.slice() : inputs,
      feedback: feedback.length ? feedback.slice() : feedback,
      elements,
      internal: internal.length ? internal.slice() : internal,
      pullUp: null,
      pullDown: null,
      channel: null,
      auxiliary: [],
      dynamic: null,
      anchor: locOf(sorted[0]),
      notes: [],
    };
  };

  const leaves = (list: number[]): Network[] => {
    const out: Network[] = new Array(list.length);
    for (let k = 0; k < list.length; k++) {
      const e = list[k];
      out[k] = { kind: 'leaf', element: elementAt[e], a: endOf(edgeA[e]), b: endOf(edgeB[e]) };
    }
    return out;
  };

  // A block touching both rails: devices of one polarity tying a stack node (not the output) to the rail they pull towards
  // are auxiliary (a secondary precharge); the rest must then split into a pull-up and a pull-down side.
  const splitMixed = (list: number[], out: number) => {
    for (let pass = 0; pass < 2; pass++) {
      const polarity = pass === 0 ? POLARITY_P : POLARITY_N;
      const railKind = pass === 0 ? RAIL_POWER : RAIL_GROUND;
      const aux: number[] = [];
      const rest: number[] = [];
      for (const e of list) {
        const ra = railCode[edgeA[e]];
        const rb = railCode[edgeB[e]];
        const isAux =
          edgePolarity[e] === polarity && ((ra === railKind && edgeB[e] !== out && !rb) || (rb === railKind && edgeA[e] !== out && !ra));
        (isAux ? aux : rest).push(e);
      }
      if (!aux.length) continue;
      const sides = splitAt(rest, out);
      if (!sides) continue;
      const auxiliary: { edge: number; node: number; rail: 'power' | 'ground' }[] = [];
      for (const e of aux) auxiliary.push({ edge: e, node: railCode[edgeA[e]] ? edgeB[e] : edgeA[e], rail: pass === 0 ? 'power' : 'ground' });
      return { up: sides.up, down: sides.down, auxiliary };
    }
    return null;
  };

  const isClock = options.isClock ?? never;
  for (let d = 0; d < driven.length; d++) {
    const out = driven[d];
    const all: number[] = [];
    for (let r = groupFirst[out]; r >= 0; r = nextInGroup[r]) for (let e = blockHead[r]; e >= 0; e = blockNext[e]) all.push(e);
    let notes: string[] | null = null;
    const up: number[] = [];
    const down: number[] = [];
    let auxiliary: { edge: number; node: number; rail: 'power' | 'ground' }[] | null = null;
    let ok = true;
    for (let r = groupFirst[out]; r >= 0; r = nextInGroup[r]) {
      const rails = blockRails[r];
      if (rails === RAIL_POWER) for (let e = blockHead[r]; e >= 0; e = blockNext[e]) up.push(e);
      else if (rails === RAIL_GROUND) for (let e = blockHead[r]; e >= 0; e = blockNext[e]) down.push(e);
      else if (rails === (RAIL_POWER | RAIL_GROUND)) {
        // Joined through the output itself (an output found by `guessOutput`), or a secondary precharge on a stack node.
        const edges: number[] = [];
        for (let e = blockHead[r]; e >= 0; e = blockNext[e]) edges.push(e);
        const plain = splitAt(edges, out);
        const split = plain ? { up: plain.up, down: plain.down, auxiliary: [] } : splitMixed(edges, out);
        if (!split) {
          ok = false;
          (notes ??= []).push('a path joins the rails without passing through the output');
          continue;
        }
        for (const e of split.up) up.push(e);
        for (const e of split.down) down.push(e);
        for (const x of split.auxiliary) (auxiliary ??= []).push(x);
      }
    }
    const stage = makeStage(all, 'other', out, [out]);
    if (notes) for (const n of notes) stage.notes.push(n);
    if (auxiliary) for (const x of auxiliary) stage.auxiliary.push({ element: elementAt[x.edge], node: x.node, rail: x.rail } satisfies AuxiliaryDevice);
    if (ok) {
      let upEdges = up;
      let downEdges = down;
      if (auxiliary) {
        const auxSet = new Set<number>();
        for (const x of auxiliary) auxSet.add(x.edge);
        upEdges = up.filter((e) => !auxSet.has(e));
        downEdges = down.filter((e) => !auxSet.has(e));
      }
      const pu = reduceSeriesParallel(leaves(upEdges), out, POWER_END);
      const pd = reduceSeriesParallel(leaves(downEdges), out, GROUND_END);
      stage.pullUp = pu.network;
      stage.pullDown = pd.network;
      if (pu.network === null && upEdges.length) stage.notes.push(`pull-up is not series/parallel (${pu.reason})`);
      if (pd.network === null && downEdges.length) stage.notes.push(`pull-down is not series/parallel (${pd.reason})`);
      if (pu.dangling.length + pd.dangling.length) stage.notes.push('devices with a floating end are left out of the networks');
    }
    classifyStage(stage, cell, railOf, isClock, alias);
    stages.push(stage);
  }

  for (const infos of passGroups.values()) {
    const all: number[] = [];
    for (const info of infos) for (const e of info.edges) all.push(e);
    const terminals = sortAscending(infos[0].observed.slice());
    const stage = makeStage(all, 'pass', null, terminals);
    if (terminals.length === 2) stage.channel = reduceSeriesParallel(leaves(all), terminals[0], terminals[1]).network;
    else stage.notes.push(`joins ${terminals.length} observed nets`);
    stages.push(stage);
  }

  for (const info of loose) {
    const terminals = sortAscending(info.observed.slice());
    const stage = makeStage(info.edges, 'other', null, terminals);
    stage.notes.push(
      info.observed.length === 0 ? 'no observed output' : 'joins several observed nets and the rails through shared internal nodes',
    );
    stages.push(stage);
  }

  // Netlist order of anchors, so reports read top to bottom.
  const ordered = inAnchorOrder(stages, rank);
  for (let i = 0; i < ordered.length; i++) {
    const s = ordered[i];
    s.id = i;
    if (s.output !== null && s.kind !== 'pass') driverOf.set(s.output, i);
  }
  return { stages: ordered, driverOf, alias };
}

function ascending(x: number, y: number): number {
  return x - y;
}

/** Sorts numbers in place, ascending. Per-stage lists hold a handful of entries, which insertion sort orders without the work array `Array.prototype.sort` allocates. */
function sortAscending(xs: number[]): number[] {
  if (xs.length > 16) return xs.sort(ascending);
  for (let i = 1; i < xs.length; i++) {
    const x = xs[i];
    let j = i - 1;
    while (j >= 0 && xs[j] > x) {
      xs[j + 1] = xs[j];
      j--;
    }
    xs[j + 1] = x;
  }
  return xs;
}

function never(): boolean {
  return false;
}

/**
 * The stages sorted by anchor as `compareLoc` orders them (a stable sort), comparing numbers: each anchor's file is
 * replaced by its position among the anchors' files in `compareLoc` order.
 */
function inAnchorOrder(stages: Stage[], rank?: (file: string) => number): Stage[] {
  const n = stages.length;
  const fileIds = new Map<string, number>();
  const files: string[] = [];
  const fileOf = new Int32Array(n);
  const line = new Float64Array(n);
  const column = new Float64Array(n);
  let lastFile: string | null = null;
  let f = -1;
  for (let i = 0; i < n; i++) {
    const a = stages[i].anchor;
    if (a.file !== lastFile) {
      lastFile = a.file;
      const known = fileIds.get(a.file);
      if (known === undefined) {
        f = files.push(a.file) - 1;
        fileIds.set(a.file, f);
      } else f = known;
    }
    fileOf[i] = f;
    line[i] = a.line;
    column[i] = a.column;
  }
  const fileOrder = files.map((_, i) => i).sort((x, y) => compareLoc({ file: files[x], line: 0, column: 0 }, { file: files[y], line: 0, column: 0 }, rank));
  const position = new Int32Array(files.length);
  for (let k = 0; k < fileOrder.length; k++) position[fileOrder[k]] = k;
  for (let i = 0; i < n; i++) fileOf[i] = position[fileOf[i]];
  let sorted = true;
  for (let i = 1; i < n && sorted; i++) {
    const c = fileOf[i - 1] - fileOf[i] || line[i - 1] - line[i] || column[i - 1] - column[i];
    if (c > 0) sorted = false;
  }
  if (sorted) return stages;
  const order: number[] = new Array(n);
  for (let i = 0; i < n; i++) order[i] = i;
  order.sort((x, y) => fileOf[x] - fileOf[y] || line[x] - line[y] || column[x] - column[y]);
  const out: Stage[] = new Array(n);
  for (let i = 0; i < n; i++) out[i] = stages[order[i]];
  return out;
}

function compareLoc(x: SourceLoc, y: SourceLoc, rank?: (file: string) => number): number {
  if (x.file !== y.file) return (rank ? rank(x.file) - rank(y.file) : 0) || (x.file < y.file ? -1 : 1);
  return x.line - y.line || x.column - y.column;
}
