// The external reference for the electrical tests: the ngspice circuit simulator
// from Debian's `ngspice` package. Located on PATH; installed with apt-get when
// missing and running as root, as the project's other services are.

import { execFileSync, spawnSync } from 'node:child_process';
import { existsSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

let located: string | null | undefined;

function which(name: string): string | null {
  const r = spawnSync('sh', ['-c', `command -v ${name}`], { encoding: 'utf8' });
  const path = r.stdout.trim();
  return r.status === 0 && path ? path : null;
}

/** Path of the ngspice binary, installing the Debian package first if needed; throws when neither works. */
export function ensureNgspice(): string {
  if (located) return located;
  located = which('ngspice');
  if (!located && process.getuid?.() === 0 && which('apt-get')) {
    const env = { ...process.env, DEBIAN_FRONTEND: 'noninteractive' };
    execFileSync('apt-get', ['update', '-qq'], { stdio: 'ignore', env, timeout: 300_000 });
    execFileSync('apt-get', ['install', '-y', '-qq', 'ngspice'], { stdio: 'ignore', env, timeout: 600_000 });
    located = which('ngspice');
  }
  if (!located) throw new Error('ngspice is not installed and could not be installed (apt-get install ngspice, as root)');
  return located;
}

export interface Sweep {
  x: number[];
  /** One array per requested vector, in request order. */
  y: number[][];
}

/**
 * Runs a netlist in batch mode with one DC sweep and returns the requested vectors.
 * `body` holds the circuit (models, sources, devices) without `.end`; the sweep is
 * `dc SOURCE START STOP STEP`.
 */
export function dcSweep(body: string, sweep: { source: string; start: number; stop: number; step: number }, vectors: string[]): Sweep {
  const bin = ensureNgspice();
  const dir = mkdtempSync(join(tmpdir(), 'keepwell-ngspice-'));
  try {
    const data = join(dir, 'sweep.txt');
    const deck = [
      '* keepwell reference sweep',
      body.trim(),
      // Tight tolerances: the defaults (reltol 1e-3) would blur the slopes the tests compare.
      '.options reltol=1e-9 abstol=1e-18 vntol=1e-12',
      '.control',
      `dc ${sweep.source} ${sweep.start} ${sweep.stop} ${sweep.step}`,
      `wrdata ${data} ${vectors.join(' ')}`,
      '.endc',
      '.end',
      '',
    ].join('\n');
    const file = join(dir, 'deck.cir');
    writeFileSync(file, deck);
    const run = spawnSync(bin, ['-b', file], { encoding: 'utf8', timeout: 60_000 });
    // Batch mode exits with status 1 whenever the deck has no .print line, even after a good run: judge by the data file.
    if (!existsSync(data)) throw new Error(`ngspice wrote no data (status ${run.status}): ${run.stderr || run.stdout}`);
    // wrdata writes, per row, an (x, y) pair for every vector.
    const x: number[] = [];
    const y: number[][] = vectors.map(() => []);
    for (const line of readFileSync(data, 'utf8').split('\n')) {
      const cols = line.trim().split(/\s+/).map(Number);
      if (cols.length < 2 * vectors.length || cols.some((c) => !Number.isFinite(c))) continue;
      x.push(cols[0]);
      vectors.forEach((_, i) => y[i].push(cols[2 * i + 1]));
    }
    return { x, y };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

export interface CurvePoints {
  vm: number;
  vil: number | null;
  vih: number | null;
  /** Slope of largest magnitude, signed. */
  maxGain: number;
  voh: number;
  vol: number;
}

/** VM, VIL, VIH and the peak gain of a sampled transfer curve, by finite differences and linear interpolation. */
export function curvePoints(vin: number[], vout: number[]): CurvePoints {
  const n = vin.length;
  const slope: number[] = [];
  const mid: number[] = [];
  for (let i = 0; i < n - 1; i++) {
    slope.push((vout[i + 1] - vout[i]) / (vin[i + 1] - vin[i]));
    mid.push(0.5 * (vin[i] + vin[i + 1]));
  }
  let vm = NaN;
  for (let i = 0; i < n - 1; i++) {
    const d0 = vout[i] - vin[i];
    const d1 = vout[i + 1] - vin[i + 1];
    if ((d0 > 0) !== (d1 > 0)) {
      const x = vin[i] + ((vin[i + 1] - vin[i]) * d0) / (d0 - d1);
      // Meeting Vout = Vin at a rail (a follower at 0 V) is no switching threshold; same convention as the solver.
      if (x < 1e-3 * vin[n - 1] || x > vin[n - 1] * (1 - 1e-3)) continue;
      vm = x;
      break;
    }
  }
  let peak = 0;
  for (let i = 1; i < slope.length; i++) if (Math.abs(slope[i]) > Math.abs(slope[peak])) peak = i;
  const crossing = (from: number, step: 1 | -1): number | null => {
    for (let i = from; i + step >= 0 && i + step < slope.length; i += step) {
      const a = Math.abs(slope[i]) - 1;
      const b = Math.abs(slope[i + step]) - 1;
      if (a > 0 && b <= 0) return mid[i] + ((mid[i + step] - mid[i]) * a) / (a - b);
    }
    return null;
  };
  const hasUnity = Math.abs(slope[peak]) > 1;
  return {
    vm,
    vil: hasUnity ? crossing(peak, -1) : null,
    vih: hasUnity ? crossing(peak, 1) : null,
    maxGain: slope[peak],
    voh: Math.max(vout[0], vout[n - 1]),
    vol: Math.min(vout[0], vout[n - 1]),
  };
}
