// npm start: everything a developer or a demo needs, in order —
// services (PostgreSQL, Redis), migrations, demo seed, client build, then the web
// server and the worker as child processes. Ctrl-C stops the children; the
// services keep running until `npm stop`.
//
//   tsx server/dev/start.ts          build the client once and serve it
//   tsx server/dev/start.ts --dev    Vite dev server with hot reload, server restarted on change

import { spawn, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { getConfig, repoRoot } from '../config';
import { initModels } from '../db/models';
import { runMigrations } from '../db/migrate';
import { createSequelize } from '../db/sequelize';
import { demoSignInText, seedDemo } from '../seed/demo';
import { seedDemoWaiversWhenReady } from '../seed/demo-waivers';
import { startServices } from './services';

const bin = (name: string) => path.join(repoRoot, 'node_modules', '.bin', name);
const say = (line: string) => process.stdout.write(`start: ${line}\n`);

function runToEnd(command: string, args: string[]): Promise<number> {
  return new Promise((resolve, reject) => {
    const child = spawn(command, args, { cwd: repoRoot, stdio: 'inherit' });
    child.on('error', reject);
    child.on('close', (code) => resolve(code ?? 1));
  });
}

async function waitForHealth(url: string, child: ChildProcess, timeoutMs = 60_000): Promise<void> {
  const deadline = Date.now() + timeoutMs;
  while (Date.now() < deadline) {
    if (child.exitCode !== null) throw new Error(`the web server exited (code ${child.exitCode})`);
    try {
      const res = await fetch(`${url}/api/health`);
      if (res.ok) return;
    } catch {
      // not listening yet
    }
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`no answer from ${url}/api/health within ${timeoutMs / 1000} s`);
}

async function main(argv: string[]): Promise<number> {
  const dev = argv.includes('--dev');
  // With the Vite dev server in front, mail links and the origin check must name its address.
  if (dev && !process.env.PUBLIC_URL) process.env.PUBLIC_URL = 'http://127.0.0.1:5173';
  const config = getConfig();

  say('starting PostgreSQL and Redis');
  await startServices(config);

  const sequelize = createSequelize(config);
  initModels(sequelize);
  try {
    const applied = await runMigrations(sequelize, config.databaseUrl);
    say(applied.length ? `applied migrations: ${applied.join(', ')}` : 'database schema is up to date');
    if (!config.isProduction) {
      const seeded = await seedDemo(sequelize);
      say(seeded.created.length ? `demo data: created ${seeded.created.length} records` : 'demo data present');
    }
  } catch (err) {
    await sequelize.close();
    throw err;
  }
  // Kept open for the demo waivers, made once the worker has finished the demo runs (below).

  const hasClient = fs.existsSync(path.join(repoRoot, 'index.html'));
  if (!dev) {
    if (hasClient) {
      say('building the client (vite build → dist/client)');
      const code = await runToEnd(bin('vite'), ['build', '--logLevel', 'warn']);
      if (code !== 0) {
        say(`vite build failed (exit ${code})`);
        return code;
      }
    } else {
      say('no index.html in the checkout yet: serving the API only');
    }
  }

  const children: ChildProcess[] = [];
  let stopping = false;
  const stopAll = (signal: NodeJS.Signals = 'SIGTERM') => {
    stopping = true;
    for (const child of children) if (child.exitCode === null) child.kill(signal);
  };
  const launch = (label: string, command: string, args: string[]) => {
    const child = spawn(command, args, { cwd: repoRoot, stdio: 'inherit', env: process.env });
    children.push(child);
    child.on('exit', (code, signal) => {
      if (stopping) return;
      say(`${label} exited (${signal ?? `code ${code}`}); stopping the others`);
      process.exitCode = code || 1;
      stopAll();
    });
    return child;
  };

  const server = launch('web server', bin('tsx'), dev ? ['watch', '--clear-screen=false', 'server/main.ts'] : ['server/main.ts']);
  const workerEntry = path.join(repoRoot, 'server', 'worker', 'main.ts');
  if (fs.existsSync(workerEntry)) launch('worker', bin('tsx'), dev ? ['watch', '--clear-screen=false', workerEntry] : [workerEntry]);
  else say('no server/worker/main.ts yet: running without a worker (queued runs wait)');
  if (dev && hasClient) launch('vite dev server', bin('vite'), ['--strictPort']);

  for (const signal of ['SIGINT', 'SIGTERM'] as const) {
    process.on(signal, () => {
      say('stopping (services keep running; `npm stop` stops them)');
      stopAll('SIGTERM');
    });
  }

  const apiUrl = `http://${config.host === '0.0.0.0' ? '127.0.0.1' : config.host}:${config.port}`;
  try {
    await waitForHealth(apiUrl, server);
  } catch (err) {
    say(err instanceof Error ? err.message : String(err));
    stopAll();
    return 1;
  }
  const openUrl = config.publicUrl;
  process.stdout.write(`\nKeepwell is running at ${openUrl}\n\n${demoSignInText(openUrl)}\n\n`);
  process.stdout.write('Mail sent in development is captured, not delivered: see the admin outbox or .data/mail/.\n');
  process.stdout.write('Findings support design review; they never replace the foundry\u2019s rules or the team\u2019s sign-off.\n\n');
  // The demo's waivers need findings: made in the background once the worker has finished the demo runs.
  if (config.isProduction) await sequelize.close();
  else void seedDemoWaiversWhenReady(config, sequelize, say).finally(() => sequelize.close());

  await Promise.all(children.map((c) => new Promise((r) => (c.exitCode !== null ? r(null) : c.on('exit', r)))));
  return Number(process.exitCode ?? 0);
}

main(process.argv.slice(2)).then(
  (code) => process.exit(code),
  (err) => {
    say(err instanceof Error ? err.message : String(err));
    process.exit(1);
  },
);
