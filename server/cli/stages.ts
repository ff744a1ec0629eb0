// keepwell stages FILE [--cell CELL] [--deck deck.json] [--scale F] [--format json]
//
// The per-stage transfer report: for every stage of every cell (or one cell), each
// swept input with the others held at values that let it control the output, at the
// corner where the stage is worst: VM, gain at VM, VIL, VIH, VOH, VOL, NMH, NML.
// The cells are walked by the rule engine, so rails reach a cell from its parents
// exactly as in `keepwell check`.

import { checkDesign } from '../../rules/engine';
import { stageAnalysesOf, stageRows, type StageRow } from '../../rules/stages';
import { defineRule, type RuleModule } from '../../rules/types';
import type { Deck } from '../../shared/deck';
import { REVIEW_CAUTION } from '../../shared/findings';
import { z } from 'zod';
import { InputError, parseCommandLine, readCommandLineDesign, type CommandLineDesign } from './inputs';

const USAGE = `usage: keepwell stages FILE… [options]

Prints, for every stage of the netlist, its DC transfer figures per input at its
worst corner (volts; gain as dV/dV, negative for inverting stages).

options:
  --cell CELL      only this subcircuit
  --deck FILE      an exported deck (JSON); default: the built-in deck
  --scale F        length scale for netlists that set none (e.g. 1e-6 when widths are in µm)
  --format json    output format (json, the default and only one)
  -h, --help       this text

exit status: 0 report written, 2 unreadable input, parse errors or unknown cell`;

const COLLECTOR_ID = 'stage.report';

export async function run(args: string[]): Promise<number> {
  const parsed = parseCommandLine('stages', USAGE, args, {
    cell: { type: 'string' },
    deck: { type: 'string' },
    scale: { type: 'string' },
    format: { type: 'string' },
  });
  if (typeof parsed === 'number') return parsed;
  const { positionals } = parsed;
  const values = parsed.values as { cell?: string; deck?: string; scale?: string; format?: string };
  const fail = (message: string) => {
    process.stderr.write(`keepwell stages: ${message}\n`);
    return 2;
  };
  if (!positionals.length) return fail(`no netlist files given\n\n${USAGE}`);
  if ((values.format ?? 'json') !== 'json') return fail(`unknown format "${values.format}" (available: json)`);

  let input: CommandLineDesign;
  try {
    input = readCommandLineDesign(values, positionals);
  } catch (e) {
    if (e instanceof InputError) return fail(e.message);
    throw e;
  }
  const { deck, design, shown } = input;
  if (design.diagnostics.some((d) => d.severity === 'error')) return 2;

  let cells: string[] | undefined;
  if (values.cell) {
    const wanted = values.cell.toLowerCase();
    cells = [...design.cells.values()].filter((c) => c.name.toLowerCase() === wanted).map((c) => c.key);
    if (!cells.length) return fail(`no cell "${values.cell}" in the netlist`);
  }

  // The engine visits each cell once per distinct port context; a collector rule gathers the rows.
  const rows: StageRow[] = [];
  const seen = new Set<string>();
  const collector = defineRule({
    meta: { id: COLLECTOR_ID, title: 'Stage report', area: 'stage', rationale: '', fix: '', defaultSeverity: 'info' },
    params: z.object({}),
    check(ctx) {
      for (const row of stageRows(ctx.cell, stageAnalysesOf(ctx))) {
        const key = JSON.stringify(row);
        if (seen.has(key)) continue;
        seen.add(key);
        rows.push({ ...row, file: shown(row.file) });
      }
    },
  }) as unknown as RuleModule;
  const run: Deck = { ...deck, rules: { ...deck.rules, [COLLECTOR_ID]: { enabled: true, severity: 'info', params: {} } } };
  checkDesign(design, run, { rules: [collector], ...(cells ? { cells } : {}) });

  process.stdout.write(JSON.stringify({ stages: rows, deck: deck.name, caution: REVIEW_CAUTION }, null, 2) + '\n');
  return 0;
}
