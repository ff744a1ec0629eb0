import { z } from 'zod';
import { defineRule } from '../types';
import { cellIndex } from '../recognition/context';
import { connectivityOf } from '../recognition/connectivity';

const MAX_LISTED = 20;

export default defineRule({
  meta: {
    id: 'net.floating-gate',
    title: 'Gate with nothing driving it',
    area: 'net',
    rationale:
      'A gate input that no device, resistor, source or port connects to sits at whatever charge it picked up: it can settle mid-rail and turn both devices of a stage on, ' +
      'draw static current and make the stage’s output meaningless. Usually a net name is misspelt, or a pin left unconnected.',
    fix: 'Connect the net to its driver (check its spelling against the driver’s output), or tie an unused input to the rail that keeps its stage inactive.',
    defaultSeverity: 'error',
  },
  params: z.object({}),
  check(ctx, _p, report) {
    const index = cellIndex(ctx);
    const conn = connectivityOf(ctx);
    const cell = ctx.cell;
    const seen = new Uint8Array(cell.nets.length);
    const consider = (net: number) => {
      if (seen[net]) return;
      seen[net] = 1;
      if (index.railOf(net) || index.isPort[net] || conn.connected[net] || conn.anchored[conn.component[net]]) return;
      const gated = [...index.gates.of(net)].map((i) => cell.mosfets.at(i));
      const pins = [...index.pinInstances.of(net)].map((k) => cell.instances[k]);
      if (!gated.length && !pins.length) return;
      const loc = gated[0]?.loc ?? pins[0].loc;
      const what = [...gated.map((m) => m.name), ...pins.map((i) => `${i.name} (instance pin)`)];
      report({
        message:
          `${cell.nets[net]} gates ${what.slice(0, MAX_LISTED).join(', ')}${what.length > MAX_LISTED ? ` and ${what.length - MAX_LISTED} more` : ''} ` +
          `but nothing drives it: no device channel, resistor, source or port reaches it.`,
        loc,
        nets: [cell.nets[net]],
        devices: [...gated.map((m) => m.name), ...pins.map((i) => i.name)].slice(0, 50),
      });
    };
    for (let i = 0; i < cell.mosfets.length; i++) consider(index.alias[cell.mosfets.gate[i]]);
    for (const inst of cell.instances) for (const p of inst.pins) consider(index.alias[p]);
  },
});
