// What a finished run hands to review and to machines: the review report (JSON for
// the printable page; reports-pdf.ts lays out the same content as PDF), the CSV of
// its findings with their statuses, and its SARIF log. Statuses come from the one
// place that decides them, waivers-status.ts.

import { readFileSync } from 'node:fs';
import path from 'node:path';
import { QueryTypes } from 'sequelize';
import { REPORT_LIST_LIMIT, type ReportCounts, type ReviewReport, type StatusCounts } from '../../shared/api/reports';
import { FINDING_STATUSES, type StoredFinding } from '../../shared/api/runs';
import type { WaiverView } from '../../shared/api/waivers';
import type { Deck, Severity } from '../../shared/deck';
import { REVIEW_CAUTION } from '../../shared/findings';
import { buildSarif, type SarifLog, type SarifWaiver } from '../../rules/sarif';
import { repoRoot } from '../config';
import type { AppContext } from '../context';
import { conflict, notFound } from '../errors';
import { FINDING_COLUMNS, findingView, type FindingRowData } from './runs-findings';
import { waiversByIds } from './waivers';
import { formatQuantity, waiverClock, waiverJoin, waiverMatch, type FindingStatus, type WaiverMatch } from './waivers-status';

type Ctx = Pick<AppContext, 'sequelize'>;

interface RunHead {
  id: string;
  block_id: string;
  block_name: string;
  state: string;
  note: string;
  created_at: Date;
  finished_at: Date | null;
  submitted_by: string | null;
  submitter_name: string | null;
  submitter_email: string | null;
  netlist_id: string;
  deck_version_id: string;
  deck_name: string;
  deck_version: number;
  deck_state: string;
  deck_content: Deck;
  change_note: string;
  published_at: Date | null;
  published_by: string | null;
  publisher_name: string | null;
  publisher_email: string | null;
}

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);
const person = (id: string | null, name: string | null, email: string | null) => (id && name !== null ? { id, name, email: email ?? '' } : null);

/** A run of the team that has finished its check; anything else has no report yet. */
async function finishedRun(ctx: Ctx, teamId: string, runId: string): Promise<RunHead> {
  const rows = await ctx.sequelize.query<RunHead>(
    `select r.id, r.block_id, b.name as block_name, r.state, r.note, r.created_at, r.finished_at, r.submitted_by,
       u.name as submitter_name, u.email as submitter_email, r.netlist_id, r.deck_version_id, d.name as deck_name,
       v.version as deck_version, v.state as deck_state, v.content as deck_content, v.change_note, v.published_at, v.published_by,
       p.name as publisher_name, p.email as publisher_email
     from runs r join blocks b on b.id = r.block_id
       join rule_deck_versions v on v.id = r.deck_version_id join rule_decks d on d.id = v.deck_id
       left join users u on u.id = r.submitted_by left join users p on p.id = v.published_by
     where r.id = :runId and r.team_id = :teamId`,
    { replacements: { runId, teamId }, type: QueryTypes.SELECT },
  );
  const run = rows[0];
  if (!run) throw notFound('Run');
  if (run.state !== 'succeeded') throw conflict(`The run has not finished its check (it is ${run.state}); a report needs a succeeded run.`);
  return run;
}

async function findingsOf(ctx: Ctx, match: WaiverMatch, run: RunHead, options: { status?: FindingStatus; severity?: Severity; limit?: number } = {}): Promise<StoredFinding[]> {
  const where = ['f.run_id = :runId'];
  if (options.status) where.push(match.statusIs(options.status));
  if (options.severity) where.push('f.severity = :severity');
  const rows = await ctx.sequelize.query<FindingRowData>(
    `select ${FINDING_COLUMNS} from findings f ${waiverJoin} where ${where.join(' and ')}
     order by f.severity_rank, f.file, f.line, f."column", f.id ${options.limit ? 'limit :limit' : ''}`,
    {
      replacements: { runId: run.id, severity: options.severity ?? null, limit: options.limit ?? null, ...match.replacements },
      type: QueryTypes.SELECT,
    },
  );
  return rows.map(findingView);
}

const zeroCounts = (): StatusCounts => Object.fromEntries(FINDING_STATUSES.map((s) => [s, 0])) as StatusCounts;

/** Findings of a run by severity and status, as the one status decision makes them. */
export async function statusCounts(ctx: Ctx, teamId: string, runId: string, blockId: string, known?: WaiverMatch): Promise<ReportCounts> {
  const match = known ?? (await waiverMatch(ctx, { teamId, blockId }));
  const rows = await ctx.sequelize.query<{ severity: Severity; status: FindingStatus; n: number }>(
    `select f.severity, ${match.statusSql} as status, cast(count(*) as integer) as n from findings f
     where f.run_id = :runId group by 1, 2`,
    { replacements: { runId, ...match.replacements }, type: QueryTypes.SELECT },
  );
  const counts: ReportCounts = { bySeverity: { error: zeroCounts(), warning: zeroCounts(), info: zeroCounts() }, total: zeroCounts() };
  for (const r of rows) {
    counts.bySeverity[r.severity][r.status] += r.n;
    counts.total[r.status] += r.n;
  }
  return counts;
}

/** The waivers that decide statuses of this run's findings, with how many each decides and to what. */
async function waiversOfRun(ctx: Ctx, teamId: string, match: WaiverMatch, run: RunHead) {
  if (!match.any) return [];
  const rows = await ctx.sequelize.query<{ id: string; status: FindingStatus; n: number }>(
    `select ws.id, case when ws.outcome in ('waived', 'waiver-requested') then ws.outcome else 'waiver-lapsed' end as status,
       cast(count(*) as integer) as n
     from findings f ${waiverJoin}
     where f.run_id = :runId and f.rule_id in (:wsRules) and ws.id is not null group by 1, 2 order by 1, 2`,
    { replacements: { runId: run.id, ...match.replacements }, type: QueryTypes.SELECT },
  );
  const views = await waiversByIds(ctx, teamId, [...new Set(rows.map((r) => r.id))]);
  const rank: Record<FindingStatus, number> = { waived: 0, 'waiver-requested': 1, 'waiver-lapsed': 2, open: 3 };
  return views
    .map((w) => {
      const mine = rows.filter((r) => r.id === w.id);
      // A waiver decides one status per finding; across findings (a rule-in-cell waiver with a bound) the most favourable is shown.
      const statusInRun = mine.map((r) => r.status).sort((a, b) => rank[a] - rank[b])[0];
      return { ...w, findings: mine.reduce((n, r) => n + r.n, 0), statusInRun };
    })
    .sort((a, b) => rank[a.statusInRun] - rank[b.statusInRun] || a.ruleId.localeCompare(b.ruleId) || (a.cell ?? '').localeCompare(b.cell ?? ''));
}

export async function reviewReport(ctx: Ctx, teamId: string, runId: string): Promise<ReviewReport> {
  const run = await finishedRun(ctx, teamId, runId);
  const match = await waiverMatch(ctx, { teamId, blockId: run.block_id });
  const [counts, openErrors, lapsed, waivers, files] = await Promise.all([
    statusCounts(ctx, teamId, run.id, run.block_id, match),
    findingsOf(ctx, match, run, { status: 'open', severity: 'error', limit: REPORT_LIST_LIMIT }),
    findingsOf(ctx, match, run, { status: 'waiver-lapsed', limit: REPORT_LIST_LIMIT }),
    waiversOfRun(ctx, teamId, match, run),
    ctx.sequelize.query<{ path: string; sha256: string }>('select path, sha256 from netlist_files where netlist_id = :id order by path', {
      replacements: { id: run.netlist_id },
      type: QueryTypes.SELECT,
    }),
  ]);
  return {
    run: {
      id: run.id,
      block: { id: run.block_id, name: run.block_name },
      state: run.state,
      note: run.note,
      submitter: person(run.submitted_by, run.submitter_name, run.submitter_email),
      createdAt: iso(run.created_at)!,
      finishedAt: iso(run.finished_at),
      files,
    },
    deck: {
      name: run.deck_name,
      version: run.deck_version,
      versionId: run.deck_version_id,
      state: run.deck_state,
      publishNote: run.change_note,
      publishedAt: iso(run.published_at),
      publishedBy: person(run.published_by, run.publisher_name, run.publisher_email),
    },
    counts,
    openErrors,
    openErrorsTotal: counts.bySeverity.error.open,
    lapsed,
    lapsedTotal: counts.total['waiver-lapsed'],
    waivers,
    generatedAt: waiverClock.now().toISOString(),
    caution: REVIEW_CAUTION,
  };
}

/**
 * One CSV field (RFC 4180 §2): quoted when it holds a comma, a quote or a line break,
 * quotes doubled. Text that a spreadsheet would run as a formula (=, +, -, @ first) is
 * prefixed with an apostrophe, as the OWASP advice on CSV injection has it.
 */
export function csvField(value: string | number | null | undefined, text = true): string {
  if (value === null || value === undefined) return '';
  let s = String(value);
  if (text && /^[=+\-@\t\r]/.test(s)) s = `'${s}`;
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

export const CSV_COLUMNS = [
  'id', 'severity', 'status', 'rule', 'cell', 'file', 'line', 'column', 'message', 'measured', 'measured_unit', 'limit', 'limit_unit',
  'instances', 'devices', 'nets', 'fingerprint', 'waiver_id', 'waiver_scope', 'lapse_reason',
] as const;

/** Every finding of the run, one record each, CRLF line ends (RFC 4180); the review caution is the last record. */
export async function findingsCsv(ctx: Ctx, teamId: string, runId: string): Promise<string> {
  const run = await finishedRun(ctx, teamId, runId);
  const findings = await findingsOf(ctx, await waiverMatch(ctx, { teamId, blockId: run.block_id }), run);
  const lines = [CSV_COLUMNS.join(',')];
  for (const f of findings) {
    lines.push(
      [
        csvField(f.id, false),
        csvField(f.severity),
        csvField(f.status),
        csvField(f.ruleId),
        csvField(f.cell),
        csvField(f.file),
        csvField(f.line, false),
        csvField(f.column, false),
        csvField(f.message),
        csvField(f.measured?.value, false),
        csvField(f.measured?.unit),
        csvField(f.limit?.value, false),
        csvField(f.limit?.unit),
        csvField(f.instances, false),
        csvField(f.devices.join(' ')),
        csvField(f.nets.join(' ')),
        csvField(f.fingerprint),
        csvField(f.waiver?.id),
        csvField(f.waiver?.scope),
        csvField(f.waiver?.reason),
      ].join(','),
    );
  }
  lines.push([csvField(REVIEW_CAUTION), ...CSV_COLUMNS.slice(1).map(() => '')].join(','));
  return lines.join('\r\n') + '\r\n';
}

let version: string | undefined;
function toolVersion(): string {
  if (version === undefined) {
    try {
      version = (JSON.parse(readFileSync(path.join(repoRoot, 'package.json'), 'utf8')) as { version?: string }).version ?? '0.0.0';
    } catch {
      version = '0.0.0';
    }
  }
  return version;
}

function sarifWaiver(f: StoredFinding, waivers: Map<string, WaiverView>): SarifWaiver | null {
  if (!f.waiver || (f.status !== 'waived' && f.status !== 'waiver-requested')) return null;
  const w = waivers.get(f.waiver.id);
  if (!w) return null;
  return {
    id: w.id,
    status: f.status === 'waived' ? 'accepted' : 'underReview',
    justification: w.justification,
    scope: w.scope,
    requestedBy: w.requester?.email ?? null,
    approvedBy: w.decider?.email ?? null,
    expiresAt: w.expiresAt,
  };
}

/** The run as a SARIF 2.1.0 log: paths as uploaded, waivers as external suppressions. */
export async function runSarif(ctx: Ctx, teamId: string, runId: string): Promise<SarifLog> {
  const run = await finishedRun(ctx, teamId, runId);
  const findings = await findingsOf(ctx, await waiverMatch(ctx, { teamId, blockId: run.block_id }), run);
  const ids = [...new Set(findings.flatMap((f) => (f.waiver ? [f.waiver.id] : [])))];
  const waivers = new Map((await waiversByIds(ctx, teamId, ids)).map((w) => [w.id, w]));
  return buildSarif({
    toolVersion: toolVersion(),
    deck: { name: run.deck_name, version: String(run.deck_version) },
    findings: findings.map((f) => ({ ...f, waiver: sarifWaiver(f, waivers) })),
    ruleIds: Object.entries(run.deck_content.rules ?? {})
      .filter(([, s]) => s.enabled)
      .map(([id]) => id),
    rootDescription: `The netlist files of run ${run.id} of block ${run.block_name}, by the paths they were uploaded with.`,
  });
}

/** For the PDF: a finding's measurement against its limit in words. */
export function measuredText(f: StoredFinding): string {
  if (!f.measured) return '';
  return f.limit ? `${formatQuantity(f.measured)} against ${formatQuantity(f.limit)}` : formatQuantity(f.measured);
}
