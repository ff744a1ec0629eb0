// ngspice runs the rule tests compare with: a transient analysis read at its last time
// point, and an operating point. Same binary and batch conventions as
// tests/support/ngspice.ts (which provides the DC sweeps).

import { spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { ensureNgspice } from '../support/ngspice';

function runDeck(body: string, control: string[], dataFile: string): { data: string | null; log: string } {
  const bin = ensureNgspice();
  const dir = mkdtempSync(join(tmpdir(), 'keepwell-ngspice-'));
  try {
    const data = join(dir, dataFile);
    const deck = ['* keepwell reference run', body.trim(), '.options reltol=1e-9 abstol=1e-18 vntol=1e-12', '.control', ...control.map((l) => l.replace('%DATA%', data)), '.endc', '.end', ''].join('\n');
    const file = join(dir, 'deck.cir');
    writeFileSync(file, deck);
    const run = spawnSync(bin, ['-b', file], { encoding: 'utf8', timeout: 60_000 });
    return { data: existsSync(data) ? readFileSync(data, 'utf8') : null, log: `${run.stdout}\n${run.stderr}` };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

/** Values of `vectors` at the end of a transient run of `stop` seconds (initial conditions from `.ic` lines, `uic`). */
export function transientEnd(body: string, stop: number, step: number, vectors: string[]): number[] {
  const { data, log } = runDeck(body, [`tran ${step} ${stop} uic`, `wrdata %DATA% ${vectors.join(' ')}`], 'tran.txt');
  if (!data) throw new Error(`ngspice wrote no data: ${log.slice(0, 2000)}`);
  const rows = data
    .split('\n')
    .map((l) => l.trim().split(/\s+/).map(Number))
    .filter((c) => c.length >= 2 * vectors.length && c.every(Number.isFinite));
  const last = rows[rows.length - 1];
  return vectors.map((_, i) => last[2 * i + 1]);
}

/** Values of `vectors` at the DC operating point. */
export function operatingPoint(body: string, vectors: string[]): number[] {
  const { data, log } = runDeck(body, ['op', `wrdata %DATA% ${vectors.join(' ')}`], 'op.txt');
  if (!data) throw new Error(`ngspice wrote no data: ${log.slice(0, 2000)}`);
  const cols = data.trim().split(/\s+/).map(Number);
  return vectors.map((_, i) => cols[2 * i + 1]);
}

/** ngspice's own log of an operating-point run (for its warnings). */
export function operatingPointLog(body: string): string {
  return runDeck(body, ['op'], 'none.txt').log;
}
