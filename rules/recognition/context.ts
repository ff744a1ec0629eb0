// Cell contexts outside the engine's walk, and per-context indices.
//
// Recognition sometimes has to look at a cell the engine is not visiting right now:
// a child, to learn what its ports do (an inverter between two ports, a pass path, a
// port that only reaches gates), or a synthetic cell that gathers the devices on one
// net across the hierarchy (a bit line). Those get contexts of their own here, built
// like the engine's (rails from local evidence, then from the pins), memoised per
// design and deck so each distinct (cell, rails) pair is set up once.

import type { Cell, Design, RailKind } from '../../grammar/design';
import type { Deck } from '../../shared/deck';
import { globMatcher } from '../../shared/deck';
import type { CellContext, PortSignal } from '../types';
import { zeroOhmAlias } from '../net-groups';
import { stageEnvironment, stagesOf, isMosElement } from '../stages';
import type { CellStages, Stage, StageEnvironment } from '../stages';

const supplyMatchers = new WeakMap<Deck, { power: (name: string) => boolean; ground: (name: string) => boolean }>();

/**
 * Rails each net of a cell carries from local evidence: name patterns, `.global` names held by a source, sources
 * inside the cell, and wells: a port (or global) that is the body of p-channel devices and otherwise touches only
 * p-channel channels, never a gate, is an n-well supply (a second supply such as a level shifter's low-voltage
 * rail); the mirror image is a ground.
 */
export function localRails(design: Design, cell: Cell, deck: Deck): (RailKind | undefined)[] {
  let matchers = supplyMatchers.get(deck);
  if (!matchers) supplyMatchers.set(deck, (matchers = { power: globMatcher(deck.supplies.power), ground: globMatcher(deck.supplies.ground) }));
  const isPower = matchers.power;
  const isGround = matchers.ground;
  const n = cell.nets.length;
  const rails: (RailKind | undefined)[] = new Array(n);
  let unnamedPorts = false;
  for (let i = 0; i < n; i++) {
    const name = cell.nets[i];
    const sourced = design.sourcedRails.get(name.toLowerCase());
    if (sourced) rails[i] = sourced.rail;
    else if (isGround(name)) rails[i] = 'ground';
    else if (isPower(name)) rails[i] = 'power';
  }
  for (const p of cell.ports) if (rails[p] === undefined) unnamedPorts = true;
  if (!unnamedPorts && design.globals.size === 0) return rails;
  // Per net: bit 0 body of p, 1 body of n, 2 p channel, 3 n channel, 4 gate.
  const use = new Uint8Array(n);
  const mos = cell.mosfets;
  for (let i = 0; i < mos.length; i++) {
    const p = !mos.isN(i);
    use[mos.bulk[i]] |= p ? 1 : 2;
    use[mos.drain[i]] |= p ? 4 : 8;
    use[mos.source[i]] |= p ? 4 : 8;
    use[mos.gate[i]] |= 16;
  }
  const candidate = new Uint8Array(n);
  for (const p of cell.ports) candidate[p] = 1;
  for (let i = 0; i < n; i++) if (design.globals.has(cell.nets[i].toLowerCase())) candidate[i] = 1;
  for (let i = 0; i < n; i++) {
    if (rails[i] !== undefined || !candidate[i] || use[i] & 16) continue;
    if (use[i] & 1 && !(use[i] & (2 | 8))) rails[i] = 'power';
    else if (use[i] & 2 && !(use[i] & (1 | 4))) rails[i] = 'ground';
  }
  return rails;
}

/** Local rails completed by what the parent ties each port to. */
export function railsWithPorts(design: Design, cell: Cell, deck: Deck, portRails: readonly (RailKind | undefined)[]): (RailKind | undefined)[] {
  const rails = localRails(design, cell, deck);
  cell.ports.forEach((net, i) => {
    if (rails[net] === undefined && portRails[i] !== undefined) rails[net] = portRails[i];
  });
  return rails;
}

export function railSignature(rails: readonly (RailKind | undefined)[]): string {
  let s = '';
  for (const r of rails) s += r === 'power' ? 'P' : r === 'ground' ? 'G' : '-';
  return s;
}

type MemoStore = Map<string, unknown>;
const designMemos = new WeakMap<Design, WeakMap<Deck, MemoStore>>();

/** A value memoised per design and deck. */
export function designMemo<T>(design: Design, deck: Deck, key: string, compute: () => T): T {
  let byDeck = designMemos.get(design);
  if (!byDeck) designMemos.set(design, (byDeck = new WeakMap()));
  let store = byDeck.get(deck);
  if (!store) byDeck.set(deck, (store = new Map()));
  const hit = store.get(key);
  if (hit !== undefined || store.has(key)) return hit as T;
  const value = compute();
  store.set(key, value);
  return value;
}

/** `localRails` of a cell, computed once per design and deck (callers copy it before adding port rails). */
export function localRailsOf(design: Design, deck: Deck, cell: Cell): readonly (RailKind | undefined)[] {
  return designMemo(design, deck, `local-rails|${cell.key}`, () => localRails(design, cell, deck));
}

export interface ContextOptions {
  instances?: number;
  signals?: readonly (PortSignal | undefined)[];
  /** Treat the cell's ports as local nets (a root, or a synthetic cell). */
  root?: boolean;
}

/** A context for a cell: the one the engine visits, a child looked into, or a synthetic cell. */
export function makeContext(design: Design, deck: Deck, cell: Cell, rails: (RailKind | undefined)[], options: ContextOptions = {}): CellContext {
  const memo = new Map<string, unknown>();
  return {
    design,
    cell,
    deck,
    instances: options.instances ?? 1,
    rails,
    signals: options.signals,
    root: options.root,
    memo<T>(k: string, compute: () => T): T {
      // One lookup on a hit (memos are read millions of times on a flat netlist); `has` only for a stored undefined.
      const hit = memo.get(k);
      if (hit !== undefined || memo.has(k)) return hit as T;
      const value = compute();
      memo.set(k, value);
      return value;
    },
  };
}

/** The context of a child cell under the rails its parent ties its ports to (no clock context). */
export function childContext(design: Design, deck: Deck, cellKey: string, portRails: readonly (RailKind | undefined)[]): CellContext | null {
  const cell = design.cells.get(cellKey);
  if (!cell) return null;
  return designMemo(design, deck, childKey(cellKey, portRails), () => {
    const base = localRailsOf(design, deck, cell);
    const rails = base.slice();
    cell.ports.forEach((net, i) => {
      if (rails[net] === undefined && portRails[i] !== undefined) rails[net] = portRails[i];
    });
    designMemo(design, deck, 'child-contexts-seen', () => new Set<string>()).add(childKey(cellKey, portRails));
    return makeContext(design, deck, cell, rails);
  });
}

function childKey(cellKey: string, portRails: readonly (RailKind | undefined)[]): string {
  return `child|${cellKey}|${railSignature(portRails)}`;
}

/** The memo key under which rules/stages/index.ts keeps a context's stages (`stagesOf`). */
export const STAGES_MEMO_KEY = 'stages';

/**
 * Lets an engine context start from the stages a look from its parent already extracted for the same cell under the
 * same rails (a big flat cell under a small top level is then extracted once, not twice). The engine context gets its
 * own list, so that what clock tracing recognises in it (stages it replaces) stays its own.
 */
export function adoptChildStages(ctx: CellContext, portRails: readonly (RailKind | undefined)[]): void {
  const store = designMemo(ctx.design, ctx.deck, 'child-contexts-seen', () => new Set<string>());
  const key = childKey(ctx.cell.key, portRails);
  if (!store.has(key)) return;
  const donor = childContext(ctx.design, ctx.deck, ctx.cell.key, portRails)!;
  const base = stagesOf(donor);
  const own = ctx.memo<CellStages>(STAGES_MEMO_KEY, () => ({ ...base, stages: base.stages.slice() }));
  // Same cell, same rails: the donor's net index holds here too, and so do its stage lists, since clock tracing only
  // turns clocked stages into dynamic ones (ids, inputs, elements and pass stages stay). Built once, not twice, for a big flat cell.
  ctx.memo<NetIndex>(NET_INDEX_MEMO_KEY, () => netIndex(donor));
  ctx.memo<CellIndex>(CELL_INDEX_MEMO_KEY, () => ({ ...cellIndex(donor), stages: own }));
}

/** Rails of an instance's pins as its parent sees them. */
export function pinRails(ctx: CellContext, pins: readonly number[]): (RailKind | undefined)[] {
  return pins.map((p) => ctx.rails[p]);
}

// ---------------------------------------------------------------------------
// Per-context indices over alias roots (nets merged by zero-ohm ties).

/** Lists per net, stored compactly: values of net n are `list[start[n]] … list[start[n + 1] - 1]`. */
export class NetLists {
  constructor(
    readonly start: Int32Array,
    readonly list: Int32Array,
  ) {}
  count(net: number): number {
    return this.start[net + 1] - this.start[net];
  }
  of(net: number): Int32Array {
    return this.list.subarray(this.start[net], this.start[net + 1]);
  }
}

/** Builds NetLists from (net, value) pairs given as two parallel arrays. */
function buildLists(netCount: number, nets: ArrayLike<number>, values: ArrayLike<number>, length: number): NetLists {
  const start = new Int32Array(netCount + 1);
  for (let i = 0; i < length; i++) start[nets[i] + 1]++;
  for (let n = 0; n < netCount; n++) start[n + 1] += start[n];
  const fill = start.slice(0, netCount);
  const list = new Int32Array(length);
  for (let i = 0; i < length; i++) list[fill[nets[i]]++] = values[i];
  return new NetLists(start, list);
}

class PairBuffer {
  nets: Int32Array;
  values: Int32Array;
  length = 0;
  constructor(capacity: number) {
    this.nets = new Int32Array(Math.max(capacity, 4));
    this.values = new Int32Array(Math.max(capacity, 4));
  }
  push(net: number, value: number) {
    if (this.length === this.nets.length) {
      const n = new Int32Array(this.nets.length * 2);
      n.set(this.nets);
      this.nets = n;
      const v = new Int32Array(this.values.length * 2);
      v.set(this.values);
      this.values = v;
    }
    this.nets[this.length] = net;
    this.values[this.length++] = value;
  }
  lists(netCount: number): NetLists {
    return buildLists(netCount, this.nets, this.values, this.length);
  }
}

/** Devices, pins and rails of a context by net, without stage extraction (what a look into a child needs). */
export interface NetIndex {
  /** Nets merged by zero-ohm ties: net → representative (the smallest id of its group, as stage extraction has it). */
  alias: Int32Array;
  railOf(net: number): RailKind | undefined;
  /** MOS devices with a channel terminal (drain or source) on the net; a device appears twice when both are. */
  channel: NetLists;
  /** MOS devices gated by the net. */
  gates: NetLists;
  /** Other devices (`cell.others` index) with a terminal on the net. */
  others: NetLists;
  /** Instance pins on the net: the instance (`cell.instances` index) and, at the same position, the pin. */
  pinInstances: NetLists;
  pinPorts: NetLists;
  /** Whether the net is a port of the cell. */
  isPort: Uint8Array;
}

export interface CellIndex extends NetIndex {
  stages: CellStages;
  /** Stages (driving or pass) with the net among their gate inputs. */
  inputOf: NetLists;
  /** Pass stages with the net among their terminals. */
  passAt: NetLists;
  /** Stage that owns each MOS device (−1 when none: both ends on rails). */
  stageOfMos: Int32Array;
}

const NET_INDEX_MEMO_KEY = 'recognition.net-index';
const CELL_INDEX_MEMO_KEY = 'recognition.index';

/** Nets, devices and pins of a context, indexed by net, without extracting its stages. */
export function netIndex(ctx: CellContext): NetIndex {
  return ctx.memo(NET_INDEX_MEMO_KEY, () => {
    const lists = netListsOf(ctx.cell);
    const { alias } = lists;
    const railRoot: (RailKind | undefined)[] = new Array(ctx.cell.nets.length);
    for (let i = 0; i < ctx.cell.nets.length; i++) if (ctx.rails[i]) railRoot[alias[i]] = ctx.rails[i];
    return {
      ...lists,
      railOf: (net: number) => (net < 0 ? (net === -1 ? 'power' : 'ground') : railRoot[alias[net]]),
    } satisfies NetIndex;
  });
}

/** What a net index holds that does not depend on the rails of a context. */
type CellNetLists = Omit<NetIndex, 'railOf'>;

/** A cell's device and pin lists by net, built once per cell and shared by every context of it (they differ only in rails). */
const cellNetListsMemo = new WeakMap<Cell, CellNetLists>();

function netListsOf(cell: Cell): CellNetLists {
  const known = cellNetListsMemo.get(cell);
  if (known) return known;
  const alias = zeroOhmAlias(cell);
  const n = cell.nets.length;
  const channel = new PairBuffer(cell.mosfets.length * 2);
  const gates = new PairBuffer(cell.mosfets.length);
  const mos = cell.mosfets;
  for (let i = 0; i < mos.length; i++) {
    channel.push(alias[mos.drain[i]], i);
    channel.push(alias[mos.source[i]], i);
    gates.push(alias[mos.gate[i]], i);
  }
  const others = new PairBuffer(cell.others.length * 2);
  for (let i = 0; i < cell.others.length; i++) {
    const [a, b] = terminalsOf(cell.others[i]);
    others.push(alias[a], i);
    if (alias[b] !== alias[a]) others.push(alias[b], i);
  }
  const pinInstances = new PairBuffer(cell.instances.length * 4);
  const pinPorts = new PairBuffer(cell.instances.length * 4);
  cell.instances.forEach((inst, k) => {
    inst.pins.forEach((p, j) => {
      pinInstances.push(alias[p], k);
      pinPorts.push(alias[p], j);
    });
  });
  const isPort = new Uint8Array(n);
  for (const p of cell.ports) isPort[alias[p]] = 1;
  const lists: CellNetLists = {
    alias,
    channel: channel.lists(n),
    gates: gates.lists(n),
    others: others.lists(n),
    pinInstances: pinInstances.lists(n),
    pinPorts: pinPorts.lists(n),
    isPort,
  };
  cellNetListsMemo.set(cell, lists);
  return lists;
}

/** Nets, devices, pins and stages of a context, indexed by net. */
export function cellIndex(ctx: CellContext): CellIndex {
  return ctx.memo(CELL_INDEX_MEMO_KEY, () => {
    const stages = stagesOf(ctx);
    const light = netIndex(ctx);
    const n = ctx.cell.nets.length;
    const inputOf = new PairBuffer(stages.stages.length * 2);
    const passAt = new PairBuffer(stages.stages.length);
    const stageOfMos = new Int32Array(ctx.cell.mosfets.length).fill(-1);
    for (const s of stages.stages) {
      for (const x of s.inputs) inputOf.push(x, s.id);
      if (s.kind === 'pass') for (const t of s.terminals) passAt.push(t, s.id);
      for (const e of s.elements) if (isMosElement(e)) stageOfMos[e] = s.id;
    }
    return { ...light, stages, inputOf: inputOf.lists(n), passAt: passAt.lists(n), stageOfMos } satisfies CellIndex;
  });
}

/** The two terminals of a resistor, capacitor, source or diode. */
export function terminalsOf(o: Cell['others'][number]): [number, number] {
  switch (o.kind) {
    case 'diode':
      return [o.anode, o.cathode];
    case 'vsrc':
    case 'isrc':
      return [o.pos, o.neg];
    default:
      return [o.a, o.b];
  }
}

/** Static stages restore levels: their outputs are driven to a rail through a complementary or ratioed network. */
export const RESTORING_KINDS: ReadonlySet<Stage['kind']> = new Set(['inverter', 'complementary', 'ratioed', 'clocked']);

/** Whether the cell's ports are local nets here: a root of the design, or a synthetic cell. */
export function portsAreLocal(ctx: CellContext): boolean {
  return ctx.root ?? (ctx.cell.isTopLevel || ctx.design.roots.includes(ctx.cell.key));
}

/** The stage-analysis environment of a context (rails and ties as its stages see them), made once. */
export function stageEnvironmentOf(ctx: CellContext): StageEnvironment {
  return ctx.memo('recognition.stage-environment', () => stageEnvironment(ctx, stagesOf(ctx)));
}
