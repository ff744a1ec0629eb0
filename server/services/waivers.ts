// Waivers: requests on a finding, decisions, direct waivers by a reviewer,
// revocation, the list and one waiver with its history, and the expiry warnings.
// Every change is written with its audit event (and any mail) in one transaction;
// nothing is deleted. Which findings a waiver covers is decided in waivers-status.ts.
// Times the service judges by come from `waiverClock` (tests move it).

import { QueryTypes, type Transaction } from 'sequelize';
import {
  WAIVER_SCOPE_LABELS,
  type CreateWaiverBody,
  type WaiverBound,
  type WaiverDetail,
  type WaiverScope,
  type WaiverStanding,
  type WaiverState,
  type WaiverView,
} from '../../shared/api/waivers';
import type { Quantity } from '../../shared/findings';
import type { Severity } from '../../shared/deck';
import type { AppContext } from '../context';
import { conflict, forbidden, HttpError, notFound } from '../errors';
import { Waiver } from '../db/models';
import { recordAudit } from './audit';
import { waiverClock } from './waivers-status';
import { waiverDecidedMail, waiverExpiringMail, waiverRequestedMail, waiverRevokedMail, type WaiverMailSubject } from './waivers-mail';

export { waiverClock };

type Ctx = Pick<AppContext, 'sequelize' | 'outbox' | 'config'>;

export interface WaiverActor {
  id: string;
  teamId: string;
}

/** How long before its expiry a waiver's requester and approver are warned. */
export const EXPIRY_WARNING_DAYS = 7;

interface WaiverRow {
  id: string;
  team_id: string;
  block_id: string | null;
  block_name: string | null;
  rule_id: string;
  cell: string | null;
  fingerprint: string | null;
  scope: WaiverScope;
  justification: string;
  state: WaiverState;
  severity: Severity | null;
  message: string;
  devices: string[];
  nets: string[];
  measured: Quantity | null;
  bound: WaiverBound | null;
  requested_by: string | null;
  requester_name: string | null;
  requester_email: string | null;
  decided_by: string | null;
  decider_name: string | null;
  decider_email: string | null;
  decision_comment: string | null;
  decided_at: Date | null;
  expires_at: Date | null;
  revoked_by: string | null;
  revoker_name: string | null;
  revoker_email: string | null;
  revoked_at: Date | null;
  revoke_reason: string | null;
  source_run_id: string | null;
  source_finding_id: string | number | null;
  created_at: Date;
  updated_at: Date;
}

const WAIVER_SELECT = `
  select w.*, b.name as block_name,
    rq.name as requester_name, rq.email as requester_email,
    dc.name as decider_name, dc.email as decider_email,
    rv.name as revoker_name, rv.email as revoker_email
  from waivers w
    left join blocks b on b.id = w.block_id
    left join users rq on rq.id = w.requested_by
    left join users dc on dc.id = w.decided_by
    left join users rv on rv.id = w.revoked_by`;

/** The standing as SQL, for the list's filter; the same as `standingOf`. */
const STANDING_SQL = `(case w.state when 'requested' then 'pending' when 'rejected' then 'rejected' when 'revoked' then 'revoked'
  else case when w.expires_at is not null and w.expires_at <= :now then 'expired' else 'active' end end)`;

export function standingOf(state: WaiverState, expiresAt: Date | null, now: Date): WaiverStanding {
  if (state === 'requested') return 'pending';
  if (state === 'rejected' || state === 'revoked') return state;
  return expiresAt && expiresAt.getTime() <= now.getTime() ? 'expired' : 'active';
}

const iso = (d: Date | null) => (d ? new Date(d).toISOString() : null);
const person = (id: string | null, name: string | null, email: string | null) => (id && name !== null ? { id, name, email: email ?? '' } : null);

function waiverView(r: WaiverRow, now: Date): WaiverView {
  return {
    id: r.id,
    scope: r.scope,
    state: r.state,
    standing: standingOf(r.state, r.expires_at ? new Date(r.expires_at) : null, now),
    ruleId: r.rule_id,
    cell: r.cell,
    fingerprint: r.fingerprint,
    block: r.block_id && r.block_name !== null ? { id: r.block_id, name: r.block_name } : null,
    severity: r.severity,
    message: r.message,
    devices: r.devices,
    nets: r.nets,
    measured: r.measured,
    bound: r.bound,
    justification: r.justification,
    requester: person(r.requested_by, r.requester_name, r.requester_email),
    decider: person(r.decided_by, r.decider_name, r.decider_email),
    decisionComment: r.decision_comment,
    decidedAt: iso(r.decided_at),
    expiresAt: iso(r.expires_at),
    revoker: person(r.revoked_by, r.revoker_name, r.revoker_email),
    revokedAt: iso(r.revoked_at),
    revokeReason: r.revoke_reason,
    source: r.source_run_id ? { runId: r.source_run_id, findingId: r.source_finding_id === null ? null : Number(r.source_finding_id) } : null,
    createdAt: iso(r.created_at)!,
    updatedAt: iso(r.updated_at)!,
  };
}

async function waiverRow(ctx: Pick<AppContext, 'sequelize'>, teamId: string, id: string, transaction?: Transaction): Promise<WaiverRow> {
  const rows = await ctx.sequelize.query<WaiverRow>(`${WAIVER_SELECT} where w.id = :id and w.team_id = :teamId`, {
    replacements: { id, teamId },
    type: QueryTypes.SELECT,
    transaction,
  });
  if (!rows[0]) throw notFound('Waiver');
  return rows[0];
}

/** `YYYY-MM-DD` holds through that day (UTC): it expires at the next midnight. */
export function expiryInstant(input: string): Date {
  if (/^\d{4}-\d{2}-\d{2}$/.test(input)) return new Date(Date.parse(`${input}T00:00:00Z`) + 24 * 3600 * 1000);
  return new Date(input);
}

const waiverLink = (ctx: Ctx, id: string) => `${ctx.config.publicUrl}/waivers/${id}`;

function mailSubject(ctx: Ctx, r: WaiverRow): WaiverMailSubject {
  return {
    ruleId: r.rule_id,
    cell: r.cell,
    block: r.block_name,
    scopeLabel: WAIVER_SCOPE_LABELS[r.scope].label.toLowerCase(),
    justification: r.justification,
    link: waiverLink(ctx, r.id),
  };
}

interface FindingForWaiver {
  id: string | number;
  run_id: string;
  block_id: string;
  rule_id: string;
  severity: Severity;
  message: string;
  cell: string;
  devices: string[];
  nets: string[];
  fingerprint: string;
  measured: Quantity | null;
  limit: Quantity | null;
}

async function findingOfTeam(ctx: Pick<AppContext, 'sequelize'>, teamId: string, runId: string, findingId: number, transaction?: Transaction) {
  const rows = await ctx.sequelize.query<FindingForWaiver>(
    `select f.id, f.run_id, r.block_id, f.rule_id, f.severity, f.message, f.cell, f.devices, f.nets, f.fingerprint, f.measured, f."limit"
     from findings f join runs r on r.id = f.run_id
     where f.run_id = :runId and f.id = :findingId and r.team_id = :teamId`,
    { replacements: { runId, findingId, teamId }, type: QueryTypes.SELECT, transaction },
  );
  if (!rows[0]) throw notFound('Finding');
  return rows[0];
}

/** A PostgreSQL array literal of texts, for a `cast(:x as text[])` replacement. */
function pgTextArray(items: readonly string[]): string {
  return `{${items.map((x) => `"${x.replace(/["\\]/g, (c) => `\\${c}`)}"`).join(',')}}`;
}

function invalid(path: string, message: string): HttpError {
  return new HttpError(400, 'validation', 'The request is not valid.', [{ path, message }]);
}

/** The bound's sense follows the rule: a finding measured above its limit fails by being too big. */
export function boundFor(f: { measured: Quantity | null; limit: Quantity | null }, value: number): WaiverBound {
  if (!f.measured) throw invalid('body.boundValue', 'this finding has no measured value to bound');
  if (!f.limit || f.limit.unit !== f.measured.unit || f.limit.value === f.measured.value) {
    throw invalid('body.boundValue', 'the rule states no limit to tell which direction is worse; leave the bound out');
  }
  const sense = f.measured.value > f.limit.value ? 'max' : 'min';
  if (sense === 'max' ? f.measured.value > value : f.measured.value < value) {
    throw invalid('body.boundValue', `the measured value already lies beyond this bound: give ${sense === 'max' ? 'at least' : 'at most'} the measured value`);
  }
  return { value, unit: f.measured.unit, sense };
}

/**
 * Ask to waive a finding (`direct: false`, a designer) or waive it at once (`direct: true`,
 * a reviewer). A live request or waiver of the same scope on the same finding is a conflict.
 */
export async function createWaiver(ctx: Ctx, actor: WaiverActor, body: CreateWaiverBody, direct: boolean): Promise<WaiverView> {
  const now = waiverClock.now();
  const id = await ctx.sequelize.transaction(async (transaction) => {
    const f = await findingOfTeam(ctx, actor.teamId, body.runId, body.findingId, transaction);
    const expiresAt = body.expiresAt ? expiryInstant(body.expiresAt) : null;
    if (expiresAt && expiresAt.getTime() <= now.getTime()) throw invalid('body.expiresAt', 'the expiry must lie in the future');
    const bound = body.boundValue === undefined || body.boundValue === null ? null : boundFor(f, body.boundValue);
    const fingerprint = body.scope === 'rule-in-cell' ? null : f.fingerprint;

    const live = await ctx.sequelize.query<{ id: string; state: WaiverState }>(
      `select id, state from waivers
       where team_id = :teamId and rule_id = :ruleId and scope = :scope and cell = :cell
         and fingerprint is not distinct from :fingerprint and (scope <> 'finding' or block_id = :blockId)
         and (state = 'requested' or (state = 'approved' and (expires_at is null or expires_at > :now)))
       limit 1 for update`,
      { replacements: { teamId: actor.teamId, ruleId: f.rule_id, scope: body.scope, cell: f.cell, fingerprint, blockId: f.block_id, now }, type: QueryTypes.SELECT, transaction },
    );
    if (live[0]) throw conflict(live[0].state === 'requested' ? `A request to waive this is already waiting for a reviewer (waiver ${live[0].id}).` : `This is already waived (waiver ${live[0].id}).`);

    const row = await Waiver.create(
      {
        teamId: actor.teamId,
        blockId: f.block_id,
        ruleId: f.rule_id,
        cell: f.cell,
        fingerprint,
        scope: body.scope,
        justification: body.justification,
        state: direct ? 'approved' : 'requested',
        requestedBy: actor.id,
        decidedBy: direct ? actor.id : null,
        decisionComment: null,
        decidedAt: direct ? now : null,
        expiresAt,
        bound,
        sourceRunId: f.run_id,
        sourceFindingId: Number(f.id),
        severity: f.severity,
        message: f.message,
        devices: f.devices,
        nets: f.nets,
        measured: f.measured,
      },
      { transaction },
    );
    await recordAudit(
      {
        teamId: actor.teamId,
        actorId: actor.id,
        action: direct ? 'waiver.grant' : 'waiver.request',
        subjectType: 'waiver',
        subjectId: row.id,
        detail: { scope: body.scope, ruleId: f.rule_id, cell: f.cell, fingerprint, runId: f.run_id, findingId: Number(f.id), expiresAt: iso(expiresAt), bound },
      },
      transaction,
    );
    if (!direct) await mailReviewers(ctx, await waiverRow(ctx, actor.teamId, row.id, transaction), transaction);
    return row.id;
  });
  return waiverView(await waiverRow(ctx, actor.teamId, id), now);
}

/** The request goes to every active reviewer of the team. */
async function mailReviewers(ctx: Ctx, w: WaiverRow, transaction: Transaction) {
  const reviewers = await ctx.sequelize.query<{ name: string; email: string }>(
    `select name, email from users where team_id = :teamId and 'reviewer' = any(roles) and not disabled and password_hash is not null order by email`,
    { replacements: { teamId: w.team_id }, type: QueryTypes.SELECT, transaction },
  );
  for (const r of reviewers) {
    const mail = waiverRequestedMail({
      ...mailSubject(ctx, w),
      name: r.name,
      requester: w.requester_name ?? 'A designer',
      expiresOn: w.expires_at ? new Date(w.expires_at.getTime() - 1).toISOString().slice(0, 10) : null,
    });
    await ctx.outbox.enqueue({ ...mail, to: r.email, teamId: w.team_id }, transaction);
  }
}

async function mailRequester(ctx: Ctx, w: WaiverRow, make: (name: string) => { subject: string; text: string; html: string }, transaction: Transaction) {
  if (!w.requester_email || w.requested_by === w.decided_by && w.state !== 'revoked') return;
  const rows = await ctx.sequelize.query<{ disabled: boolean }>(`select disabled from users where id = :id`, { replacements: { id: w.requested_by }, type: QueryTypes.SELECT, transaction });
  if (!rows[0] || rows[0].disabled) return;
  await ctx.outbox.enqueue({ ...make(w.requester_name ?? ''), to: w.requester_email, teamId: w.team_id }, transaction);
}

/** Lock a waiver of the team for a change; `allowed` are the states it may be changed from. */
async function lockWaiver(ctx: Ctx, teamId: string, id: string, allowed: WaiverState[], transaction: Transaction): Promise<WaiverRow> {
  const rows = await ctx.sequelize.query<{ state: WaiverState }>(`select state from waivers where id = :id and team_id = :teamId for update`, {
    replacements: { id, teamId },
    type: QueryTypes.SELECT,
    transaction,
  });
  if (!rows[0]) throw notFound('Waiver');
  if (!allowed.includes(rows[0].state)) throw conflict(`The waiver is ${rows[0].state}; it cannot be changed that way.`);
  return waiverRow(ctx, teamId, id, transaction);
}

export async function decideWaiver(ctx: Ctx, actor: WaiverActor, id: string, decision: 'approved' | 'rejected', comment: string): Promise<WaiverView> {
  const now = waiverClock.now();
  await ctx.sequelize.transaction(async (transaction) => {
    const w = await lockWaiver(ctx, actor.teamId, id, ['requested'], transaction);
    if (decision === 'approved' && w.expires_at && new Date(w.expires_at).getTime() <= now.getTime()) {
      throw conflict('The requested expiry has already passed; ask the designer for a new request.');
    }
    await ctx.sequelize.query(
      `update waivers set state = :decision, decided_by = :actorId, decided_at = :now, decision_comment = :comment, updated_at = :now where id = :id`,
      { replacements: { id, decision, actorId: actor.id, now, comment: comment || null }, transaction },
    );
    await recordAudit(
      { teamId: actor.teamId, actorId: actor.id, action: decision === 'approved' ? 'waiver.approve' : 'waiver.reject', subjectType: 'waiver', subjectId: id, detail: { comment } },
      transaction,
    );
    const decided = await waiverRow(ctx, actor.teamId, id, transaction);
    await mailRequester(
      ctx,
      decided,
      (name) => waiverDecidedMail({ ...mailSubject(ctx, decided), name, decider: decided.decider_name ?? 'A reviewer', decision, comment }),
      transaction,
    );
  });
  return waiverView(await waiverRow(ctx, actor.teamId, id), now);
}

/** The row stays, as revoked, with who ended it, when and why. */
async function markRevoked(ctx: Ctx, actor: WaiverActor, id: string, reason: string, now: Date, transaction: Transaction) {
  await ctx.sequelize.query(
    `update waivers set state = 'revoked', revoked_by = :actorId, revoked_at = :now, revoke_reason = :reason, updated_at = :now where id = :id`,
    { replacements: { id, actorId: actor.id, now, reason }, transaction },
  );
}

/**
 * End an approved waiver, or cancel a pending request as someone who cannot decide it (an admin); the row stays, with
 * who revoked it, when and why. Whoever can decide a pending request rejects it instead, so that the designer reads a
 * decision and its reason, not a revocation.
 */
export async function revokeWaiver(ctx: Ctx, actor: WaiverActor & { mayDecide: boolean }, id: string, reason: string): Promise<WaiverView> {
  const now = waiverClock.now();
  await ctx.sequelize.transaction(async (transaction) => {
    const w = await lockWaiver(ctx, actor.teamId, id, ['requested', 'approved'], transaction);
    if (w.state === 'requested' && actor.mayDecide) throw conflict('The request is still pending: reject it, with a reason for the designer, instead of revoking it.');
    await markRevoked(ctx, actor, id, reason, now, transaction);
    await recordAudit({ teamId: actor.teamId, actorId: actor.id, action: 'waiver.revoke', subjectType: 'waiver', subjectId: id, detail: { reason, was: w.state } }, transaction);
    const revoked = await waiverRow(ctx, actor.teamId, id, transaction);
    if (revoked.requested_by !== actor.id) {
      await mailRequester(ctx, revoked, (name) => waiverRevokedMail({ ...mailSubject(ctx, revoked), name, revoker: revoked.revoker_name ?? 'A reviewer', reason }), transaction);
    }
  });
  return waiverView(await waiverRow(ctx, actor.teamId, id), now);
}

/**
 * A designer withdraws their own request while it waits for a reviewer; the row stays, as revoked, with the reason.
 * Nobody is mailed: the requester did it, and a reviewer's queue simply no longer shows it.
 */
export async function withdrawWaiverRequest(ctx: Ctx, actor: WaiverActor, id: string, reason: string): Promise<WaiverView> {
  const now = waiverClock.now();
  await ctx.sequelize.transaction(async (transaction) => {
    const w = await lockWaiver(ctx, actor.teamId, id, ['requested'], transaction);
    if (w.requested_by !== actor.id) throw forbidden('Only the designer who asked for this waiver can withdraw the request.');
    await markRevoked(ctx, actor, id, reason, now, transaction);
    await recordAudit({ teamId: actor.teamId, actorId: actor.id, action: 'waiver.withdraw', subjectType: 'waiver', subjectId: id, detail: { reason } }, transaction);
  });
  return waiverView(await waiverRow(ctx, actor.teamId, id), now);
}

export interface WaiverListQuery {
  page: number;
  pageSize: number;
  standing?: WaiverStanding[];
  blockId?: string;
  ruleId?: string;
  cell?: string;
  mine: boolean;
}

export async function listWaivers(ctx: Pick<AppContext, 'sequelize'>, teamId: string, actorId: string, query: WaiverListQuery) {
  const now = waiverClock.now();
  const where = ['w.team_id = :teamId'];
  const replacements: Record<string, unknown> = { teamId, now, limit: query.pageSize, offset: (query.page - 1) * query.pageSize };
  if (query.standing?.length) {
    where.push(`${STANDING_SQL} in (:standing)`);
    replacements.standing = query.standing;
  }
  if (query.blockId) {
    where.push('w.block_id = :blockId');
    replacements.blockId = query.blockId;
  }
  if (query.ruleId) {
    where.push('w.rule_id = :ruleId');
    replacements.ruleId = query.ruleId;
  }
  if (query.cell) {
    where.push('w.cell = :cell');
    replacements.cell = query.cell;
  }
  if (query.mine) {
    where.push('w.requested_by = :actorId');
    replacements.actorId = actorId;
  }
  const clause = where.join(' and ');
  const [rows, [{ total }]] = await Promise.all([
    ctx.sequelize.query<WaiverRow>(
      `${WAIVER_SELECT} where ${clause}
       order by case w.state when 'requested' then 0 else 1 end, coalesce(w.decided_at, w.created_at) desc, w.id limit :limit offset :offset`,
      { replacements, type: QueryTypes.SELECT },
    ),
    ctx.sequelize.query<{ total: number }>(`select cast(count(*) as integer) as total from waivers w where ${clause}`, { replacements, type: QueryTypes.SELECT }),
  ]);
  return { items: rows.map((r) => waiverView(r, now)), total, page: query.page, pageSize: query.pageSize };
}

/** One waiver with every audit event about it, oldest first. */
export async function getWaiver(ctx: Pick<AppContext, 'sequelize'>, teamId: string, id: string): Promise<WaiverDetail> {
  const row = await waiverRow(ctx, teamId, id);
  const events = await ctx.sequelize.query<{ action: string; actor_id: string | null; name: string | null; email: string | null; created_at: Date; detail: Record<string, unknown> }>(
    `select e.action, e.actor_id, u.name, u.email, e.created_at, e.detail from audit_events e left join users u on u.id = e.actor_id
     where e.team_id = :teamId and e.subject_type = 'waiver' and e.subject_id = :id order by e.created_at, e.id`,
    { replacements: { teamId, id }, type: QueryTypes.SELECT },
  );
  return {
    ...waiverView(row, waiverClock.now()),
    history: events.map((e) => ({ action: e.action, actor: person(e.actor_id, e.name, e.email), at: iso(e.created_at)!, detail: e.detail })),
  };
}

/** Waivers of the team by id, in the order given (unknown ids left out). */
export async function waiversByIds(ctx: Pick<AppContext, 'sequelize'>, teamId: string, ids: readonly string[]): Promise<WaiverView[]> {
  if (ids.length === 0) return [];
  const rows = await ctx.sequelize.query<WaiverRow>(`${WAIVER_SELECT} where w.team_id = :teamId and w.id in (:ids)`, {
    replacements: { teamId, ids },
    type: QueryTypes.SELECT,
  });
  const now = waiverClock.now();
  const byId = new Map(rows.map((r) => [r.id, waiverView(r, now)]));
  return ids.flatMap((id) => byId.get(id) ?? []);
}

/** Every waiver or request that concerns one finding: on its fingerprint, or on its rule in its cell. */
export async function waiversOfFinding(ctx: Pick<AppContext, 'sequelize'>, teamId: string, runId: string, findingId: number) {
  const f = await findingOfTeam(ctx, teamId, runId, findingId);
  const rows = await ctx.sequelize.query<WaiverRow>(
    `${WAIVER_SELECT} where w.team_id = :teamId and w.rule_id = :ruleId and lower(w.cell) = lower(:cell)
       and (w.fingerprint = :fingerprint or w.scope = 'rule-in-cell' or w.devices && cast(:devices as text[]) or w.nets && cast(:nets as text[]))
       and (w.scope <> 'finding' or w.block_id = :blockId)
     order by w.created_at desc`,
    {
      replacements: { teamId, ruleId: f.rule_id, cell: f.cell, fingerprint: f.fingerprint, blockId: f.block_id, devices: pgTextArray(f.devices), nets: pgTextArray(f.nets) },
      type: QueryTypes.SELECT,
    },
  );
  const now = waiverClock.now();
  return { items: rows.map((r) => waiverView(r, now)) };
}

/**
 * Warn the requester and the approver of every approved waiver that expires within
 * EXPIRY_WARNING_DAYS. Each waiver is claimed by setting `expiry_warned_at` in the
 * transaction that writes its mail, so however many processes sweep, one warning is sent.
 */
export async function sweepExpiringWaivers(ctx: Ctx, now: Date = waiverClock.now()): Promise<number> {
  return ctx.sequelize.transaction(async (transaction) => {
    const claimed = await ctx.sequelize.query<{ id: string; team_id: string }>(
      `update waivers set expiry_warned_at = :now
       where state = 'approved' and expires_at is not null and expiry_warned_at is null
         and expires_at > :now and expires_at <= cast(:now as timestamptz) + make_interval(days => :days)
       returning id, team_id`,
      { replacements: { now, days: EXPIRY_WARNING_DAYS }, type: QueryTypes.SELECT, transaction },
    );
    for (const { id, team_id } of claimed) {
      const w = await waiverRow(ctx, team_id, id, transaction);
      const expiresOn = new Date(new Date(w.expires_at!).getTime() - 1).toISOString().slice(0, 10);
      const people = new Map<string, string>();
      for (const [userId, email, name] of [
        [w.requested_by, w.requester_email, w.requester_name],
        [w.decided_by, w.decider_email, w.decider_name],
      ] as const) {
        if (userId && email) people.set(email, name ?? '');
      }
      for (const [email, name] of people) {
        await ctx.outbox.enqueue({ ...waiverExpiringMail({ ...mailSubject(ctx, w), name, expiresOn }), to: email, teamId: team_id }, transaction);
      }
      await recordAudit({ teamId: team_id, actorId: null, action: 'waiver.expiry-warning', subjectType: 'waiver', subjectId: id, detail: { expiresAt: iso(w.expires_at), to: [...people.keys()] } }, transaction);
    }
    return claimed.length;
  });
}
