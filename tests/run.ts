// `npm test`: everything, in order, with a summary of what passed and how long it took.
//
//   1. services and tools: the project's PostgreSQL and Redis (server/dev/services.ts), ngspice
//      (tests/support/ngspice.ts) and Chromium (Debian's package, installed with apt-get when
//      missing and running as root);
//   2. `vitest run`: every project of vite.config.ts (unit, api, ui);
//   3. the client build, once, for the journeys;
//   4. the browser journeys: tests/e2e/review.ts and tests/e2e/journeys.ts.
//
// Exits non-zero when any step fails; a failed step does not stop the later ones, so one run
// shows everything that is wrong.
//
//   tsx tests/run.ts              all of it (npm test)
//   tsx tests/run.ts --e2e-only   services, Chromium, the build and the journeys (npm run test:e2e)

import { spawn } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { build } from 'vite';
import { loadConfig, repoRoot } from '../server/config';
import { aptInstall, startServices } from '../server/dev/services';
import { CHROMIUM_PATH } from './support/browser';
import { ensureNgspice } from './support/ngspice';

const e2eOnly = process.argv.includes('--e2e-only');
const steps: { name: string; ok: boolean; seconds: number; note?: string }[] = [];
const started = Date.now();

async function step(name: string, body: () => Promise<string | void>): Promise<boolean> {
  console.log(`\n=== ${name}`);
  const t = Date.now();
  try {
    const note = await body();
    steps.push({ name, ok: true, seconds: (Date.now() - t) / 1000, ...(note ? { note } : {}) });
    return true;
  } catch (error) {
    const note = error instanceof Error ? error.message : String(error);
    console.error(`${name}: ${note}`);
    steps.push({ name, ok: false, seconds: (Date.now() - t) / 1000, note: note.split('\n')[0] });
    return false;
  }
}

/** Run a command of the repository with its output shown; rejects on a non-zero exit. */
function run(command: string, args: string[], env: NodeJS.ProcessEnv = process.env): Promise<void> {
  return new Promise((resolve, reject) => {
    const child = spawn(command, args, { cwd: repoRoot, env, stdio: 'inherit' });
    child.on('error', reject);
    child.on('exit', (code, signal) => (code === 0 ? resolve() : reject(new Error(`${path.basename(command)} ${args.join(' ')} exited with ${signal ?? code}`))));
  });
}

/** Failed tests, named by file and title, from vitest's JSON report (so the summary says which). */
function failedTestsIn(file: string): string[] {
  if (!fs.existsSync(file)) return ['(vitest wrote no report: it stopped before the end)'];
  type Report = { testResults: { name: string; status: string; message?: string; assertionResults: { fullName: string; status: string; failureMessages: string[] }[] }[] };
  const report = JSON.parse(fs.readFileSync(file, 'utf8')) as Report;
  const out: string[] = [];
  for (const suite of report.testResults) {
    const where = path.relative(repoRoot, suite.name);
    const failed = suite.assertionResults.filter((a) => a.status === 'failed');
    if (!failed.length && suite.status === 'failed') out.push(`${where}: ${(suite.message ?? 'the file failed to run').split('\n')[0]}`);
    for (const a of failed) out.push(`${where} > ${a.fullName}: ${(a.failureMessages[0] ?? '').split('\n')[0].slice(0, 240)}`);
  }
  return out;
}

const failedTests: string[] = [];
const bin = (name: string) => path.join(repoRoot, 'node_modules', '.bin', name);

const ready = await step('services and tools', async () => {
  await startServices(loadConfig({ ...process.env, NODE_ENV: 'test' }));
  const tools = ['PostgreSQL', 'Redis'];
  if (!e2eOnly) tools.push(`ngspice (${ensureNgspice()})`);
  if (!fs.existsSync(CHROMIUM_PATH)) {
    if (process.env.KEEPWELL_CHROMIUM) throw new Error(`KEEPWELL_CHROMIUM points at ${CHROMIUM_PATH}, which does not exist`);
    await aptInstall(['chromium']);
    if (!fs.existsSync(CHROMIUM_PATH)) throw new Error(`the chromium package did not install ${CHROMIUM_PATH}`);
  }
  tools.push(`Chromium (${CHROMIUM_PATH})`);
  return tools.join(', ');
});

if (ready) {
  if (!e2eOnly) {
    const results = path.join(repoRoot, 'test-artifacts', 'vitest-results.json');
    fs.rmSync(results, { force: true });
    const passed = await step('vitest run (unit, api, ui)', () => run(bin('vitest'), ['run', '--reporter=default', '--reporter=json', `--outputFile.json=${results}`]));
    if (!passed) failedTests.push(...failedTestsIn(results));
  }
  const built = await step('client build', async () => {
    await build({ configFile: path.join(repoRoot, 'vite.config.ts'), logLevel: 'warn' });
  });
  if (built) {
    const env = { ...process.env, KEEPWELL_E2E_CLIENT_BUILT: '1' };
    await step('journey: review (tests/e2e/review.ts)', () => run(bin('tsx'), ['tests/e2e/review.ts'], env));
    await step('journeys: roles, waiver, deck (tests/e2e/journeys.ts)', () => run(bin('tsx'), ['tests/e2e/journeys.ts'], env));
  }
}

const width = Math.max(...steps.map((s) => s.name.length));
console.log(`\n=== summary (${e2eOnly ? 'journeys only' : 'everything'})`);
for (const s of steps) console.log(`${s.ok ? 'ok  ' : 'FAIL'}  ${s.name.padEnd(width)}  ${s.seconds.toFixed(0).padStart(5)} s${s.note ? `  ${s.note}` : ''}`);
if (failedTests.length) {
  console.log(`\nfailed tests (${failedTests.length}):`);
  for (const t of failedTests.slice(0, 40)) console.log(`  ${t}`);
}
const failed = steps.filter((s) => !s.ok).length;
console.log(`${failed ? `${failed} step(s) failed` : 'all steps passed'} in ${((Date.now() - started) / 60_000).toFixed(1)} min`);
process.exit(failed ? 1 : 0);
