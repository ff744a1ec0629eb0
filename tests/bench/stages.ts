// Stage solver benchmark: a flat cell of about a million transistors, generated in
// code from a small library of gate types in many sizes (an invented block,
// "Tamsin", of an invented chip), run through stage extraction and the two stage
// rules over every corner of the built-in deck. Prints devices, stages, distinct
// stage signatures, transfer solves and times.
//
// Run alone with `npx tsx tests/bench/stages.ts [transistors]`, or from `npm run bench`.

import { pathToFileURL } from 'node:url';
import { checkDesign, localRails } from '../../rules/engine';
import { defaultDeck } from '../../rules/default-deck';
import nonRegenerative from '../../rules/stage/non-regenerative';
import noiseMargin from '../../rules/stage/noise-margin';
import { analysisStats, extractStages, stageAnalysesOf, stagesOf } from '../../rules/stages';
import { defineRule, type RuleModule } from '../../rules/types';
import { z } from 'zod';
import { CellBuilder, designOf } from '../support/cell-builder';
import { prng } from '../support/prng';

const L = 0.15e-6;
// 16 widths per polarity and gate type: 8 types × 256 sizings ≈ 2000 distinct static stages.
const WIDTHS = Array.from({ length: 16 }, (_, i) => (0.42 + 0.13 * i) * 1e-6);

export function generateTamsin(transistors: number, seed = 7) {
  const rand = prng(seed);
  const pick = <T>(xs: readonly T[]) => xs[Math.floor(rand() * xs.length)];
  const b = new CellBuilder('tamsin_flat', ['clk', 'vdd', 'vss', 'd0', 'd1', 'd2', 'd3', 'q'], 'tamsin_flat.sp');
  const recent = ['d0', 'd1', 'd2', 'd3'];
  let gate = 0;
  let count = 0;
  const input = () => pick(recent);
  while (count < transistors) {
    const g = gate++;
    const y = `t${g}_y`;
    const wn = pick(WIDTHS);
    const wp = pick(WIDTHS);
    const n = (name: string, d: string, gt: string, s: string, w = wn) => b.nmos(`MN${g}_${name}`, d, gt, s, 'vss', { w, l: L, model: 'nfet' });
    const p = (name: string, d: string, gt: string, s: string, w = wp) => b.pmos(`MP${g}_${name}`, d, gt, s, 'vdd', { w, l: L, model: 'pfet' });
    const kind = Math.floor(rand() * 8);
    const [a, c, e] = [input(), input(), input()];
    switch (kind) {
      case 0: // inverter
        n('a', y, a, 'vss');
        p('a', y, a, 'vdd');
        count += 2;
        break;
      case 1: // NAND2
        p('a', y, a, 'vdd');
        p('b', y, c, 'vdd');
        n('a', y, a, `t${g}_m`);
        n('b', `t${g}_m`, c, 'vss');
        count += 4;
        break;
      case 2: // NOR2
        p('a', `t${g}_m`, a, 'vdd');
        p('b', y, c, `t${g}_m`);
        n('a', y, a, 'vss');
        n('b', y, c, 'vss');
        count += 4;
        break;
      case 3: // NAND3
        p('a', y, a, 'vdd');
        p('b', y, c, 'vdd');
        p('c', y, e, 'vdd');
        n('a', y, a, `t${g}_m1`);
        n('b', `t${g}_m1`, c, `t${g}_m2`);
        n('c', `t${g}_m2`, e, 'vss');
        count += 6;
        break;
      case 4: // AOI21
        p('a', `t${g}_p`, a, 'vdd');
        p('b', `t${g}_p`, c, 'vdd');
        p('c', y, e, `t${g}_p`);
        n('a', y, a, `t${g}_m`);
        n('b', `t${g}_m`, c, 'vss');
        n('c', y, e, 'vss');
        count += 6;
        break;
      case 5: // pseudo-n-channel NOR2
        p('l', y, 'vss', 'vdd');
        n('a', y, a, 'vss');
        n('b', y, c, 'vss');
        count += 3;
        break;
      case 6: // tri-state inverter
        p('a', `t${g}_p`, a, 'vdd');
        p('e', y, 'clk_b', `t${g}_p`);
        n('e', y, 'clk', `t${g}_n`);
        n('a', `t${g}_n`, a, 'vss');
        count += 4;
        break;
      default: // footed domino AND2 with its output inverter
        p('pre', `t${g}_x`, 'clk', 'vdd');
        n('a', `t${g}_x`, a, `t${g}_m1`);
        n('b', `t${g}_m1`, c, `t${g}_m2`);
        n('f', `t${g}_m2`, 'clk', 'vss');
        p('o', y, `t${g}_x`, 'vdd');
        n('o', y, `t${g}_x`, 'vss');
        count += 6;
    }
    recent[g % recent.length] = y;
    if (rand() < 0.25) recent.push(y);
    if (recent.length > 64) recent.splice(0, recent.length - 32);
  }
  b.res('RQ', recent[recent.length - 1], 'q', 0);
  return b.build();
}

export async function run(transistors = 1_000_000): Promise<void> {
  const t0 = performance.now();
  const cell = generateTamsin(transistors);
  const design = designOf([cell]);
  const t1 = performance.now();
  // Extraction timed on its own: inside a check other analyses (clock tracing) may ask for the stages first.
  const e0 = performance.now();
  const ec0 = process.cpuUsage();
  extractStages(cell, localRails(design, cell, defaultDeck()));
  const extractCpu = process.cpuUsage(ec0);
  const extractMs = performance.now() - e0;
  // A timing rule runs first among the stage rules and asks for the memoised analyses they then reuse.
  let analyseMs = 0;
  let stageCount = 0;
  const byKind = new Map<string, number>();
  const timing = defineRule({
    meta: { id: 'bench.stage-timing', title: 'bench', area: 'stage', rationale: '', fix: '', defaultSeverity: 'info' },
    params: z.object({}),
    check(ctx) {
      const stages = stagesOf(ctx);
      const b = performance.now();
      stageAnalysesOf(ctx);
      analyseMs += performance.now() - b;
      stageCount += stages.stages.length;
      for (const s of stages.stages) byKind.set(s.kind, (byKind.get(s.kind) ?? 0) + 1);
    },
  });
  const base = defaultDeck();
  const deck = { ...base, rules: { ...base.rules, [timing.meta.id]: { enabled: true, severity: 'info' as const, params: {} } } };
  const cpu0 = process.cpuUsage();
  const result = checkDesign(design, deck, { rules: [timing, nonRegenerative, noiseMargin] as unknown as RuleModule[] });
  const cpu = process.cpuUsage(cpu0);
  const t2 = performance.now();
  const stats = analysisStats(design);
  const line = (label: string, value: string) => console.log(`  ${label.padEnd(34)} ${value}`);
  console.log('stage solver (flat generated cell, built-in deck, every corner)');
  line('transistors', cell.mosfets.length.toLocaleString('en'));
  line('stages', `${stageCount.toLocaleString('en')} (${[...byKind].map(([k, n]) => `${k} ${n}`).join(', ')})`);
  line('corners', String(deck.corners.length));
  line('distinct stage signatures', stats.signatures.toLocaleString('en'));
  line('transfer solves', `${stats.solves.toLocaleString('en')} (memo hits within signatures: ${stats.hits})`);
  line('findings', String(result.findings.length));
  line('generate cell', `${(t1 - t0).toFixed(0)} ms`);
  line('extract and classify stages', `${extractMs.toFixed(0)} ms wall, ${((extractCpu.user + extractCpu.system) / 1000).toFixed(0)} ms CPU`);
  line('analyse (signatures, solves)', `${analyseMs.toFixed(0)} ms, ${stats.solves ? (analyseMs / stats.solves).toFixed(2) : '-'} ms per solve`);
  line('whole check, wall / CPU', `${(t2 - t1).toFixed(0)} ms / ${((cpu.user + cpu.system) / 1000).toFixed(0)} ms`);
  line('peak RSS', `${(process.resourceUsage().maxRSS / 1024).toFixed(0)} MB`);
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  await run(Number(process.argv[2] ?? 1_000_000));
}
