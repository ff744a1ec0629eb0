// Check runs as the API sees them: submitting one on a stored netlist set, listing
// and reading runs of the team, cancelling, and the files a run read. The work
// itself happens in the worker (server/worker/); this side only writes the run row
// and its first job, and reads what the worker wrote.

import { QueryTypes, type Transaction } from 'sequelize';
import type { RunDetail, RunDiagnostic, RunView, RunState } from '../../shared/api/runs';
import { FINISHED_RUN_STATES } from '../../shared/api/runs';
import { REVIEW_CAUTION, type CheckSummary } from '../../shared/findings';
import type { Role } from '../../shared/roles';
import type { AppContext } from '../context';
import { NetlistFile } from '../db/models';
import { conflict, forbidden, HttpError, notFound } from '../errors';
import { enqueueRun, removeRunJobs, runQueue } from '../queue';
import { loadQueueSettings } from '../queue/config';
import { recordAudit } from './audit';
import { statusCounts } from './reports';
import { versionForRun } from './decks';
import { mailRunEnded, progressOf } from './runs-store';
import { getNetlist } from './uploads';
import { decodeNetlistText } from './uploads-text';

let queueSettings: ReturnType<typeof loadQueueSettings> | undefined;
const settings = () => (queueSettings ??= loadQueueSettings());

interface RunRow {
  id: string;
  block_id: string;
  block_name: string;
  netlist_id: string;
  deck_version_id: string;
  deck_name: string;
  deck_version: number;
  state: RunState;
  progress: RunView['progress'];
  attempt: number;
  error: string | null;
  summary: CheckSummary | null;
  note: string;
  top_cell: string | null;
  parts: number | null;
  submitted_by: string | null;
  submitter_name: string | null;
  submitter_email: string | null;
  created_at: Date;
  started_at: Date | null;
  finished_at: Date | null;
  team_id: string;
}

const RUN_SELECT = `
  select r.id, r.block_id, b.name as block_name, r.netlist_id, r.deck_version_id, d.name as deck_name, v.version as deck_version,
    r.state, r.progress, r.attempt, r.error, r.summary, r.note, r.top_cell, r.parts, r.submitted_by,
    u.name as submitter_name, u.email as submitter_email, r.created_at, r.started_at, r.finished_at, r.team_id
  from runs r
    join blocks b on b.id = r.block_id
    join rule_deck_versions v on v.id = r.deck_version_id
    join rule_decks d on d.id = v.deck_id
    left join users u on u.id = r.submitted_by`;

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);

function runView(r: RunRow): RunView {
  return {
    id: r.id,
    block: { id: r.block_id, name: r.block_name },
    netlistId: r.netlist_id,
    deck: { versionId: r.deck_version_id, name: r.deck_name, version: r.deck_version },
    state: r.state,
    progress: r.progress,
    attempt: r.attempt,
    error: r.error,
    summary: r.summary,
    note: r.note,
    topCell: r.top_cell,
    parts: r.parts,
    submitter: r.submitted_by && r.submitter_name !== null ? { id: r.submitted_by, name: r.submitter_name, email: r.submitter_email ?? '' } : null,
    createdAt: iso(r.created_at)!,
    startedAt: iso(r.started_at),
    finishedAt: iso(r.finished_at),
  };
}

async function runRow(ctx: Pick<AppContext, 'sequelize'>, teamId: string, runId: string, transaction?: Transaction): Promise<RunRow> {
  const rows = await ctx.sequelize.query<RunRow>(`${RUN_SELECT} where r.id = :runId and r.team_id = :teamId`, {
    replacements: { runId, teamId },
    type: QueryTypes.SELECT,
    transaction,
  });
  if (!rows[0]) throw notFound('Run');
  return rows[0];
}

export async function getRun(ctx: Pick<AppContext, 'sequelize'>, teamId: string, runId: string): Promise<RunView> {
  return runView(await runRow(ctx, teamId, runId));
}

export interface SubmitInput {
  netlistId: string;
  deckVersionId?: string;
  note: string;
  top?: string;
}

/** The run row of a stored netlist set, queued. PostgreSQL is the truth: a worker's reconciler enqueues any queued run the queue lacks. */
export async function createQueuedRun(ctx: Pick<AppContext, 'sequelize'>, actor: { id: string; teamId: string }, input: SubmitInput): Promise<string> {
  const netlist = await getNetlist(actor.teamId, input.netlistId);
  const version = await versionForRun(actor.teamId, input.deckVersionId);
  if (!version) throw new HttpError(409, 'no-deck', 'The team has no published default deck version; publish one or name a version.');
  return ctx.sequelize.transaction(async (transaction) => {
    const [row] = await ctx.sequelize.query<{ id: string }>(
      `insert into runs (team_id, block_id, netlist_id, deck_version_id, submitted_by, state, progress, note, top_cell)
       values (:teamId, :blockId, :netlistId, :deckVersionId, :submittedBy, 'queued', :progress, :note, :top) returning id`,
      {
        replacements: {
          teamId: actor.teamId,
          blockId: netlist.blockId,
          netlistId: netlist.id,
          deckVersionId: version.id,
          submittedBy: actor.id,
          progress: JSON.stringify(progressOf('queued', 'Waiting for a worker')),
          note: input.note,
          top: input.top ?? null,
        },
        type: QueryTypes.SELECT,
        transaction,
      },
    );
    await recordAudit(
      {
        teamId: actor.teamId,
        actorId: actor.id,
        action: 'run.submit',
        subjectType: 'run',
        subjectId: row.id,
        detail: { blockId: netlist.blockId, netlistId: netlist.id, deckVersionId: version.id },
      },
      transaction,
    );
    return row.id;
  });
}

/** A queued run of a stored netlist set: the row first, then its job. */
export async function submitRun(ctx: AppContext, actor: { id: string; teamId: string }, input: SubmitInput): Promise<RunView> {
  const runId = await createQueuedRun(ctx, actor, input);
  await enqueueRun(runQueue(ctx), settings(), runId);
  return getRun(ctx, actor.teamId, runId);
}

export async function listRuns(
  ctx: Pick<AppContext, 'sequelize'>,
  teamId: string,
  actorId: string,
  query: { page: number; pageSize: number; blockId?: string; state?: RunState[]; submittedBy?: string },
) {
  const where = ['r.team_id = :teamId'];
  const replacements: Record<string, unknown> = { teamId, limit: query.pageSize, offset: (query.page - 1) * query.pageSize };
  if (query.blockId) {
    where.push('r.block_id = :blockId');
    replacements.blockId = query.blockId;
  }
  if (query.state?.length) {
    where.push('r.state in (:states)');
    replacements.states = query.state;
  }
  if (query.submittedBy) {
    where.push('r.submitted_by = :submittedBy');
    replacements.submittedBy = query.submittedBy === 'me' ? actorId : query.submittedBy;
  }
  const clause = where.join(' and ');
  const [rows, [{ total }]] = await Promise.all([
    ctx.sequelize.query<RunRow>(`${RUN_SELECT} where ${clause} order by r.created_at desc, r.id desc limit :limit offset :offset`, {
      replacements,
      type: QueryTypes.SELECT,
    }),
    ctx.sequelize.query<{ total: number }>(`select cast(count(*) as integer) as total from runs r where ${clause}`, { replacements, type: QueryTypes.SELECT }),
  ]);
  return { items: rows.map(runView), total, page: query.page, pageSize: query.pageSize };
}

export async function runDetail(ctx: Pick<AppContext, 'sequelize'>, teamId: string, runId: string): Promise<RunDetail> {
  const row = await runRow(ctx, teamId, runId);
  const [extra] = await ctx.sequelize.query<{ diagnostics: RunDiagnostic[]; breakdown: RunDetail['breakdown'] }>(
    'select diagnostics, breakdown from runs where id = :runId',
    { replacements: { runId }, type: QueryTypes.SELECT },
  );
  const files = await NetlistFile.findAll({ where: { netlistId: row.netlist_id }, order: [['path', 'ASC']] });
  return {
    ...runView(row),
    diagnostics: extra.diagnostics,
    breakdown: extra.breakdown,
    files: files.map((f) => ({ path: f.path, size: f.size, sha256: f.sha256 })),
    caution: REVIEW_CAUTION,
    // Waiver statuses change without a re-run (decisions, expiry): counted when read, by the one status decision.
    statusCounts: row.state === 'succeeded' ? await statusCounts(ctx, teamId, runId, row.block_id) : null,
  };
}

/** Cancel a queued or running run: designers and methodology owners their own, admins any. A running job stops at its next stage. */
export async function cancelRun(ctx: AppContext, actor: { id: string; teamId: string; roles: readonly Role[] }, runId: string): Promise<RunView> {
  await ctx.sequelize.transaction(async (transaction) => {
    const rows = await ctx.sequelize.query<{ state: RunState; submitted_by: string | null }>(
      'select state, submitted_by from runs where id = :runId and team_id = :teamId for update',
      { replacements: { runId, teamId: actor.teamId }, type: QueryTypes.SELECT, transaction },
    );
    const run = rows[0];
    if (!run) throw notFound('Run');
    if (!actor.roles.includes('admin') && run.submitted_by !== actor.id) throw forbidden('Only the submitter or an administrator may cancel this run.');
    if (FINISHED_RUN_STATES.includes(run.state)) throw conflict(`The run has already ${run.state === 'cancelled' ? 'been cancelled' : run.state}.`);
    await ctx.sequelize.query(
      `update runs set state = 'cancelled', cancelled_by = :actorId, progress = :progress, finished_at = now(), updated_at = now() where id = :runId`,
      { replacements: { runId, actorId: actor.id, progress: JSON.stringify(progressOf('done', 'Cancelled')) }, transaction },
    );
    await ctx.sequelize.query('delete from run_parts where run_id = :runId', { replacements: { runId }, transaction });
    await recordAudit({ teamId: actor.teamId, actorId: actor.id, action: 'run.cancel', subjectType: 'run', subjectId: runId, detail: { was: run.state } }, transaction);
    await mailRunEnded(ctx, runId, 'cancelled', transaction);
  });
  await removeRunJobs(runQueue(ctx), runId);
  return getRun(ctx, actor.teamId, runId);
}

export async function runFiles(ctx: Pick<AppContext, 'sequelize'>, teamId: string, runId: string) {
  const row = await runRow(ctx, teamId, runId);
  const files = await NetlistFile.findAll({ where: { netlistId: row.netlist_id }, order: [['path', 'ASC']] });
  return { items: files.map((f) => ({ path: f.path, size: f.size, sha256: f.sha256 })) };
}

/** One file of a run's netlist set, decoded for the editor view. */
export async function runFile(ctx: Pick<AppContext, 'sequelize'>, teamId: string, runId: string, path: string) {
  const row = await runRow(ctx, teamId, runId);
  const file = await NetlistFile.unscoped().findOne({ where: { netlistId: row.netlist_id, path } });
  if (!file) throw notFound('File');
  const decoded = decodeNetlistText(file.path, file.content);
  return { path: file.path, size: file.size, sha256: file.sha256, text: decoded.text, diagnostics: decoded.diagnostic ? [decoded.diagnostic] : [] };
}
