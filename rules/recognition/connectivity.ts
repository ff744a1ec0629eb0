// DC connectivity of a cell: which nets some path of device channels, resistors,
// sources or diodes ties to a level (a rail, a port driven from outside, or a child
// that connects the pin to a channel inside), whatever the gates do.
//
// A net reached by no such path is undefined at DC: a gate on it floats, and a group
// of nets joined only to each other (an island of pass devices, a stack whose rail
// end is missing) keeps whatever charge it happened to have. Capacitors do not
// count: they hold charge, they do not set a level.

import type { CellContext } from '../types';
import { cellIndex, terminalsOf } from './context';
import { UnionFind } from '../net-groups';
import { channelPorts } from './region';

export interface Connectivity {
  /** Component of each net (alias roots; a union-find parent array after compression). */
  component: Int32Array;
  /** Whether each component holds a rail, a port or a driving child pin. */
  anchored: Uint8Array;
  /** Whether each net has a channel, resistor, source or diode terminal here, or a pin whose child reaches a channel. */
  connected: Uint8Array;
}

export function connectivityOf(ctx: CellContext): Connectivity {
  return ctx.memo('recognition.connectivity', () => {
    const index = cellIndex(ctx);
    const cell = ctx.cell;
    const n = cell.nets.length;
    const groups = new UnionFind(n);
    const alias = index.alias;
    const connected = new Uint8Array(n);
    const mos = cell.mosfets;
    for (let i = 0; i < mos.length; i++) {
      const d = alias[mos.drain[i]];
      const s = alias[mos.source[i]];
      connected[d] = connected[s] = 1;
      groups.union(d, s);
    }
    for (const o of cell.others) {
      if (o.kind === 'cap') continue;
      const [a, b] = terminalsOf(o);
      connected[alias[a]] = connected[alias[b]] = 1;
      groups.union(alias[a], alias[b]);
    }
    for (let i = 0; i < n; i++) groups.union(i, alias[i]);
    const anchored = new Uint8Array(n);
    for (let i = 0; i < n; i++) if (index.railOf(i)) anchored[groups.find(i)] = 1;
    for (const p of cell.ports) anchored[groups.find(alias[p])] = 1;
    cell.instances.forEach((inst, k) => {
      const reach = channelPorts(ctx, k);
      inst.pins.forEach((p, j) => {
        if (reach[j]) {
          anchored[groups.find(alias[p])] = 1;
          connected[alias[p]] = 1;
        }
      });
    });
    const component = new Int32Array(n);
    for (let i = 0; i < n; i++) component[i] = groups.find(i);
    return { component, anchored, connected };
  });
}
