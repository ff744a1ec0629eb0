// A net's neighbourhood across the hierarchy, gathered into one synthetic cell.
//
// A precharged bit line is one net in the cell that ties the column together, but its
// precharge device sits in a precharge cell, its evaluation stacks in every bit cell
// and its keeper and sense inverter in a sense cell. To judge it as one dynamic node,
// recognition follows the net down through every instance it reaches and copies, into
// a synthetic cell, each device with a channel terminal on it (continuing through the
// unobserved stack nodes of each child, stopping at nets the child observes), each
// whole stage that the net gates (its receivers, whose outputs drive keepers), and the
// capacitors on those nets. Nets of the cell the walk started from keep their names;
// nets inside children are named by instance path (`Xcol3/Xb12/rd_mid`). Devices keep
// their own source lines, so findings still anchor at the precharge device's line.
//
// The walk only goes down: it starts at the cell where the net is local (or at a root,
// where ports are local too). A cell that only sees the net as a port leaves it to the
// parent, which sees all of it.

import type { Capacitor, Cell, RailKind, Resistor, SourceLoc } from '../../grammar/design';
import { MosfetTable } from '../../grammar/mosfet-table';
import type { CellContext } from '../types';
import { cellIndex, childContext, designMemo, makeContext, netIndex, pinRails, RESTORING_KINDS, terminalsOf, type CellIndex } from './context';
import { primeClockHint, timingOf, type Timing } from './timing';
import { isMosElement, elementIndex } from '../stages';

/** Past this many devices a region is not built (a power grid or a global net, not a bit line). */
export const MAX_REGION_DEVICES = 20_000;

/** Memo key of a region context: synthetic nets that a restoring stage drives in the cell owning them. */
export const REGION_DRIVEN_KEY = 'recognition.region-driven';

export interface Region {
  /** Synthetic context holding the devices of the region; its cell's first port is the net. */
  ctx: CellContext;
  node: number;
  /** Net of the engine's cell that each synthetic net stands for, when it is one (not a net inside a child). */
  hostNet: Map<number, number>;
  /** Instance paths that contributed devices (for messages). */
  paths: string[];
}

interface Level {
  ctx: CellContext;
  index: CellIndex;
  /** Path prefix of names in this level (`Xa/Xb/`), empty at the start cell. */
  path: string;
  parent: Level | null;
  /** Instance (in the parent cell) this level is. */
  instance: number;
}

/** Whether each port of a child (under the rails its parent gives it) has a device that could precharge it: a p-channel device to the supply, or an n-channel device to ground, gated by a signal. */
export function prechargePorts(ctx: CellContext, instance: number): Uint8Array {
  const inst = ctx.cell.instances[instance];
  const child = childContext(ctx.design, ctx.deck, inst.cell, pinRails(ctx, inst.pins));
  if (!child) return new Uint8Array(inst.pins.length);
  return child.memo('recognition.precharge-ports', () => {
    const index = netIndex(child);
    const cell = child.cell;
    const out = new Uint8Array(cell.ports.length);
    cell.ports.forEach((p, j) => {
      const net = index.alias[p];
      if (index.railOf(net)) return;
      const devices = index.channel.of(net);
      for (let k = 0; k < devices.length && !out[j]; k++) {
        const mos = cell.mosfets;
        const d = devices[k];
        const other = index.alias[mos.drain[d]] === net ? mos.source[d] : mos.drain[d];
        const rail = index.railOf(other);
        if (index.railOf(mos.gate[d])) continue;
        if (mos.isN(d) ? rail === 'ground' : rail === 'power') out[j] = 1;
      }
      if (out[j]) return;
      const insts = index.pinInstances.of(net);
      const ports = index.pinPorts.of(net);
      for (let k = 0; k < insts.length && !out[j]; k++) if (prechargePorts(child, insts[k])[ports[k]]) out[j] = 1;
    });
    return out;
  });
}

/** Whether each port of a child reaches a device channel (or a resistor) inside it, at any depth. */
export function channelPorts(ctx: CellContext, instance: number): Uint8Array {
  const inst = ctx.cell.instances[instance];
  return designMemo(ctx.design, ctx.deck, `channel-ports|${inst.cell}`, () => {
    const cell = ctx.design.cells.get(inst.cell);
    if (!cell) return new Uint8Array(inst.pins.length);
    const child = childContext(ctx.design, ctx.deck, inst.cell, []);
    if (!child) return new Uint8Array(inst.pins.length);
    const index = netIndex(child);
    const out = new Uint8Array(cell.ports.length);
    cell.ports.forEach((p, j) => {
      const net = index.alias[p];
      if (index.channel.count(net) > 0) out[j] = 1;
      const others = index.others.of(net);
      for (let k = 0; k < others.length && !out[j]; k++) if (cell.others[others[k]].kind === 'res') out[j] = 1;
      const insts = index.pinInstances.of(net);
      const ports = index.pinPorts.of(net);
      for (let k = 0; k < insts.length && !out[j]; k++) if (channelPorts(child, insts[k])[ports[k]]) out[j] = 1;
    });
    return out;
  });
}

/** Builds the region of `net` (a local net of `ctx`, or a port of a root). Null when it reaches no child or grows too large. */
export function buildRegion(ctx: CellContext, net: number): Region | null {
  const byNet = ctx.memo('recognition.region', () => new Map<number, Region | null>());
  let region = byNet.get(net);
  if (region === undefined) byNet.set(net, (region = build(ctx, net)));
  return region;
}

function build(ctx: CellContext, start: number): Region | null {
  const rootIndex = cellIndex(ctx);
  const root: Level = { ctx, index: rootIndex, path: '', parent: null, instance: -1 };
  const levels = new Map<string, Level>([['', root]]);
  const nets: string[] = [];
  const rails: (RailKind | undefined)[] = [];
  const isPortNet: boolean[] = [];
  /** Nets a restoring stage drives in the cell that owns them (a bit cell's storage node, a driver outside the region). */
  const driven = new Set<number>();
  /** Synthetic net of each (level path, local alias root). */
  const ids = new Map<string, number>();
  const rootNets = new Map<number, number>();
  const mosfets = new MosfetTable();
  const others: (Resistor | Capacitor)[] = [];
  const addedMos = new Set<string>();
  const addedOther = new Set<string>();
  const expanded = new Set<string>();
  const paths = new Set<string>();
  let tooLarge = false;

  const childLevel = (level: Level, instance: number): Level | null => {
    const inst = level.ctx.cell.instances[instance];
    const path = `${level.path}${inst.name}/`;
    let l = levels.get(path);
    if (!l) {
      const c = childContext(ctx.design, ctx.deck, inst.cell, pinRails(level.ctx, inst.pins));
      if (!c) return null;
      l = { ctx: c, index: cellIndex(c), path, parent: level, instance };
      levels.set(path, l);
    }
    return l;
  };

  /** Synthetic id of a local net: ports of children are their parent's pin nets. */
  const idOf = (level: Level, local: number): number => {
    let l = level;
    let x = l.index.alias[local];
    while (l.parent && l.index.isPort[x]) {
      const portIndex = l.ctx.cell.ports.findIndex((p) => l.index.alias[p] === x);
      const pin = l.parent.ctx.cell.instances[l.instance].pins[portIndex];
      x = l.parent.index.alias[pin];
      l = l.parent;
    }
    const key = `${l.path}|${x}`;
    let id = ids.get(key);
    if (id === undefined) {
      id = nets.length;
      ids.set(key, id);
      nets.push(`${l.path}${l.ctx.cell.nets[x]}`);
      rails.push(l.index.railOf(x));
      // Nets of the start cell, and nets a child observes, are terminals of the synthetic cell.
      const observed = l.parent === null || l.index.gates.count(x) > 0 || l.index.pinInstances.count(x) > 0;
      isPortNet.push(observed);
      if (l.parent === null) rootNets.set(x, id);
      const d = l.index.stages.driverOf.get(x);
      if (d !== undefined && RESTORING_KINDS.has(l.index.stages.stages[d].kind)) driven.add(id);
    }
    return id;
  };

  const startId = idOf(root, start);
  const addMos = (level: Level, i: number) => {
    const key = `${level.path}|${i}`;
    if (addedMos.has(key)) return;
    addedMos.add(key);
    if (addedMos.size > MAX_REGION_DEVICES) {
      tooLarge = true;
      return;
    }
    const m = level.ctx.cell.mosfets.at(i);
    if (level.path) paths.add(level.path.slice(0, -1));
    mosfets.push({
      ...m,
      name: `${level.path}${m.name}`,
      drain: idOf(level, m.drain),
      gate: idOf(level, m.gate),
      source: idOf(level, m.source),
      bulk: idOf(level, m.bulk),
    });
  };
  const addOther = (level: Level, i: number) => {
    const key = `${level.path}|${i}`;
    if (addedOther.has(key)) return;
    const o = level.ctx.cell.others[i];
    if (o.kind !== 'res' && o.kind !== 'cap') return;
    addedOther.add(key);
    others.push({ ...o, name: `${level.path}${o.name}`, a: idOf(level, o.a), b: idOf(level, o.b) } as Resistor | Capacitor);
  };

  const queue: [Level, number][] = [[root, rootIndex.alias[start]]];
  while (queue.length && !tooLarge) {
    const [level, x] = queue.pop()!;
    const key = `${level.path}|${x}`;
    if (expanded.has(key)) continue;
    expanded.add(key);
    const { index } = level;
    const cell = level.ctx.cell;
    const isNode = idOf(level, x) === startId;
    const channel = index.channel.of(x);
    for (let k = 0; k < channel.length; k++) {
      const i = channel[k];
      addMos(level, i);
      const drain = index.alias[cell.mosfets.drain[i]];
      const other = drain === x ? index.alias[cell.mosfets.source[i]] : drain;
      if (index.railOf(other) || other === x) continue;
      if (index.gates.count(other) > 0 || index.isPort[other] || index.pinInstances.count(other) > 0) {
        idOf(level, other);
        // A child port reached through a channel: the walk continues in the parent only when it is the node itself.
        continue;
      }
      queue.push([level, other]);
    }
    const os = index.others.of(x);
    for (let k = 0; k < os.length; k++) {
      const o = cell.others[os[k]];
      if (o.kind === 'cap') addOther(level, os[k]);
      else if (o.kind === 'res') {
        addOther(level, os[k]);
        const [a, b] = terminalsOf(o);
        const other = index.alias[a] === x ? index.alias[b] : index.alias[a];
        if (!index.railOf(other) && !index.gates.count(other) && !index.isPort[other] && !index.pinInstances.count(other)) queue.push([level, other]);
      }
    }
    if (isNode) {
      // Receivers: whole stages the node gates, and the capacitors on their nets.
      const gated = index.gates.of(x);
      for (let k = 0; k < gated.length; k++) {
        const sid = index.stageOfMos[gated[k]];
        if (sid < 0) {
          addMos(level, gated[k]);
          continue;
        }
        for (const el of index.stages.stages[sid].elements) {
          if (isMosElement(el)) addMos(level, el);
          else addOther(level, elementIndex(el));
        }
      }
    }
    const insts = index.pinInstances.of(x);
    const ports = index.pinPorts.of(x);
    for (let k = 0; k < insts.length; k++) {
      const child = childLevel(level, insts[k]);
      if (!child) continue;
      const childNet = child.index.alias[child.ctx.cell.ports[ports[k]]];
      queue.push([child, childNet]);
    }
  }
  if (tooLarge || paths.size === 0) return null;

  const cell = ctx.cell;
  const loc: SourceLoc = cell.loc;
  const ports: number[] = [startId];
  for (let i = 0; i < nets.length; i++) if (i !== startId && isPortNet[i]) ports.push(i);
  const netIndex = new Map<string, number>();
  nets.forEach((n, i) => {
    if (!netIndex.has(n.toLowerCase())) netIndex.set(n.toLowerCase(), i);
  });
  const synthetic: Cell = {
    name: cell.name,
    key: `${cell.key}#${cell.nets[start]}`,
    ports,
    portDirections: ports.map(() => undefined),
    nets,
    netIndex,
    netLocs: nets.map(() => loc),
    mosfets,
    others,
    instances: [],
    loc,
    isTopLevel: false,
    params: cell.params,
  };
  const timing = timingOf(ctx).timing;
  const signals: (Timing | undefined)[] = ports.map(() => undefined);
  for (const [local, id] of rootNets) {
    const at = ports.indexOf(id);
    if (at >= 0) signals[at] = timing[local];
  }
  const regionCtx = makeContext(ctx.design, ctx.deck, synthetic, rails, { instances: ctx.instances, signals, root: true });
  primeClockHint(regionCtx);
  regionCtx.memo(REGION_DRIVEN_KEY, () => driven);
  const hostNet = new Map<number, number>();
  for (const [local, id] of rootNets) hostNet.set(id, local);
  return { ctx: regionCtx, node: startId, hostNet, paths: [...paths].sort() };
}
