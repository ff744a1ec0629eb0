import { z } from 'zod';
import { defineRule } from '../types';
import { cellIndex } from '../recognition/context';
import { connectivityOf } from '../recognition/connectivity';

const MAX_LISTED = 20;

export default defineRule({
  meta: {
    id: 'net.no-dc-path',
    title: 'Nets with no DC path to a supply or a port',
    area: 'net',
    rationale:
      'Nets joined to each other through device channels but, whatever the gates do, never to a supply, a port or a driving instance keep whatever charge they start with. ' +
      'Anything they drive is undefined at power-up and drifts with leakage: typically a stack whose rail end is misnamed, or a pass-device island cut off from its driver.',
    fix: 'Connect the group to its intended supply or driver (check the spelling of the rail or driver net at the end of the group).',
    defaultSeverity: 'error',
  },
  params: z.object({}),
  check(ctx, _p, report) {
    const index = cellIndex(ctx);
    const conn = connectivityOf(ctx);
    const cell = ctx.cell;
    const groups = new Map<number, number[]>();
    for (let net = 0; net < cell.nets.length; net++) {
      if (index.alias[net] !== net || !conn.connected[net] || index.railOf(net)) continue;
      const c = conn.component[net];
      if (conn.anchored[c]) continue;
      const list = groups.get(c);
      if (list) list.push(net);
      else groups.set(c, [net]);
    }
    for (const nets of groups.values()) {
      const devices = new Set<number>();
      for (const net of nets) for (const i of index.channel.of(net)) devices.add(i);
      const gating = nets.filter((n) => index.gates.count(n) > 0 || index.pinInstances.count(n) > 0);
      const ms = [...devices].sort((x, y) => x - y).map((i) => cell.mosfets.at(i));
      const loc = ms[0]?.loc ?? cell.netLocs[nets[0]];
      const names = nets.map((n) => cell.nets[n]);
      report({
        message:
          `${names.slice(0, MAX_LISTED).join(', ')}${names.length > MAX_LISTED ? ` and ${names.length - MAX_LISTED} more nets` : ''} ` +
          `${names.length > 1 ? 'connect' : 'connects'} only to ${names.length > 1 ? 'each other' : 'itself'} through ${ms.length ? ms.slice(0, MAX_LISTED).map((m) => m.name).join(', ') : 'resistors or sources'}: ` +
          `no DC path reaches a supply, a port or a driving instance` +
          (gating.length ? `, yet ${gating.map((n) => cell.nets[n]).slice(0, MAX_LISTED).join(', ')} ${gating.length > 1 ? 'drive' : 'drives'} gates.` : '.'),
        loc,
        nets: names.slice(0, 50),
        devices: ms.slice(0, 50).map((m) => m.name),
      });
    }
  },
});
