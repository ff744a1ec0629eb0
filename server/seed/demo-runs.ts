// The demo's first runs: each demo netlist is stored as an upload of its block and
// queued as a run by the demo designer, so that the first screen a new user sees
// has results. The rows are written here; the real worker does the checking —
// `npm run seed` starts one until the queue is empty, `npm start` runs one anyway
// (its reconciler enqueues these runs, which PostgreSQL holds as queued).
//
// Netlists come from server/seed/demo-netlists/ (a file `<block>.sp`, or a folder
// `<block>/` for a netlist with its includes); while that folder has none, from the
// starter netlist in server/seed/demo-starter/.

import { spawn } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import { fileURLToPath } from 'node:url';
import { QueryTypes, type Sequelize } from 'sequelize';
import { NETLIST_EXTENSIONS } from '../../shared/api/runs';
import { repoRoot } from '../config';
import { Block } from '../db/models';
import { createQueuedRun } from '../services/runs';
import { storeUpload, type IncomingFile } from '../services/uploads';

const here = path.dirname(fileURLToPath(import.meta.url));
export const DEMO_NETLIST_DIRS = [path.join(here, 'demo-netlists'), path.join(here, 'demo-starter')];

const isNetlist = (name: string) => NETLIST_EXTENSIONS.some((ext) => name.toLowerCase().endsWith(ext));

function filesUnder(dir: string, prefix = ''): IncomingFile[] {
  const out: IncomingFile[] = [];
  for (const entry of fs.readdirSync(dir, { withFileTypes: true }).sort((a, b) => a.name.localeCompare(b.name))) {
    const full = path.join(dir, entry.name);
    if (entry.isDirectory()) out.push(...filesUnder(full, `${prefix}${entry.name}/`));
    else if (entry.isFile() && isNetlist(entry.name)) out.push({ originalname: `${prefix}${entry.name}`, buffer: fs.readFileSync(full) });
  }
  return out;
}

/** One upload per demo block: the first folder of DEMO_NETLIST_DIRS that holds netlists decides. */
export function demoUploads(blockNames: string[]): { block: string; files: IncomingFile[] }[] {
  const blockOf = (name: string) => blockNames.find((b) => name === b || name.startsWith(`${b}.`) || name.startsWith(`${b}_`)) ?? blockNames[0];
  for (const dir of DEMO_NETLIST_DIRS) {
    if (!fs.existsSync(dir)) continue;
    const uploads = new Map<string, IncomingFile[]>();
    for (const entry of fs.readdirSync(dir, { withFileTypes: true }).sort((a, b) => a.name.localeCompare(b.name))) {
      const full = path.join(dir, entry.name);
      const files = entry.isDirectory() ? filesUnder(full) : entry.isFile() && isNetlist(entry.name) ? [{ originalname: entry.name, buffer: fs.readFileSync(full) }] : [];
      if (!files.length) continue;
      const block = blockOf(entry.name);
      uploads.set(block, [...(uploads.get(block) ?? []), ...files]);
    }
    if (uploads.size) return [...uploads].map(([block, files]) => ({ block, files }));
  }
  return [];
}

/** Store the demo netlists and queue a run of each that has none yet. Returns what was created. */
export async function queueDemoRuns(sequelize: Sequelize, teamId: string, submitterId: string, blockNames: string[]): Promise<string[]> {
  // Demo files are the project's own: the upload limits of a deployment do not apply to them.
  const ctx = { sequelize, config: { upload: { maxFileBytes: 1 << 30, maxFiles: 10_000, maxTotalBytes: 1 << 30 } } };
  const created: string[] = [];
  for (const upload of demoUploads(blockNames)) {
    const block = await Block.findOne({ where: { teamId, name: upload.block } });
    if (!block) continue;
    const stored = await storeUpload(ctx, { id: submitterId, teamId }, block.id, upload.files);
    const [{ n }] = await sequelize.query<{ n: number }>(
      `select cast(count(*) as integer) as n from runs where netlist_id = :netlistId and state <> 'failed'`,
      { replacements: { netlistId: stored.netlistId }, type: QueryTypes.SELECT },
    );
    if (n > 0) continue;
    await createQueuedRun(ctx, { id: submitterId, teamId }, { netlistId: stored.netlistId, note: 'Demo: the first check of this block.' });
    created.push(`demo run of ${upload.block}`);
  }
  return created;
}

/** Run the real worker until no run is queued or running (npm run seed). Resolves with its exit code. */
export function drainWithWorker(timeoutMs = 10 * 60_000): Promise<number> {
  return new Promise((resolve, reject) => {
    const child = spawn(process.execPath, ['--import', 'tsx', path.join(repoRoot, 'server', 'worker', 'main.ts'), '--until-idle'], {
      cwd: repoRoot,
      env: process.env,
      stdio: 'inherit',
    });
    const timer = setTimeout(() => {
      child.kill('SIGTERM');
      reject(new Error(`the demo runs did not finish within ${timeoutMs / 1000} s`));
    }, timeoutMs);
    child.on('error', reject);
    child.on('exit', (code) => {
      clearTimeout(timer);
      resolve(code ?? 1);
    });
  });
}
