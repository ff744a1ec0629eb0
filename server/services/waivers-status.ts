// The one place that decides a stored finding's status: open, waived,
// waiver-requested, or waiver-lapsed (and why). Every reader of findings — the
// findings list and its filters, one finding, the comparison, the run's counts, the
// review report, SARIF, `keepwell submit` — joins findings (aliased `f`) to the
// team's live waivers through `waiverJoin` and reads the outcome with `findingStatus`,
// or filters and counts with the `statusSql` of `waiverMatch`, the same decision.
//
// A waiver covers a finding of a run of block B when it names the finding's rule and
// cell (cells compared without regard to case, as SPICE names are) and
//   - scope `finding`: the finding's fingerprint, and the waiver was asked in block B;
//   - scope `cell`: the finding's fingerprint, in any block of the team;
//   - scope `rule-in-cell`: any fingerprint, in any block of the team.
// The fingerprint covers the rule, the cell and the finding's device and net names
// (rules/fingerprint.ts), so a waiver carries over to re-runs of an unchanged circuit.
// An approved fingerprint waiver whose fingerprint is absent from the run, while the
// run has a finding of the same rule in the same cell sharing a device or a net with
// the waived one, is shown on that finding as lapsed because the circuit changed.
// An approved waiver past its expiry, or whose bound the finding's measured value
// is worse than, lapses too. Requested waivers show as such; rejected and revoked
// ones are ignored. When several apply, a covering one wins over a request, and a
// request over a lapse.

import { QueryTypes } from 'sequelize';
import type { FindingWaiver, LapseReason, WaiverBound, WaiverScope, WaiverState } from '../../shared/api/waivers';
import type { FINDING_STATUSES } from '../../shared/api/runs';
import type { Quantity } from '../../shared/findings';
import { formatSi } from '../../rules/units';
import type { AppContext } from '../context';

export type FindingStatus = (typeof FINDING_STATUSES)[number];

/** The clock expiry is judged by (and the expiry sweep runs on); tests set `now` to move time. */
export const waiverClock = { now: (): Date => new Date() };

const MEASURED = `(f.measured->>'value')::float8`;
const BOUND = `(w.bound->>'value')::float8`;

/** Every live waiver that names the finding's rule and matches it, best first (shared by the join and the scalar below). */
const CANDIDATES = `from waivers w
    cross join lateral (select case
        when w.state = 'requested' then 'waiver-requested'
        when w.fingerprint is not null and w.fingerprint <> f.fingerprint then 'changed'
        when w.expires_at is not null and w.expires_at <= :wsNow then 'expired'
        when w.bound is not null and f.measured is not null and (
            f.measured->>'unit' is distinct from w.bound->>'unit'
            or (w.bound->>'sense' = 'max' and ${MEASURED} > ${BOUND})
            or (w.bound->>'sense' = 'min' and ${MEASURED} < ${BOUND})) then 'bound'
        else 'waived' end as outcome) m
    where w.team_id = :wsTeamId and w.rule_id = f.rule_id and lower(w.cell) = lower(f.cell) and w.state in ('approved', 'requested')
      and (w.scope <> 'finding' or w.block_id = :wsBlockId)
      and (w.fingerprint = f.fingerprint
        or w.scope = 'rule-in-cell'
        or (w.state = 'approved' and w.fingerprint is not null and (w.devices && f.devices or w.nets && f.nets)
          and not exists (select 1 from findings g where g.run_id = f.run_id and g.fingerprint = w.fingerprint)))
    order by case m.outcome when 'waived' then 0 when 'waiver-requested' then 1 else 2 end, w.decided_at desc nulls last, w.created_at desc
    limit 1`;

/** `left join lateral … ws`: the one waiver that decides each finding's status, with what `findingStatus` reads. */
export const waiverJoin = `left join lateral (select w.id, w.state, w.scope, w.expires_at, w.bound, w.devices, w.nets, m.outcome ${CANDIDATES}) ws on true`;

export interface WaiverMatch {
  /** Replacements of `waiverJoin` and `statusSql`, under names no other query part uses. */
  replacements: Record<string, unknown>;
  /**
   * The status as an SQL expression over findings `f`, for filters and counts over many rows:
   * findings of rules no live waiver of the team names are open without looking further.
   */
  statusSql: string;
  /** A filter on one status, written so that the rule index narrows the findings a waiver could decide. */
  statusIs(status: FindingStatus): string;
  /** Whether any live waiver of the team could match (else every finding is open). */
  any: boolean;
}

/** Read which rules the team's live waivers name, once per query, so the rest of a run's findings cost nothing. */
export async function waiverMatch(ctx: Pick<AppContext, 'sequelize'>, scope: { teamId: string; blockId: string; now?: Date }): Promise<WaiverMatch> {
  const rules = await ctx.sequelize.query<{ rule_id: string }>(
    `select distinct rule_id from waivers where team_id = :teamId and state in ('approved', 'requested')`,
    { replacements: { teamId: scope.teamId }, type: QueryTypes.SELECT },
  );
  const wsRules = rules.map((r) => r.rule_id);
  const scalar = `coalesce((select case when m.outcome in ('waived', 'waiver-requested') then m.outcome else 'waiver-lapsed' end ${CANDIDATES}), 'open')`;
  const quoted = (status: FindingStatus) => `'${status.replace(/[^a-z-]/g, '')}'`;
  return {
    statusIs: (status) =>
      !wsRules.length
        ? status === 'open'
          ? 'true'
          : 'false'
        : status === 'open'
          ? `(f.rule_id not in (:wsRules) or ${scalar} = 'open')`
          : `(f.rule_id in (:wsRules) and ${scalar} = ${quoted(status)})`,
    replacements: { wsTeamId: scope.teamId, wsBlockId: scope.blockId, wsNow: scope.now ?? waiverClock.now(), wsRules: wsRules.length ? wsRules : [''] },
    statusSql: wsRules.length ? `(case when f.rule_id in (:wsRules) then ${scalar} else 'open' end)` : `'open'`,
    any: wsRules.length > 0,
  };
}

/** Columns to select beside the finding's own for `findingStatus`. */
export const waiverColumns = `ws.id as ws_id, ws.state as ws_state, ws.scope as ws_scope, ws.outcome as ws_outcome, ws.expires_at as ws_expires_at,
  ws.bound as ws_bound, ws.devices as ws_devices, ws.nets as ws_nets`;

export interface WaiverColumns {
  ws_id: string | null;
  ws_state: WaiverState | null;
  ws_scope: WaiverScope | null;
  ws_outcome: 'waived' | 'waiver-requested' | LapseReason | null;
  ws_expires_at: Date | null;
  ws_bound: WaiverBound | null;
  ws_devices: string[] | null;
  ws_nets: string[] | null;
  measured: Quantity | null;
}

const UNITLESS = new Set(['ratio', '', 'V/V', 'count']);

export function formatQuantity(q: { value: number; unit: string }): string {
  if (UNITLESS.has(q.unit)) return `${Number(q.value.toPrecision(3))}${q.unit === 'V/V' ? ' V/V' : ''}`;
  return formatSi(q.value, q.unit);
}

const day = (d: Date) => new Date(d).toISOString().slice(0, 10);

function lapseText(row: WaiverColumns, lapse: LapseReason): string {
  if (lapse === 'expired') return `The waiver expired on ${day(row.ws_expires_at!)}.`;
  if (lapse === 'bound') {
    const b = row.ws_bound!;
    const m = row.measured!;
    if (m.unit !== b.unit) return `The measured value is now in ${m.unit || 'another unit'}, the waiver’s bound in ${b.unit}: they cannot be compared.`;
    return `Measured ${formatQuantity(m)} is worse than the waiver’s bound of ${formatQuantity(b)} (${b.sense === 'max' ? 'at most' : 'at least'}).`;
  }
  const names = [...(row.ws_devices ?? []), ...(row.ws_nets ?? [])];
  return `The cell’s devices or nets changed since the waiver was granted${names.length ? ` on ${names.join(', ')}` : ''}.`;
}

/** A finding row's status and the waiver behind it. */
export function findingStatus(row: WaiverColumns): { status: FindingStatus; waiver: FindingWaiver | null } {
  if (!row.ws_id || !row.ws_outcome) return { status: 'open', waiver: null };
  const lapse = row.ws_outcome === 'waived' || row.ws_outcome === 'waiver-requested' ? null : row.ws_outcome;
  const waiver: FindingWaiver = {
    id: row.ws_id,
    state: row.ws_state!,
    scope: row.ws_scope!,
    lapse,
    reason: lapse ? lapseText(row, lapse) : null,
    expiresAt: row.ws_expires_at ? new Date(row.ws_expires_at).toISOString() : null,
  };
  return { status: lapse ? 'waiver-lapsed' : (row.ws_outcome as 'waived' | 'waiver-requested'), waiver };
}
