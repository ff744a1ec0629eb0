// keepwell check FILE… [--deck deck.json] [--top CELL] [--scale F] [--format text|json|sarif] [--output FILE]
//
// The whole check, offline: read the netlists (and the files they include, only
// from the directories of the given files), elaborate them, run the deck's rules,
// and write a report. Exit 0: no error-severity finding; 1: some; 2: the input
// could not be read or parsed (problems go to standard error as file:line:column).

import { readFileSync, writeFileSync } from 'node:fs';
import { resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import type { Design, Diagnostic } from '../../grammar/design';
import { checkDesign } from '../../rules/engine';
import { buildSarif } from '../../rules/sarif';
import { formatSi } from '../../rules/units';
import type { Deck } from '../../shared/deck';
import { checkReportSchema, REVIEW_CAUTION, type CheckReport, type Finding } from '../../shared/findings';
import { InputError, parseCommandLine, readCommandLineDesign, workingDirectory, type CommandLineDesign } from './inputs';

export { loadFiles } from './inputs';

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

function toolVersion(): string {
  try {
    const pkg = JSON.parse(readFileSync(new URL('../../package.json', import.meta.url), 'utf8')) as { version?: string };
    return pkg.version ?? '0.0.0';
  } catch {
    return '0.0.0';
  }
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
  const parsed = parseCommandLine('check', usage(), args, {
    deck: { type: 'string' },
    top: { type: 'string' },
    scale: { type: 'string' },
    format: { type: 'string' },
    output: { type: 'string' },
  });
  if (typeof parsed === 'number') return parsed;
  const { positionals } = parsed;
  const values = parsed.values as { deck?: string; top?: string; scale?: string; format?: string; output?: string };
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
  const started = performance.now();
  let input: CommandLineDesign;
  try {
    input = readCommandLineDesign(values, positionals);
  } catch (e) {
    if (e instanceof InputError) {
      process.stderr.write(`keepwell check: ${e.message}\n`);
      return 2;
    }
    throw e;
  }
  const { deck, design, shown } = input;
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
