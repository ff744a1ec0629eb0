// keepwell submit FILE… --server URL --token T --block B [--deck-version ID] [--timeout S] [--format text|json|sarif]
//
// Hand a netlist set to a Keepwell server, as a CI job does: the given files and the
// files they include (as `keepwell check` reads them) go up as one tar.gz bundle, so
// include paths survive; the run is polled until it ends; the summary is printed.
// Exit 0: no unwaived error-severity finding; 1: some error is open, waiting for a
// waiver decision, or its waiver lapsed; 2: the run could not be made or did not
// succeed (bad options, unreadable files, refused token, failed run, time-out).

import { resolve } from 'node:path';
import { Readable } from 'node:stream';
import * as tar from 'tar';
import type { ReviewReport } from '../../shared/api/reports';
import type { RunView, StoredFinding } from '../../shared/api/runs';
import { REVIEW_CAUTION } from '../../shared/findings';
import { loadFiles, parseCommandLine } from './inputs';

const USAGE = `usage: keepwell submit FILE… --server URL --token TOKEN --block BLOCK [options]

Uploads the netlists (and the files they include, from the folders of the given
files) to a Keepwell server, waits for the check and prints its summary.

options:
  --server URL         the Keepwell server (default: $KEEPWELL_SERVER)
  --token TOKEN        a personal API token with the submit scope (default: $KEEPWELL_TOKEN)
  --block BLOCK        the block's name or id
  --deck-version ID    a deck version to check against; default: the team's default deck
  --top CELL           the subcircuit to check from
  --note TEXT          a note stored with the run (for example the commit being checked)
  --timeout S          seconds to wait for the run (default 900)
  --format NAME        text | json | sarif (default: text)
  -h, --help           this text

exit status: 0 no unwaived error, 1 unwaived errors, 2 the run could not be made or failed`;

const FORMATS = ['text', 'json', 'sarif'] as const;
type Format = (typeof FORMATS)[number];

class SubmitError extends Error {}

interface Client {
  base: string;
  token: string;
}

async function call<T>(client: Client, path: string, init: RequestInit = {}): Promise<T> {
  let res: Response;
  try {
    res = await fetch(`${client.base}${path}`, {
      ...init,
      headers: { Accept: 'application/json', Authorization: `Bearer ${client.token}`, ...(init.headers ?? {}) },
    });
  } catch (e) {
    throw new SubmitError(`cannot reach ${client.base}: ${(e as Error).cause instanceof Error ? ((e as Error).cause as Error).message : (e as Error).message}`);
  }
  const text = await res.text();
  if (!res.ok) {
    let message = `${res.status} ${res.statusText}`;
    try {
      const body = JSON.parse(text) as { error?: { code?: string; message?: string; details?: { path: string; message: string }[] } };
      if (body.error) message = `${body.error.message} (${body.error.code}${body.error.details?.length ? `: ${body.error.details.map((d) => `${d.path} ${d.message}`).join('; ')}` : ''})`;
    } catch {
      // not the JSON error shape; keep the status line
    }
    throw new SubmitError(`${init.method ?? 'GET'} ${path}: ${message}`);
  }
  return (text ? JSON.parse(text) : undefined) as T;
}

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

async function blockId(client: Client, block: string): Promise<string> {
  const { items } = await call<{ items: { id: string; name: string }[] }>(client, '/api/blocks');
  const found = items.find((b) => b.id === block.toLowerCase() || b.name === block);
  if (!found) throw new SubmitError(`no block ${UUID.test(block) ? 'with id' : 'named'} "${block}" in your team (${items.map((b) => b.name).join(', ') || 'no blocks'})`);
  return found.id;
}

/** The files and their includes as a gzipped tar, paths relative to their common folder. */
async function bundle(paths: string[]): Promise<Buffer> {
  const loaded = loadFiles(paths);
  const keys = [...loaded.files.keys()];
  const cwd = process.env.INIT_CWD || process.cwd();
  const first = resolve(cwd, loaded.display.get(keys[0])!);
  const root = first.slice(0, first.length - keys[0].length);
  const chunks: Buffer[] = [];
  const stream = tar.c({ gzip: true, cwd: root, portable: true }, keys) as unknown as Readable;
  for await (const chunk of stream) chunks.push(chunk as Buffer);
  return Buffer.concat(chunks);
}

async function allFindings(client: Client, runId: string): Promise<StoredFinding[]> {
  const items: StoredFinding[] = [];
  for (let page = 1; ; page++) {
    const res = await call<{ items: StoredFinding[]; total: number }>(client, `/api/runs/${runId}/findings?sort=location&pageSize=500&page=${page}`);
    items.push(...res.items);
    if (page * 500 >= res.total) return items;
  }
}

const plural = (n: number, word: string) => `${n} ${word}${n === 1 ? '' : 's'}`;

/** Errors nobody has waived: open, waiting for a decision, or with a lapsed waiver. */
export function unwaivedErrors(report: Pick<ReviewReport, 'counts'>): number {
  const e = report.counts.bySeverity.error;
  return e.open + e['waiver-requested'] + e['waiver-lapsed'];
}

function textSummary(run: RunView, report: ReviewReport, findings: StoredFinding[], link: string): string {
  const c = report.counts.total;
  const e = report.counts.bySeverity.error;
  const lines = [
    `${run.block.name}: run ${run.id} ${run.state} (deck "${run.deck.name}" version ${run.deck.version})`,
    link,
    `errors: ${e.open} open, ${e['waiver-lapsed']} lapsed, ${e['waiver-requested']} awaiting a decision, ${e.waived} waived`,
    `all findings: ${c.open} open, ${c['waiver-lapsed']} lapsed, ${c['waiver-requested']} requested, ${c.waived} waived`,
  ];
  const unwaived = findings.filter((f) => f.severity === 'error' && f.status !== 'waived');
  if (unwaived.length) lines.push('');
  for (const f of unwaived) {
    lines.push(`${f.file}:${f.line}:${f.column} error ${f.ruleId} ${f.message}${f.status === 'open' ? '' : ` [${f.status}${f.waiver?.reason ? `: ${f.waiver.reason}` : ''}]`}`);
  }
  lines.push('', `${plural(unwaived.length, 'unwaived error')}.`, REVIEW_CAUTION);
  return lines.join('\n') + '\n';
}

export async function run(args: string[]): Promise<number> {
  const parsed = parseCommandLine('submit', USAGE, args, {
    server: { type: 'string' },
    token: { type: 'string' },
    block: { type: 'string' },
    'deck-version': { type: 'string' },
    top: { type: 'string' },
    note: { type: 'string' },
    timeout: { type: 'string' },
    format: { type: 'string' },
  });
  if (typeof parsed === 'number') return parsed;
  const { values, positionals } = parsed;
  const server = (values.server as string | undefined) ?? process.env.KEEPWELL_SERVER;
  const token = (values.token as string | undefined) ?? process.env.KEEPWELL_TOKEN;
  const format = ((values.format as string | undefined) ?? 'text') as Format;
  const timeout = values.timeout === undefined ? 900 : Number(values.timeout);
  const problems = [
    positionals.length === 0 && 'no netlist files given',
    !server && 'no --server (or KEEPWELL_SERVER)',
    !token && 'no --token (or KEEPWELL_TOKEN)',
    !values.block && 'no --block',
    !FORMATS.includes(format) && `unknown format "${format}" (available: ${FORMATS.join(', ')})`,
    !(timeout > 0) && `--timeout "${String(values.timeout)}" is not a number of seconds`,
  ].filter(Boolean);
  if (problems.length) {
    process.stderr.write(`keepwell submit: ${problems.join('; ')}\n\n${USAGE}\n`);
    return 2;
  }
  let base: string;
  try {
    base = new URL(server!).origin;
  } catch {
    process.stderr.write(`keepwell submit: --server "${server}" is not a URL\n`);
    return 2;
  }
  const client: Client = { base, token: token! };

  try {
    const archive = await bundle(positionals);
    const form = new FormData();
    form.set('blockId', await blockId(client, values.block as string));
    if (values['deck-version']) form.set('deckVersionId', values['deck-version'] as string);
    if (values.top) form.set('top', values.top as string);
    if (values.note) form.set('note', values.note as string);
    form.set('files', new Blob([new Uint8Array(archive)], { type: 'application/gzip' }), 'netlists.tar.gz');
    const created = await call<{ run: RunView }>(client, '/api/runs', { method: 'POST', body: form });
    const link = `${base}/runs/${created.run.id}`;
    process.stderr.write(`keepwell submit: run ${created.run.id} queued (${link})\n`);

    const deadline = Date.now() + timeout * 1000;
    let runView = created.run;
    let last = '';
    for (let wait = 500; !['succeeded', 'failed', 'cancelled'].includes(runView.state); wait = Math.min(wait * 1.5, 3000)) {
      if (Date.now() > deadline) throw new SubmitError(`the run is still ${runView.state} after ${timeout} s: ${link}`);
      await new Promise((r) => setTimeout(r, wait));
      runView = await call<RunView>(client, `/api/runs/${created.run.id}`);
      const now = runView.progress?.label ?? runView.state;
      if (now !== last) process.stderr.write(`keepwell submit: ${now}\n`);
      last = now;
    }
    if (runView.state !== 'succeeded') throw new SubmitError(`the run ${runView.state}${runView.error ? `:\n${runView.error}` : ''}\n${link}`);

    const report = await call<ReviewReport>(client, `/api/runs/${runView.id}/report`);
    if (format === 'sarif') {
      process.stdout.write(JSON.stringify(await call<unknown>(client, `/api/runs/${runView.id}/sarif`), null, 2) + '\n');
    } else {
      const findings = await allFindings(client, runView.id);
      process.stdout.write(
        format === 'json'
          ? JSON.stringify({ run: runView, link, counts: report.counts, unwaivedErrors: unwaivedErrors(report), findings, caution: REVIEW_CAUTION }, null, 2) + '\n'
          : textSummary(runView, report, findings, link),
      );
    }
    return unwaivedErrors(report) > 0 ? 1 : 0;
  } catch (e) {
    process.stderr.write(`keepwell submit: ${(e as Error).message}\n`);
    return 2;
  }
}
