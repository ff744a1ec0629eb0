// A run's findings, paged on the server: filters (rule, severity, cell, status, text),
// sort orders that each have their own index (migration 20261202-21), and the
// comparison of two runs of a block by fingerprint.

import { QueryTypes } from 'sequelize';
import type { FindingsQuery, StoredFinding } from '../../shared/api/runs';
import type { Quantity, FindingPlot } from '../../shared/findings';
import type { Severity } from '../../shared/deck';
import type { AppContext } from '../context';
import { conflict, HttpError, notFound } from '../errors';
import { findingStatus, waiverColumns, waiverJoin, waiverMatch, type WaiverColumns } from './waivers-status';

type Ctx = Pick<AppContext, 'sequelize'>;

export interface FindingRowData extends WaiverColumns {
  id: number;
  rule_id: string;
  severity: Severity;
  message: string;
  file: string;
  line: number;
  column: number;
  cell: string;
  nets: string[];
  devices: string[];
  instances: number;
  measured: Quantity | null;
  limit: Quantity | null;
  fingerprint: string;
  corner: string | null;
  plot: FindingPlot | null;
}

export const FINDING_COLUMNS = `f.id, f.rule_id, f.severity, f.message, f.file, f.line, f."column", f.cell, f.nets, f.devices, f.instances,
  f.measured, f."limit", f.fingerprint, f.corner, f.plot, ${waiverColumns}`;

export function findingView(r: FindingRowData): StoredFinding {
  return {
    id: r.id,
    ruleId: r.rule_id,
    severity: r.severity,
    message: r.message,
    file: r.file,
    line: r.line,
    column: r.column,
    cell: r.cell,
    nets: r.nets,
    devices: r.devices,
    instances: r.instances,
    measured: r.measured,
    limit: r.limit,
    fingerprint: r.fingerprint,
    corner: r.corner,
    plot: r.plot,
    ...findingStatus(r),
  };
}

const ORDER: Record<FindingsQuery['sort'], string[]> = {
  severity: ['f.severity_rank'],
  rule: ['f.rule_id'],
  cell: ['f.cell'],
  location: ['f.file', 'f.line', 'f."column"'],
  instances: ['f.instances'],
};

interface RunRef {
  id: string;
  block_id: string;
  state: string;
  summary: { errors: number; warnings: number; infos: number } | null;
}

async function runOfTeam(ctx: Ctx, teamId: string, runId: string): Promise<RunRef> {
  const rows = await ctx.sequelize.query<RunRef>('select id, block_id, state, summary from runs where id = :runId and team_id = :teamId', {
    replacements: { runId, teamId },
    type: QueryTypes.SELECT,
  });
  if (!rows[0]) throw notFound('Run');
  return rows[0];
}

const likePattern = (q: string) => `%${q.toLowerCase().replace(/[\\%_]/g, (c) => `\\${c}`)}%`;

export async function listFindings(ctx: Ctx, teamId: string, runId: string, query: FindingsQuery) {
  const run = await runOfTeam(ctx, teamId, runId);
  // Statuses come from the team's waivers (server/services/waivers-status.ts).
  const match = await waiverMatch(ctx, { teamId, blockId: run.block_id });
  const where = ['f.run_id = :runId'];
  const replacements: Record<string, unknown> = { runId, limit: query.pageSize, offset: (query.page - 1) * query.pageSize, ...match.replacements };
  if (query.rule?.length) {
    where.push('f.rule_id in (:rules)');
    replacements.rules = query.rule;
  }
  if (query.severity?.length) {
    where.push('f.severity in (:severities)');
    replacements.severities = query.severity;
  }
  if (query.cell?.length) {
    where.push('f.cell in (:cells)');
    replacements.cells = query.cell;
  }
  if (query.q) {
    where.push(`f.search_text like :pattern`);
    replacements.pattern = likePattern(query.q);
  }
  if (query.file) {
    where.push('f.file = :file');
    replacements.file = query.file;
  }
  if (query.status) {
    where.push(match.statusIs(query.status));
  }
  const clause = where.join(' and ');
  const dir = query.order === 'desc' ? 'desc' : 'asc';
  const order = (alias: string) => [...ORDER[query.sort], 'f.id'].map((c) => `${c.replace(/^f\./, `${alias}.`)} ${dir}`).join(', ');

  // Unfiltered but for severity, the total is in the run's summary (written with the findings, in one transaction).
  const s = run.summary;
  const countedTotal =
    s && run.state === 'succeeded' && !query.rule?.length && !query.cell?.length && !query.q && !query.status && !query.file
      ? [{ total: (['error', 'warning', 'info'] as const).filter((v) => !query.severity?.length || query.severity.includes(v)).reduce((n, v) => n + (v === 'error' ? s.errors : v === 'warning' ? s.warnings : s.infos), 0) }]
      : null;
  // The page's ids first, from the sort's index alone; only those 50 rows are then read whole.
  const [rows, [{ total }]] = await Promise.all([
    ctx.sequelize.query<FindingRowData>(
      `with page as (select f.id from findings f where ${clause} order by ${order('f')} limit :limit offset :offset)
       select ${FINDING_COLUMNS} from page join findings f on f.id = page.id ${waiverJoin} order by ${order('f')}`,
      { replacements, type: QueryTypes.SELECT },
    ),
    countedTotal ?? ctx.sequelize.query<{ total: number }>(`select cast(count(*) as integer) as total from findings f where ${clause}`, { replacements, type: QueryTypes.SELECT }),
  ]);
  return { items: rows.map(findingView), total, page: query.page, pageSize: query.pageSize };
}

/** One finding of a run, by id, with its waiver status. */
export async function getFinding(ctx: Ctx, teamId: string, runId: string, findingId: number): Promise<StoredFinding> {
  const run = await runOfTeam(ctx, teamId, runId);
  const rows = await ctx.sequelize.query<FindingRowData>(`select ${FINDING_COLUMNS} from findings f ${waiverJoin} where f.run_id = :runId and f.id = :findingId`, {
    replacements: { runId, findingId, ...(await waiverMatch(ctx, { teamId, blockId: run.block_id })).replacements },
    type: QueryTypes.SELECT,
  });
  if (!rows[0]) throw notFound('Finding');
  return findingView(rows[0]);
}

const IN_BASE = 'exists (select 1 from findings b where b.run_id = :baseId and b.fingerprint = f.fingerprint)';
const IN_HEAD = 'exists (select 1 from findings b where b.run_id = :headId and b.fingerprint = f.fingerprint)';

/** Findings new in `headId`, fixed since `baseId`, or persisting in both, matched by fingerprint. */
export async function compareRuns(
  ctx: Ctx,
  teamId: string,
  headId: string,
  baseId: string,
  query: { kind: 'new' | 'fixed' | 'persisting'; page: number; pageSize: number },
) {
  const [head, base] = await Promise.all([runOfTeam(ctx, teamId, headId), runOfTeam(ctx, teamId, baseId)]);
  if (head.block_id !== base.block_id) throw new HttpError(400, 'validation', 'Only two runs of the same block can be compared.', [{ path: 'params.baseId', message: 'another block' }]);
  for (const r of [head, base]) if (r.state !== 'succeeded') throw conflict(`Run ${r.id} has not succeeded (it is ${r.state}); only finished checks can be compared.`);

  const match = await waiverMatch(ctx, { teamId, blockId: head.block_id });
  const replacements: Record<string, unknown> = { headId, baseId, limit: query.pageSize, offset: (query.page - 1) * query.pageSize, ...match.replacements };
  const [counts] = await ctx.sequelize.query<{ new: number; fixed: number; persisting: number }>(
    `select
       (select cast(count(*) as integer) from findings f where f.run_id = :headId and not ${IN_BASE}) as new,
       (select cast(count(*) as integer) from findings f where f.run_id = :baseId and not ${IN_HEAD}) as fixed,
       (select cast(count(*) as integer) from findings f where f.run_id = :headId and ${IN_BASE}) as persisting`,
    { replacements, type: QueryTypes.SELECT },
  );
  const selection =
    query.kind === 'new' ? `f.run_id = :headId and not ${IN_BASE}` : query.kind === 'fixed' ? `f.run_id = :baseId and not ${IN_HEAD}` : `f.run_id = :headId and ${IN_BASE}`;
  const rows = await ctx.sequelize.query<FindingRowData>(
    `select ${FINDING_COLUMNS} from findings f ${waiverJoin} where ${selection} order by f.severity_rank, f.id limit :limit offset :offset`,
    { replacements, type: QueryTypes.SELECT },
  );
  return {
    head: headId,
    base: baseId,
    kind: query.kind,
    counts,
    items: rows.map(findingView),
    total: counts[query.kind],
    page: query.page,
    pageSize: query.pageSize,
  };
}
