// Netlist engine benchmark: generated netlists (never committed data), read,
// elaborated and checked in a child process each, against a baseline that only
// reads the file and splits its lines.
//
// The scenario is invented: "Harrow", a made-up datapath block of a made-up chip.

import { prng } from '../support/prng';

/**
 * A flat block of about `transistors` devices in one subcircuit, written the way
 * schematic netlisters and layout extractors write them: `M` lines in micrometres
 * under `.option scale=1e-6`, extracted `X` transistors with `#` nets, bracketed and
 * angle-bracketed buses, hierarchical path names, `+` continuations and comments.
 */
export function generateFlatNetlist(transistors: number, seed = 1): string {
  const rand = prng(seed);
  const pick = <T>(xs: readonly T[]) => xs[Math.floor(rand() * xs.length)];
  const out: string[] = [];
  out.push(
    '* Harrow datapath slice, flat extraction (generated for the Keepwell benchmark)',
    '.option scale=1e-6',
    '.subckt harrow_flat clk clk_b vdd vss din[0] din[1] din[2] din[3] dout',
    '*.PININFO clk:I clk_b:I din[0]:I din[1]:I din[2]:I din[3]:I dout:O vdd:B vss:B',
  );
  const inputs = ['din[0]', 'din[1]', 'din[2]', 'din[3]', 'clk', 'clk_b'];
  let recent: string[] = [...inputs];
  let count = 0;
  let gate = 0;
  const net = (prefix: string) => {
    const n = `${prefix}${gate}`;
    return n;
  };
  const recentInput = () => recent[Math.floor(rand() * recent.length)];
  const remember = (n: string) => {
    recent.push(n);
    if (recent.length > 64) recent = recent.slice(32);
  };
  const wn = () => pick(['0.42', '0.65', '0.84', '1.0', '1.26']);
  const wp = () => pick(['0.84', '1.0', '1.12', '1.68', '2.0']);

  while (count < transistors) {
    gate++;
    const kind = rand();
    if (kind < 0.3) {
      // static inverter, schematic style
      const a = recentInput();
      const y = net('inv_y');
      out.push(`Mn_inv${gate} ${y} ${a} vss vss nch_lvt w=${wn()} l=0.15`);
      out.push(`Mp_inv${gate} ${y} ${a} vdd vdd pch_lvt w=${wp()} l=0.15 m=2`);
      remember(y);
      count += 2;
    } else if (kind < 0.5) {
      // two-input NAND with its stack node and junction parameters
      const a = recentInput();
      const b = recentInput();
      const y = `nd_${gate}<0>`;
      const mid = `x${gate % 97}/stk${gate}`;
      out.push(`Mn_nda${gate} ${y} ${a} ${mid} vss nch w=${wn()} l=0.15 as=0.21 ad=0.21 ps=1.42 pd=1.42`);
      out.push(`Mn_ndb${gate} ${mid} ${b} vss vss nch w=${wn()} l=0.15`);
      out.push(`Mp_nda${gate} ${y} ${a} vdd vdd pch w=${wp()} l=0.15`);
      out.push(`Mp_ndb${gate} ${y} ${b} vdd vdd pch w=${wp()}`);
      out.push(`+ l=0.15 nf=2`);
      remember(y);
      count += 4;
    } else if (kind < 0.65) {
      // transmission gate between two nets
      const a = recentInput();
      const y = `tg_out[${gate}]`;
      out.push(`Mn_tg${gate} ${a} clk ${y} vss nch w=${wn()} l=0.15 $ pass gate, true phase`);
      out.push(`Mp_tg${gate} ${a} clk_b ${y} vdd pch w=${wp()} l=0.15`);
      remember(y);
      count += 2;
    } else if (kind < 0.8) {
      // domino-like stage: precharge, two-high evaluate stack, footer, keeper, output inverter
      const a = recentInput();
      const b = recentInput();
      const dyn = `dyn${gate}`;
      const s1 = `dyn${gate}_s1`;
      const foot = `dyn${gate}_ft`;
      const y = `dom_y${gate}`;
      out.push(`* domino stage ${gate}`);
      out.push(`Mp_pre${gate} ${dyn} clk vdd vdd pch w=${wp()} l=0.15`);
      out.push(`Mn_ev${gate}a ${dyn} ${a} ${s1} vss nch w=${wn()} l=0.15`);
      out.push(`Mn_ev${gate}b ${s1} ${b} ${foot} vss nch`);
      out.push(`+ w=${wn()}`);
      out.push(`+ l=0.15`);
      out.push(`Mn_ft${gate} ${foot} clk vss vss nch w=1.26 l=0.15`);
      out.push(`Mp_kp${gate} ${dyn} ${y} vdd vdd pch w=0.42 l=0.3 ; weak keeper`);
      out.push(`Mn_oy${gate} ${y} ${dyn} vss vss nch w=${wn()} l=0.15`);
      out.push(`Mp_oy${gate} ${y} ${dyn} vdd vdd pch w=${wp()} l=0.15`);
      remember(y);
      count += 7;
    } else {
      // layout-extracted inverter pair, PDK-style device subcircuits and `#` nets
      const a = recentInput();
      const x = Math.floor(rand() * 4000);
      const yv = Math.floor(rand() * 4000);
      const y = `a_${x}_${yv}#`;
      out.push(`X${gate}n ${y} ${a} vss vss hv_nfet_01 w=650000u l=150000u`);
      out.push(`X${gate}p ${y} ${a} vdd vdd hv_pfet_01 w=1e+06u l=150000u`);
      remember(y);
      count += 2;
    }
  }
  out.push(`Mn_out dout ${recentInput()} vss vss nch w=0.65 l=0.15`, `Mp_out dout ${recentInput()} vdd vdd pch w=1.0 l=0.15`);
  out.push('.ends harrow_flat', '');
  out.push('Vdd vdd 0 1.8', 'Vss vss 0 0', 'Vclk clk 0 pulse(0 1.8 0 50p 50p 1n 2n)', 'Vclkb clk_b 0 pulse(1.8 0 0 50p 50p 1n 2n)');
  out.push('Xslice clk clk_b vdd vss d0 d1 d2 d3 q harrow_flat', '.end', '');
  return out.join('\n');
}

/**
 * A deep hierarchy whose flattened transistor count is in the hundreds of millions
 * while its text stays small: bit cells in rows, rows in arrays, arrays in banks,
 * with periphery (decoders, domino sense stages, flops) at each level and a few
 * parameter variants of the sized gates.
 */
export function generateHierarchicalNetlist(): string {
  const out: string[] = [];
  out.push(
    '* Harrow register-file macro (generated for the Keepwell benchmark)',
    '.option scale=1e-6',
    '.global vdd vss',
    '.param wbase=0.42',
    '',
    '.subckt hw_inv a y params: wn=0.42 wp=0.84',
    'Mn y a vss vss nch w={wn} l=0.15',
    'Mp y a vdd vdd pch w={wp} l=0.15',
    '.ends hw_inv',
    '.subckt hw_nand2 a b y',
    'Mna y a s1 vss nch w=0.65 l=0.15',
    'Mnb s1 b vss vss nch w=0.65 l=0.15',
    'Mpa y a vdd vdd pch w=0.84 l=0.15',
    'Mpb y b vdd vdd pch w=0.84 l=0.15',
    '.ends hw_nand2',
    '.subckt hw_bit wl bl bl_b',
    'Mpu1 q q_b vdd vdd pch w=0.42 l=0.15',
    'Mpd1 q q_b vss vss nch w=0.65 l=0.15',
    'Mpu2 q_b q vdd vdd pch w=0.42 l=0.15',
    'Mpd2 q_b q vss vss nch w=0.65 l=0.15',
    'Mpg1 bl wl q vss nch w=0.42 l=0.15',
    'Mpg2 bl_b wl q_b vss nch w=0.42 l=0.15',
    '.ends hw_bit',
    '.subckt hw_dom_sense bl clk y',
    'Mpre dyn clk vdd vdd pch w=1.0 l=0.15',
    'Mev dyn bl ft vss nch w=0.84 l=0.15',
    'Mft ft clk vss vss nch w=1.26 l=0.15',
    'Mkp dyn y vdd vdd pch w=0.42 l=0.3',
    'Xo dyn y hw_inv wn=0.84 wp=1.68',
    '.ends hw_dom_sense',
    '.subckt hw_flop d clk q',
    'Xi1 clk clk_b hw_inv',
    'Mt1 d clk m1 vss nch w=0.42 l=0.15',
    'Mt2 d clk_b m1 vdd pch w=0.84 l=0.15',
    'Xi2 m1 m1_b hw_inv',
    'Xi3 m1_b m1_fb hw_inv wn={wbase} wp={wbase}',
    'Mt3 m1_fb clk_b m1 vss nch w=0.42 l=0.15',
    'Mt4 m1_b clk_b s1 vss nch w=0.42 l=0.15',
    'Mt5 m1_b clk s1 vdd pch w=0.84 l=0.15',
    'Xi4 s1 q hw_inv wn=0.65 wp=1.26',
    '.ends hw_flop',
  );
  // 256 bits in a row, each row with its word-line driver.
  const row: string[] = ['.subckt hw_row wl_in'];
  const rowPorts: string[] = [];
  for (let b = 0; b < 256; b++) {
    row.push(`Xb${b} wl bl[${b}] bl_b[${b}] hw_bit`);
    rowPorts.push(`bl[${b}]`, `bl_b[${b}]`);
  }
  row[0] = `.subckt hw_row wl_in ${rowPorts.join(' ')}`.replace(/(.{1,70})( |$)/g, '$1\n+ ').replace(/\n\+ $/, '');
  row.push('Xdrv wl_in wl hw_inv wn=2.0 wp=4.0', '.ends hw_row');
  out.push(...row);

  // 512 rows in an array, with a sense stage and flop per column.
  const arr: string[] = [];
  const colNets = (b: number) => `bl[${b}] bl_b[${b}]`;
  const allCols = Array.from({ length: 256 }, (_, b) => colNets(b)).join(' ');
  arr.push('.subckt hw_array clk a[0] a[1] a[2] q[0:255]');
  for (let r = 0; r < 512; r++) {
    arr.push(`Xr${r} wl${r} ${allCols} hw_row`);
    arr.push(`Xd${r} a[${r % 3}] pre${r} wl${r} hw_nand2`);
  }
  for (let b = 0; b < 256; b++) {
    arr.push(`Xs${b} bl[${b}] clk sa${b} hw_dom_sense`);
    arr.push(`Xf${b} sa${b} clk q${b} hw_flop`);
  }
  arr.push('.ends hw_array');
  out.push(...arr);

  // Banks of arrays and the macro of banks.
  out.push('.subckt hw_bank clk a[0] a[1] a[2]');
  for (let k = 0; k < 16; k++) out.push(`Xa${k} clk a[0] a[1] a[2] qq${k} hw_array`);
  out.push('.ends hw_bank');
  out.push('.subckt hw_macro clk a[0] a[1] a[2]');
  for (let k = 0; k < 24; k++) out.push(`Xbank${k} clk a[0] a[1] a[2] hw_bank`);
  out.push('.ends hw_macro', '');
  out.push('Vdd vdd 0 1.8', 'Vss vss 0 0', 'Vclk clk 0 pulse(0 1.8 0 50p 50p 1n 2n)');
  out.push('Xtop clk a0 a1 a2 hw_macro', '.end', '');
  return out.join('\n');
}

// ---------------------------------------------------------------------------
// Measurement. Each case runs in a child process of its own, so that its peak
// resident memory (getrusage maxRSS) is its own; the parent only generates text.

interface CaseResult {
  case: string;
  /** Milliseconds per phase, measured inside the child around the work only. */
  phases: Record<string, number>;
  totalMs: number;
  /** CPU time of the process over the same span (all threads, GC helpers included): steadier than wall time on a busy machine. */
  cpuMs: number;
  peakRssMb: number;
  facts: Record<string, number | string>;
}

type CaseName = 'baseline' | 'read' | 'read-check';

async function childMain(kind: CaseName, file: string): Promise<void> {
  const { readFileSync } = await import('node:fs');
  // Modules load before the clock starts: the figures are the work, not the start-up.
  const { readDesign, flattenedDeviceCount } = await import('../../grammar/index');
  const { checkDesign } = await import('../../rules/engine');
  const { defaultDeck } = await import('../../rules/default-deck');
  const deck = defaultDeck();
  const phases: Record<string, number> = {};
  const facts: Record<string, number | string> = {};
  const cpu = process.cpuUsage();
  const start = performance.now();
  let t = start;
  const lap = (name: string) => {
    const now = performance.now();
    phases[name] = now - t;
    t = now;
  };
  const text = readFileSync(file, 'utf8');
  if (kind === 'baseline') {
    const lines = text.split(/\r\n|\n|\r/);
    lap('read and split lines');
    facts.lines = lines.length;
  } else {
    const design = readDesign(new Map([['bench.sp', text]]), { defaultScale: deck.scale, deviceMap: deck.deviceMap, supplies: deck.supplies });
    lap('read, parse and elaborate');
    facts.cells = design.cells.size;
    facts.flattenedDevices = flattenedDeviceCount(design);
    facts.diagnostics = design.diagnostics.length;
    let distinct = 0;
    for (const c of design.cells.values()) distinct += c.mosfets.length + c.others.length;
    facts.distinctDevices = distinct;
    if (kind === 'read-check') {
      t = performance.now();
      const checkCpu = process.cpuUsage();
      const result = checkDesign(design, deck);
      lap('checkDesign (built-in deck)');
      facts.checkCpuMs = ((u) => (u.user + u.system) / 1000)(process.cpuUsage(checkCpu));
      facts.findings = result.findings.length;
      facts.rules = Object.values(deck.rules).filter((r) => r.enabled).length;
    }
  }
  const out: CaseResult = {
    case: kind,
    phases,
    totalMs: Object.values(phases).reduce((a, b) => a + b, 0),
    cpuMs: ((u) => (u.user + u.system) / 1000)(process.cpuUsage(cpu)),
    peakRssMb: process.resourceUsage().maxRSS / 1024,
    facts,
  };
  process.stdout.write(JSON.stringify(out) + '\n');
}

async function runChild(kind: CaseName, file: string): Promise<CaseResult> {
  const { spawn } = await import('node:child_process');
  const { fileURLToPath } = await import('node:url');
  const { CHECK_SEMI_SPACE_MB } = await import('../../server/worker/threads');
  const self = fileURLToPath(import.meta.url);
  return new Promise((resolvePromise, reject) => {
    // The V8 young-generation size the worker's check threads and the command line use.
    const child = spawn(process.execPath, [`--max-semi-space-size=${CHECK_SEMI_SPACE_MB}`, '--import', 'tsx', self, '--child', kind, file], { stdio: ['ignore', 'pipe', 'inherit'] });
    let out = '';
    child.stdout.on('data', (d: Buffer) => (out += d.toString()));
    child.on('error', reject);
    child.on('close', (code) => {
      const line = out.trim().split('\n').pop() ?? '';
      if (code !== 0 || !line.startsWith('{')) reject(new Error(`bench child ${kind} exited with ${code}: ${out.slice(0, 500)}`));
      else resolvePromise(JSON.parse(line) as CaseResult);
    });
  });
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

const fmt = (n: number) => n.toLocaleString('en', { maximumFractionDigits: 0 });

export async function run(): Promise<void> {
  const { mkdtempSync, writeFileSync, rmSync } = await import('node:fs');
  const { tmpdir } = await import('node:os');
  const { join } = await import('node:path');
  const dir = mkdtempSync(join(tmpdir(), 'keepwell-bench-'));
  const line = (label: string, value: string) => console.log(`  ${label.padEnd(40)} ${value}`);
  const verdict = (ok: boolean) => (ok ? 'ok' : 'OVER TARGET');
  try {
    const flatFile = join(dir, 'flat.sp');
    const flatText = generateFlatNetlist(1_000_000);
    writeFileSync(flatFile, flatText);
    const hierFile = join(dir, 'hier.sp');
    writeFileSync(hierFile, generateHierarchicalNetlist());

    const repeats = 3;
    const baselines: CaseResult[] = [];
    const reads: CaseResult[] = [];
    const fulls: CaseResult[] = [];
    // Interleaved, so that a busy machine slows baseline and engine alike; the machine's speed drifts between runs,
    // so every figure of the flat case is a median.
    for (let i = 0; i < repeats; i++) {
      baselines.push(await runChild('baseline', flatFile));
      reads.push(await runChild('read', flatFile));
      fulls.push(await runChild('read-check', flatFile));
    }
    const full = fulls.find((r) => r.totalMs === median(fulls.map((x) => x.totalMs)))!;
    const hier = await runChild('read-check', hierFile);

    const base = median(baselines.map((r) => r.totalMs));
    const parse = median(reads.map((r) => r.totalMs));
    const baseCpu = median(baselines.map((r) => r.cpuMs));
    const parseCpu = median(reads.map((r) => r.cpuMs));
    const parseRss = Math.max(...reads.map((r) => r.peakRssMb));
    const check = full.phases['checkDesign (built-in deck)'];
    const f = reads[0].facts;
    console.log(`netlist engine (each case in its own process; flat figures: median of ${repeats} runs each)`);
    console.log(' flat: one million transistors in one subcircuit');
    line('file', `${(flatText.length / 1e6).toFixed(1)} MB, ${fmt(baselines[0].facts.lines as number)} lines, ${fmt(f.distinctDevices as number)} devices, ${f.diagnostics} diagnostics`);
    line('baseline: read file, split lines', `${fmt(base)} ms`);
    line('read + parse + elaborate', `${fmt(parse)} ms = ${(parse / base).toFixed(1)}x baseline (aim < 4x): ${verdict(parse < 4 * base)}`);
    line('  in CPU time', `${fmt(parseCpu)} ms against ${fmt(baseCpu)} ms = ${(parseCpu / baseCpu).toFixed(1)}x`);
    line('  throughput', `${fmt((f.distinctDevices as number) / (parse / 1000))} devices/s, ${(flatText.length / 1e6 / (parse / 1000)).toFixed(1)} MB/s`);
    line('  peak RSS', `${fmt(parseRss)} MB`);
    line(`checkDesign, built-in deck (${full.facts.rules} rules)`, `${fmt(check)} ms = ${(check / base).toFixed(1)}x baseline, ${full.facts.findings} findings`);
    const checkCpu = full.facts.checkCpuMs as number;
    line('  in CPU time', `${fmt(checkCpu)} ms against ${fmt(baseCpu)} ms = ${(checkCpu / baseCpu).toFixed(1)}x (target 6x)`);
    line('  load average at the end', (await import('node:os')).loadavg().map((x) => x.toFixed(2)).join(' '));
    line('total (median run)', `${fmt(full.totalMs)} ms = ${(full.totalMs / base).toFixed(1)}x baseline (target < 10x, aim 5x): ${verdict(full.totalMs < 10 * base)}; runs ${fulls.map((r) => fmt(r.totalMs)).join(', ')} ms`);
    const fullRss = Math.max(...fulls.map((r) => r.peakRssMb));
    line('peak RSS, full check (highest run)', `${fmt(fullRss)} MB (target < 2048 MB): ${verdict(fullRss < 2048)}`);
    const h = hier.facts;
    console.log(' hierarchical: register-file macro');
    line('cells / distinct devices', `${h.cells} / ${fmt(h.distinctDevices as number)}`);
    line('flattened devices', `${fmt(h.flattenedDevices as number)}, ${h.diagnostics} diagnostics, ${h.findings} findings`);
    line('read + parse + elaborate', `${fmt(hier.phases['read, parse and elaborate'])} ms`);
    line('checkDesign, built-in deck', `${fmt(hier.phases['checkDesign (built-in deck)'])} ms`);
    line('total', `${fmt(hier.totalMs)} ms (target < 10000 ms): ${verdict(hier.totalMs < 10_000)}`);
    line('peak RSS', `${fmt(hier.peakRssMb)} MB (target < 1024 MB): ${verdict(hier.peakRssMb < 1024)}`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

const argv = process.argv;
if (argv[2] === '--child') {
  await childMain(argv[3] as CaseName, argv[4]);
}
