// `npm run bench`: every benchmark module in turn, or only those named
// (`npm run bench -- netlist`). A module exports `run(): Promise<void>` and prints
// its own figures; add yours to the list below.

export interface BenchModule {
  run(): Promise<void>;
}

const benches: { name: string; load: () => Promise<BenchModule> }[] = [
  { name: 'netlist', load: () => import('./netlist') },
  { name: 'stages', load: () => import('./stages') },
  { name: 'queue', load: () => import('./queue') },
];

const wanted = process.argv.slice(2);
const unknown = wanted.filter((w) => !benches.some((b) => b.name === w));
if (unknown.length) {
  console.error(`unknown bench ${unknown.join(', ')}; available: ${benches.map((b) => b.name).join(', ')}`);
  process.exit(2);
}
for (const bench of benches) {
  if (wanted.length && !wanted.includes(bench.name)) continue;
  const mod = await bench.load();
  const started = performance.now();
  await mod.run();
  console.log(`  (${bench.name}: ${((performance.now() - started) / 1000).toFixed(1)} s)\n`);
}
