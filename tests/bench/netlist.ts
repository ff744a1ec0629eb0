// Netlist engine benchmark: generated netlists (never committed data), read,
// elaborated and checked in a child process each, against a baseline that only
// reads the file and splits its lines.
//
// The scenario is invented: "Harrow", a made-up datapath block of a made-up chip.

/** Deterministic PRNG (mulberry32) so every run measures the same text. */
function prng(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

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
