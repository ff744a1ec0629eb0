// keepwell check FILE… [--deck deck.json] [--top CELL] [--scale F] [--format text|json|sarif] [--output FILE]
//
// The whole check, offline: read the netlists (and the files they include, only
// from the directories of the given files), elaborate them, run the deck's rules,
// and write a report. Exit 0: no error-severity finding; 1: some; 2: the input
// could not be read or parsed (problems go to standard error as file:line:column).

import { readFileSync, statSync, writeFileSync } from 'node:fs';
import { dirname, isAbsolute, relative, resolve, sep } from 'node:path';
import { pathToFileURL } from 'node:url';
import { parseArgs } from 'node:util';
import type { Design, Diagnostic } from '../../grammar/design';
import { includeReferences, parseSpiceNumber, readDesign } from '../../grammar/index';
import { checkDesign } from '../../rules/engine';
import { buildSarif } from '../../rules/sarif';
import { defaultDeck } from '../../rules/default-deck';
import { validateDeck } from '../../rules/validate-deck';
import { formatSi } from '../../rules/units';
import type { Deck } from '../../shared/deck';
import { checkReportSchema, REVIEW_CAUTION, type CheckReport, type Finding } from '../../shared/findings';

const USAGE = `usage: keepwell check FILE… [options]

Reads the netlists, the files they include (only from the folders of the given
files), and checks them against a rule deck.

options:
  --deck FILE      an exported deck (JSON); default: the built-in deck
  --top CELL       the subcircuit to check from; default: every cell nobody instantiates
  --scale F        length scale for netlists that set none (e.g. 1e-6 when widths are in µm)
  --format NAME    report format: ${'%FORMATS%'} (default: text)
  --output FILE    write the report to FILE instead of standard output
  -h, --help       this text

exit status: 0 no error-severity finding, 1 error findings, 2 unreadable input or parse errors`;

/** What a report formatter gets: the report, and the design for anything a format needs beyond it. */
export interface FormatContext {
  design: Design;
  diagnostics: Diagnostic[];
  deck: Deck;
}

export type ReportFormatter = (report: CheckReport, context: FormatContext) => string;

/** Report formats by name. A new format is one entry here. */
export const reportFormats: Record<string, ReportFormatter> = {
  text: formatText,
  json: (report) => JSON.stringify(report, null, 2) + '\n',
  sarif: formatSarif,
};

/** SARIF 2.1.0 (rules/sarif.ts): paths relative to the working directory, which is the log's root. */
export function formatSarif(report: CheckReport, context: FormatContext): string {
  const root = pathToFileURL(workingDirectory()).href.replace(/\/?$/, '/');
  const log = buildSarif({
    toolVersion: report.tool.version,
    deck: report.deck,
    findings: report.findings,
    ruleIds: Object.entries(context.deck.rules)
      .filter(([, setting]) => setting.enabled)
      .map(([id]) => id),
    rootUri: root,
    rootDescription: 'The folder keepwell check was run in.',
    executionSuccessful: report.summary.parseErrors === 0,
  });
  return JSON.stringify(log, null, 2) + '\n';
}

function usage(): string {
  return USAGE.replace('%FORMATS%', Object.keys(reportFormats).join('|'));
}

class InputError extends Error {}

interface LoadedFiles {
  /** Path relative to the common root (forward slashes) → text. */
  files: Map<string, string>;
  /** The given files, in the same keys. */
  entries: string[];
  /** Key → path to show (relative to the working directory). */
  display: Map<string, string>;
}

/** Where the user ran the command: `npm run` moves to the package folder and keeps the original in INIT_CWD. */
function workingDirectory(): string {
  return process.env.INIT_CWD ?? process.cwd();
}

const decoder = new TextDecoder('utf-8', { fatal: false });

function readText(path: string): string {
  let st;
  try {
    st = statSync(path);
  } catch (e) {
    throw new InputError(`${path}: cannot read: ${(e as NodeJS.ErrnoException).code === 'ENOENT' ? 'no such file' : (e as Error).message}`);
  }
  if (st.isDirectory()) throw new InputError(`${path}: is a folder; give the netlist files`);
  try {
    return decoder.decode(readFileSync(path));
  } catch (e) {
    throw new InputError(`${path}: cannot read: ${(e as Error).message}`);
  }
}

function commonRoot(dirs: string[]): string {
  let root = dirs[0];
  for (const d of dirs.slice(1)) {
    while (!(d === root || d.startsWith(root.endsWith(sep) ? root : root + sep))) {
      const up = dirname(root);
      if (up === root) break;
      root = up;
    }
  }
  return root;
}

function under(path: string, dir: string): boolean {
  const rel = relative(dir, path);
  return rel !== '' && !rel.startsWith('..') && !isAbsolute(rel);
}

/** Read the given files and, transitively, the files they include from inside the given files' folders. */
export function loadFiles(paths: string[], cwd = workingDirectory()): LoadedFiles {
  const absolute = paths.map((p) => resolve(cwd, p));
  const allowed = [...new Set(absolute.map((p) => dirname(p)))];
  const root = commonRoot(allowed);
  const key = (abs: string) => relative(root, abs).split(sep).join('/');
  const files = new Map<string, string>();
  const display = new Map<string, string>();
  const queue: string[] = [];
  const add = (abs: string, required: boolean) => {
    const k = key(abs);
    if (files.has(k)) return;
    let text: string;
    try {
      text = readText(abs);
    } catch (e) {
      if (required) throw e;
      return; // a missing include is reported by the reader, with its line
    }
    files.set(k, text);
    const rel = relative(cwd, abs);
    display.set(k, rel && !rel.startsWith('..') ? rel : abs);
    queue.push(abs);
  };
  for (const abs of absolute) add(abs, true);
  while (queue.length) {
    const from = queue.shift()!;
    for (const ref of includeReferences(files.get(key(from))!)) {
      if (isAbsolute(ref) || /^[A-Za-z]:[\\/]/.test(ref)) continue; // refused by the reader
      for (const base of [dirname(from), root]) {
        const target = resolve(base, ref);
        if (!allowed.some((d) => under(target, d))) continue;
        try {
          if (statSync(target).isFile()) {
            add(target, false);
            break;
          }
        } catch {
          // not there; try the next base
        }
      }
    }
  }
  return { files, entries: absolute.map(key), display };
}

function loadDeck(path: string | undefined): Deck {
  if (!path) return defaultDeck();
  let data: unknown;
  try {
    data = JSON.parse(readText(resolve(workingDirectory(), path)));
  } catch (e) {
    if (e instanceof InputError) throw e;
    throw new InputError(`${path}: not a JSON deck: ${(e as Error).message}`);
  }
  const v = validateDeck(data);
  if (!v.ok) throw new InputError(`${path}: not a valid deck:\n${v.issues.map((i) => `  ${i.path || '(deck)'}: ${i.message}`).join('\n')}`);
  return v.deck;
}

function toolVersion(): string {
  try {
    const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version?: string };
    return pkg.version ?? '0.0.0';
  } catch {
    return '0.0.0';
  }
}

function formatDiagnostic(d: Diagnostic, file: string): string {
  return `${file}:${d.line}:${d.column}: ${d.severity}: ${d.message}${d.hint ? `\n  hint: ${d.hint}` : ''}`;
}

function plural(n: number, word: string): string {
  return `${n} ${word}${n === 1 ? '' : 's'}`;
}

function compactCount(n: number): string {
  if (n < 1e4) return String(n);
  return formatSi(n, '').replace(/\s+$/, '');
}

/** Compiler-style text: one line per finding, grouped by cell, then a summary line and the review caution. */
export function formatText(report: CheckReport): string {
  const lines: string[] = [];
  const byCell = new Map<string, Finding[]>();
  for (const f of report.findings) {
    const list = byCell.get(f.cell);
    if (list) list.push(f);
    else byCell.set(f.cell, [f]);
  }
  for (const [cell, findings] of byCell) {
    const n = findings[0].instances;
    lines.push(`${cell}${n > 1 ? ` (${compactCount(n)} instances)` : ''}`);
    for (const f of findings) lines.push(`  ${f.file}:${f.line}:${f.column} ${f.severity} ${f.ruleId} ${f.message}`);
  }
  const s = report.summary;
  if (lines.length) lines.push('');
  lines.push(
    `${plural(s.cells, 'cell')}, ${compactCount(s.devices)} devices flattened; ${plural(s.errors, 'error')}, ${plural(s.warnings, 'warning')}, ${plural(s.infos, 'info')}` +
      `${s.parseErrors ? `, ${plural(s.parseErrors, 'netlist error')}` : ''} (${(s.elapsedMs / 1000).toFixed(2)} s, deck "${report.deck.name}")`,
  );
  lines.push(REVIEW_CAUTION);
  return lines.join('\n') + '\n';
}

export async function run(args: string[]): Promise<number> {
  let values: { deck?: string; top?: string; scale?: string; format?: string; output?: string; help?: boolean };
  let positionals: string[];
  try {
    const parsed = parseArgs({
      args,
      allowPositionals: true,
      options: {
        deck: { type: 'string' },
        top: { type: 'string' },
        scale: { type: 'string' },
        format: { type: 'string' },
        output: { type: 'string' },
        help: { type: 'boolean', short: 'h' },
      },
    });
    values = parsed.values;
    positionals = parsed.positionals;
  } catch (e) {
    process.stderr.write(`keepwell check: ${(e as Error).message}\n\n${usage()}\n`);
    return 2;
  }
  if (values.help) {
    process.stdout.write(usage() + '\n');
    return 0;
  }
  if (positionals.length === 0) {
    process.stderr.write(`keepwell check: no netlist files given\n\n${usage()}\n`);
    return 2;
  }
  const formatName = values.format ?? 'text';
  const formatter = reportFormats[formatName];
  if (!formatter) {
    process.stderr.write(`keepwell check: unknown format "${formatName}" (available: ${Object.keys(reportFormats).join(', ')})\n`);
    return 2;
  }
  let scale: number | undefined;
  if (values.scale !== undefined) {
    const r = parseSpiceNumber(values.scale);
    if (!r.ok || !(r.value > 0) || r.value > 1) {
      process.stderr.write(`keepwell check: --scale "${values.scale}" is not a length scale between 0 and 1 (e.g. 1e-6)\n`);
      return 2;
    }
    scale = r.value;
  }

  const started = performance.now();
  let deck: Deck;
  let loaded: LoadedFiles;
  try {
    deck = loadDeck(values.deck);
    loaded = loadFiles(positionals);
  } catch (e) {
    if (e instanceof InputError) {
      process.stderr.write(`keepwell check: ${e.message}\n`);
      return 2;
    }
    throw e;
  }

  const design = readDesign(loaded.files, {
    entry: loaded.entries,
    ...(values.top ? { top: values.top } : {}),
    ...(scale !== undefined ? { scale } : {}),
    defaultScale: deck.scale,
    deviceMap: deck.deviceMap,
    supplies: deck.supplies,
  });
  const shown = (file: string) => loaded.display.get(file) ?? file;
  for (const d of design.diagnostics) process.stderr.write(formatDiagnostic(d, shown(d.file)) + '\n');
  const parseErrors = design.diagnostics.filter((d) => d.severity === 'error').length;

  const result = checkDesign(design, deck);
  const report: CheckReport = {
    tool: { name: 'keepwell', version: toolVersion() },
    deck: { name: deck.name, version: null },
    summary: { ...result.summary, parseErrors, elapsedMs: Math.round(performance.now() - started) },
    findings: result.findings.map((f) => ({ ...f, file: shown(f.file) })),
  };
  // The report shape is a contract shared with the server and the client.
  checkReportSchema.parse(report);
  const text = formatter(report, { design, diagnostics: design.diagnostics, deck });
  if (values.output) {
    try {
      writeFileSync(resolve(workingDirectory(), values.output), text);
    } catch (e) {
      process.stderr.write(`keepwell check: cannot write ${values.output}: ${(e as Error).message}\n`);
      return 2;
    }
  } else process.stdout.write(text);

  if (parseErrors > 0) return 2;
  return report.summary.errors > 0 ? 1 : 0;
}
