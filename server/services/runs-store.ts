// What a worker writes about a run, always guarded by the run's state in PostgreSQL:
// claiming it, progress (which also tells a job that its run was cancelled), the
// staged results of a split run's parts, and the end — findings, summary and state
// in one transaction, so a run's results are complete or absent, never half-written.
// A retried job replaces its own earlier attempt: the findings of the run are
// deleted and inserted again inside that one transaction.

import { QueryTypes, type Transaction } from 'sequelize';
import type { CheckSummary, Finding } from '../../shared/findings';
import type { RunBreakdown, RunDiagnostic, RunProgress } from '../../shared/api/runs';
import type { Deck } from '../../shared/deck';
import type { AppContext } from '../context';
import { runEndedMail } from './runs-mail';
import { loadNetlistBytes } from './uploads';

type Ctx = Pick<AppContext, 'sequelize' | 'outbox' | 'config'>;

export type ExecutionKind = 'run' | 'part' | 'merge';
export type ExecutionOutcome = 'succeeded' | 'split' | 'staged' | 'failed' | 'skipped' | 'cancelled' | 'superseded';

export function progressOf(stage: RunProgress['stage'], label: string, extra: Partial<Omit<RunProgress, 'stage' | 'label' | 'updatedAt'>> = {}): RunProgress {
  return { stage, done: 0, total: 0, ...extra, label, updatedAt: new Date().toISOString() };
}

/** Record that a worker started a job of a run; returns the execution's id. */
export async function startExecution(
  ctx: Pick<AppContext, 'sequelize'>,
  input: { runId: string; jobId: string; kind: ExecutionKind; attempt: number; worker: string },
): Promise<number> {
  const [row] = await ctx.sequelize.query<{ id: number }>(
    `insert into run_attempts (run_id, job_id, kind, attempt, worker) values (:runId, :jobId, :kind, :attempt, :worker) returning id`,
    { replacements: input, type: QueryTypes.SELECT },
  );
  return row.id;
}

export async function finishExecution(ctx: Pick<AppContext, 'sequelize'>, id: number, outcome: ExecutionOutcome, error?: string): Promise<void> {
  await ctx.sequelize.query(`update run_attempts set finished_at = now(), outcome = :outcome, error = :error where id = :id`, {
    replacements: { id, outcome, error: error ?? null },
  });
}

export interface ClaimedRun {
  id: string;
  /** The run's attempt number after this claim; only this attempt may write the run's end. */
  attempt: number;
  netlistId: string;
  deckVersionId: string;
  topCell: string | null;
  parts: number | null;
}

/** Move a queued (or interrupted running) run to running; null when it is cancelled or already finished. */
export async function claimRun(ctx: Pick<AppContext, 'sequelize'>, runId: string): Promise<ClaimedRun | null> {
  const rows = await ctx.sequelize.query<{ id: string; attempt: number; netlist_id: string; deck_version_id: string; top_cell: string | null; parts: number | null }>(
    `update runs set state = 'running', attempt = attempt + 1, started_at = coalesce(started_at, now()),
       progress = :progress, error = null, updated_at = now()
     where id = :runId and state in ('queued', 'running')
     returning id, attempt, netlist_id, deck_version_id, top_cell, parts`,
    { replacements: { runId, progress: JSON.stringify(progressOf('reading', 'Reading the netlist files')) }, type: QueryTypes.SELECT },
  );
  const r = rows[0];
  return r ? { id: r.id, attempt: r.attempt, netlistId: r.netlist_id, deckVersionId: r.deck_version_id, topCell: r.top_cell, parts: r.parts } : null;
}

export interface RunRecord {
  state: string;
  parts: number | null;
  attempt: number;
  netlistId: string;
  deckVersionId: string;
  topCell: string | null;
  diagnostics: RunDiagnostic[];
}

/** A run as it is now (parts and the merge read it before working). */
export async function readRun(ctx: Pick<AppContext, 'sequelize'>, runId: string): Promise<RunRecord | null> {
  const rows = await ctx.sequelize.query<{ state: string; parts: number | null; attempt: number; netlist_id: string; deck_version_id: string; top_cell: string | null; diagnostics: RunDiagnostic[] }>(
    `select state, parts, attempt, netlist_id, deck_version_id, top_cell, diagnostics from runs where id = :runId`,
    { replacements: { runId }, type: QueryTypes.SELECT },
  );
  const r = rows[0];
  return r
    ? { state: r.state, parts: r.parts, attempt: r.attempt, netlistId: r.netlist_id, deckVersionId: r.deck_version_id, topCell: r.top_cell, diagnostics: r.diagnostics }
    : null;
}

/**
 * Write a job's progress. False when the run is no longer running (cancelled, or
 * finished by another attempt): the job stops there.
 */
export async function writeProgress(ctx: Pick<AppContext, 'sequelize'>, runId: string, progress: RunProgress, attempt?: number): Promise<boolean> {
  const rows = await ctx.sequelize.query(
    `update runs set progress = :progress, updated_at = now()
     where id = :runId and state = 'running' ${attempt === undefined ? '' : 'and attempt = :attempt'} returning id`,
    { replacements: { runId, attempt: attempt ?? null, progress: JSON.stringify(progress) }, type: QueryTypes.SELECT },
  );
  return rows.length > 0;
}

export interface RunInputs {
  files: { path: string; content: Buffer }[];
  deck: Deck;
}

export async function loadRunInputs(ctx: Pick<AppContext, 'sequelize'>, run: { netlistId: string; deckVersionId: string }): Promise<RunInputs> {
  const [files, decks] = await Promise.all([
    loadNetlistBytes(ctx, run.netlistId),
    ctx.sequelize.query<{ content: Deck }>(`select content from rule_deck_versions where id = :id`, {
      replacements: { id: run.deckVersionId },
      type: QueryTypes.SELECT,
    }),
  ]);
  if (!decks[0]) throw new Error(`deck version ${run.deckVersionId} of the run is missing`);
  return { files, deck: decks[0].content };
}

/** A split run: how many parts, and the design-wide part of the summary the merge completes. */
export async function markSplit(
  ctx: Pick<AppContext, 'sequelize'>,
  runId: string,
  attempt: number,
  input: { parts: number; summary: CheckSummary; diagnostics: RunDiagnostic[] },
): Promise<boolean> {
  return ctx.sequelize.transaction(async (transaction) => {
    const rows = await ctx.sequelize.query(
      `update runs set parts = :parts, summary = :summary, diagnostics = :diagnostics, updated_at = now(),
         progress = :progress
       where id = :runId and state = 'running' and attempt = :attempt returning id`,
      {
        replacements: {
          runId,
          attempt,
          parts: input.parts,
          summary: JSON.stringify(input.summary),
          diagnostics: JSON.stringify(input.diagnostics),
          progress: JSON.stringify(progressOf('checking', `Checking in ${input.parts} parts`, { parts: { done: 0, total: input.parts } })),
        },
        type: QueryTypes.SELECT,
        transaction,
      },
    );
    if (rows.length === 0) return false;
    // Parts staged by an earlier plan of this run are replaced by the new flow's.
    await ctx.sequelize.query(`delete from run_parts where run_id = :runId`, { replacements: { runId }, transaction });
    return true;
  });
}

/** Stage one part's findings (replacing an earlier attempt of the same part). Returns the parts staged so far, or null when the run is not running. */
export async function stagePart(
  ctx: Pick<AppContext, 'sequelize'>,
  runId: string,
  input: { part: number; cells: number; findings: Finding[]; cellCounts: Record<string, number> },
): Promise<{ staged: number; total: number } | null> {
  return ctx.sequelize.transaction(async (transaction) => {
    const runs = await ctx.sequelize.query<{ parts: number }>(`select parts from runs where id = :runId and state = 'running' for update`, {
      replacements: { runId },
      type: QueryTypes.SELECT,
      transaction,
    });
    if (!runs[0]) return null;
    await ctx.sequelize.query(`delete from run_parts where run_id = :runId and part = :part`, { replacements: { runId, part: input.part }, transaction });
    await ctx.sequelize.query(
      `insert into run_parts (run_id, part, cells, findings, cell_counts) values ($1, $2, $3, cast($4 as jsonb), cast($5 as jsonb))`,
      { bind: [runId, input.part, input.cells, JSON.stringify(input.findings), JSON.stringify(input.cellCounts)], transaction },
    );
    const [{ staged }] = await ctx.sequelize.query<{ staged: number }>(`select cast(count(*) as integer) as staged from run_parts where run_id = :runId`, {
      replacements: { runId },
      type: QueryTypes.SELECT,
      transaction,
    });
    return { staged, total: runs[0].parts };
  });
}

export interface StagedParts {
  parts: { part: number; cells: number; findings: Finding[]; cellCounts: Record<string, number> }[];
  expected: number;
  summary: CheckSummary | null;
  startedAt: Date | null;
}

export async function readStagedParts(ctx: Pick<AppContext, 'sequelize'>, runId: string): Promise<StagedParts | null> {
  const runs = await ctx.sequelize.query<{ parts: number | null; summary: CheckSummary | null; started_at: Date | null; state: string }>(
    `select parts, summary, started_at, state from runs where id = :runId`,
    { replacements: { runId }, type: QueryTypes.SELECT },
  );
  const run = runs[0];
  if (!run || run.state !== 'running' || !run.parts) return null;
  const parts = await ctx.sequelize.query<{ part: number; cells: number; findings: Finding[]; cell_counts: Record<string, number> }>(
    `select part, cells, findings, cell_counts from run_parts where run_id = :runId order by part`,
    { replacements: { runId }, type: QueryTypes.SELECT },
  );
  return {
    parts: parts.map((p) => ({ part: p.part, cells: p.cells, findings: p.findings, cellCounts: p.cell_counts })),
    expected: run.parts,
    summary: run.summary,
    startedAt: run.started_at,
  };
}

/**
 * Join the parts of a split run in part order. Parts are consecutive slices of the
 * engine's parents-first cell order, so the result is what one job would have found:
 * the same fingerprint met again (another parameter variant of the same cell) adds
 * its instances to the first, as rules/engine.ts does within one job.
 */
export function mergeParts(parts: StagedParts['parts']): { findings: Finding[]; cellCounts: Record<string, number>; cells: number } {
  const byFingerprint = new Map<string, Finding>();
  const findings: Finding[] = [];
  const cellCounts: Record<string, number> = {};
  let cells = 0;
  for (const part of [...parts].sort((a, b) => a.part - b.part)) {
    cells += part.cells;
    for (const [name, n] of Object.entries(part.cellCounts)) cellCounts[name] = (cellCounts[name] ?? 0) + n;
    for (const f of part.findings) {
      const first = byFingerprint.get(f.fingerprint);
      if (first) first.instances += f.instances;
      else {
        const copy = { ...f };
        byFingerprint.set(f.fingerprint, copy);
        findings.push(copy);
      }
    }
  }
  return { findings, cellCounts, cells };
}

const SEVERITY_RANK = { error: 0, warning: 1, info: 2 } as const;
/** Cells listed in a run's breakdown: those with findings, most errors first. */
export const BREAKDOWN_MAX_CELLS = 1000;

export function breakdownOf(findings: Finding[], cellCounts: Record<string, number>): RunBreakdown {
  const rules = new Map<string, RunBreakdown['byRule'][number]>();
  const cells = new Map<string, RunBreakdown['byCell'][number]>();
  for (const f of findings) {
    const rk = `${f.ruleId}\0${f.severity}`;
    const r = rules.get(rk) ?? { ruleId: f.ruleId, severity: f.severity, findings: 0, instances: 0 };
    r.findings++;
    r.instances += f.instances;
    rules.set(rk, r);
    const c = cells.get(f.cell) ?? { cell: f.cell, cellInstances: cellCounts[f.cell] ?? f.instances, findings: 0, errors: 0, warnings: 0, infos: 0 };
    c.findings++;
    if (f.severity === 'error') c.errors++;
    else if (f.severity === 'warning') c.warnings++;
    else c.infos++;
    cells.set(f.cell, c);
  }
  return {
    byRule: [...rules.values()].sort((a, b) => SEVERITY_RANK[a.severity] - SEVERITY_RANK[b.severity] || b.findings - a.findings || a.ruleId.localeCompare(b.ruleId)),
    byCell: [...cells.values()]
      .sort((a, b) => b.errors - a.errors || b.warnings - a.warnings || b.findings - a.findings || a.cell.localeCompare(b.cell))
      .slice(0, BREAKDOWN_MAX_CELLS),
  };
}

export function searchTextOf(f: Pick<Finding, 'message' | 'nets' | 'devices'>): string {
  return [f.message, ...f.nets, ...f.devices].join(' ').toLowerCase();
}

/** Findings per INSERT statement: one JSON parameter each, kept to a few megabytes. */
const INSERT_BATCH_CHARS = 8 * 1024 * 1024;

/** Insert a run's findings (inside the caller's transaction). */
export async function insertFindings(ctx: Pick<AppContext, 'sequelize'>, runId: string, findings: Finding[], transaction: Transaction): Promise<void> {
  let batch: string[] = [];
  let size = 0;
  const flush = async () => {
    if (!batch.length) return;
    await ctx.sequelize.query(
      `insert into findings (run_id, rule_id, severity, message, file, line, "column", cell, nets, devices, instances,
         measured, "limit", fingerprint, corner, plot, search_text)
       select $1, f."ruleId", f.severity, f.message, f.file, f.line, f."column", f.cell, f.nets, f.devices, f.instances,
         f.measured, f."limit", f.fingerprint, f.corner, f.plot, f."searchText"
       from jsonb_to_recordset(cast($2 as jsonb)) as f("ruleId" text, severity text, message text, file text, line integer,
         "column" integer, cell text, nets text[], devices text[], instances double precision, measured jsonb, "limit" jsonb,
         fingerprint text, corner text, plot jsonb, "searchText" text)`,
      { bind: [runId, `[${batch.join(',')}]`], transaction },
    );
    batch = [];
    size = 0;
  };
  for (const f of findings) {
    const row = JSON.stringify({ ...f, corner: f.corner ?? null, plot: f.plot ?? null, searchText: searchTextOf(f) });
    batch.push(row);
    size += row.length;
    if (size >= INSERT_BATCH_CHARS) await flush();
  }
  await flush();
}

interface RunForMail {
  submitter_email: string | null;
  submitter_name: string | null;
  submitted_by: string | null;
  block_name: string;
  team_id: string;
  summary: CheckSummary | null;
  error: string | null;
  canceller_name: string | null;
  cancelled_by: string | null;
}

/** Write the mail of a run that just ended, in the transaction that ended it. A submitter who cancelled their own run is not told. */
export async function mailRunEnded(ctx: Ctx, runId: string, state: 'succeeded' | 'failed' | 'cancelled', transaction: Transaction): Promise<void> {
  const rows = await ctx.sequelize.query<RunForMail>(
    `select u.email as submitter_email, u.name as submitter_name, r.submitted_by, b.name as block_name, r.team_id,
       r.summary, r.error, c.name as canceller_name, r.cancelled_by
     from runs r join blocks b on b.id = r.block_id
       left join users u on u.id = r.submitted_by and not u.disabled
       left join users c on c.id = r.cancelled_by
     where r.id = :runId`,
    { replacements: { runId }, type: QueryTypes.SELECT, transaction },
  );
  const r = rows[0];
  if (!r?.submitter_email) return;
  if (state === 'cancelled' && r.cancelled_by && r.cancelled_by === r.submitted_by) return;
  const mail = runEndedMail({
    name: r.submitter_name ?? '',
    block: r.block_name,
    state,
    link: `${ctx.config.publicUrl}/runs/${runId}`,
    summary: r.summary,
    error: r.error,
    cancelledBy: r.canceller_name,
  });
  await ctx.outbox.enqueue({ ...mail, to: r.submitter_email, teamId: r.team_id }, transaction);
}

export interface RunResults {
  findings: Finding[];
  summary: CheckSummary;
  breakdown: RunBreakdown;
  diagnostics: RunDiagnostic[];
}

/**
 * End a run with its results, in one transaction. `attempt` given (a whole-run job):
 * only that attempt may write; a later attempt has taken the run over. Returns what
 * happened: `succeeded`, or `cancelled`/`superseded` when nothing was written.
 */
export async function finishRun(ctx: Ctx, runId: string, results: RunResults, attempt?: number): Promise<'succeeded' | 'cancelled' | 'superseded'> {
  return ctx.sequelize.transaction(async (transaction) => {
    const rows = await ctx.sequelize.query<{ state: string; attempt: number }>(`select state, attempt from runs where id = :runId for update`, {
      replacements: { runId },
      type: QueryTypes.SELECT,
      transaction,
    });
    const run = rows[0];
    if (!run || run.state === 'cancelled') return 'cancelled';
    if (run.state !== 'running' || (attempt !== undefined && run.attempt !== attempt)) return 'superseded';
    await ctx.sequelize.query(`delete from findings where run_id = :runId`, { replacements: { runId }, transaction });
    await insertFindings(ctx, runId, results.findings, transaction);
    await ctx.sequelize.query(
      `update runs set state = 'succeeded', summary = :summary, breakdown = :breakdown, diagnostics = :diagnostics,
         progress = :progress, finished_at = now(), updated_at = now()
       where id = :runId`,
      {
        replacements: {
          runId,
          summary: JSON.stringify(results.summary),
          breakdown: JSON.stringify(results.breakdown),
          diagnostics: JSON.stringify(results.diagnostics),
          progress: JSON.stringify(progressOf('done', 'Finished', { done: results.summary.cells, total: results.summary.cells })),
        },
        transaction,
      },
    );
    await ctx.sequelize.query(`delete from run_parts where run_id = :runId`, { replacements: { runId }, transaction });
    await mailRunEnded(ctx, runId, 'succeeded', transaction);
    return 'succeeded';
  });
}

/** Fail a run that is still queued or running (bad input, or crashes past the last retry). False when it had already ended. */
export async function failRun(ctx: Ctx, runId: string, error: string, diagnostics?: RunDiagnostic[]): Promise<boolean> {
  return ctx.sequelize.transaction(async (transaction) => {
    const rows = await ctx.sequelize.query(
      `update runs set state = 'failed', error = :error, ${diagnostics ? 'diagnostics = :diagnostics,' : ''}
         progress = :progress, finished_at = now(), updated_at = now()
       where id = :runId and state in ('queued', 'running') returning id`,
      {
        replacements: {
          runId,
          error: error.slice(0, 20_000),
          diagnostics: JSON.stringify(diagnostics ?? []),
          progress: JSON.stringify(progressOf('done', 'Failed')),
        },
        type: QueryTypes.SELECT,
        transaction,
      },
    );
    if (rows.length === 0) return false;
    await ctx.sequelize.query(`delete from run_parts where run_id = :runId`, { replacements: { runId }, transaction });
    await mailRunEnded(ctx, runId, 'failed', transaction);
    return true;
  });
}

/**
 * Mark the pages just written all-visible, so that paging the new findings reads the
 * sort indexes alone (index-only scans) instead of every row they skip. Only pages
 * changed since the last vacuum are visited. Best effort: autovacuum gets there later anyway.
 */
export async function vacuumFindings(ctx: Pick<AppContext, 'sequelize'>): Promise<void> {
  await ctx.sequelize.query('vacuum findings').catch(() => {});
}
