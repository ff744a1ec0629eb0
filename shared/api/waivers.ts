// Waivers: a designer asks to accept a finding with a justification, a reviewer
// approves or rejects it (or waives directly), and approved waivers cover matching
// findings of later runs until they expire, are revoked, or lapse because the
// circuit or its measured value changed. Nothing is deleted; every change is audited.

import { z } from 'zod';
import { severitySchema } from '../deck';
import { quantitySchema } from '../findings';
import { paged, pageQuerySchema } from './common';

/**
 * What a waiver covers, narrowest first:
 * - `finding`: this finding (its fingerprint) in this block;
 * - `cell`: the same finding (fingerprint) wherever the cell is used, in every block of the team;
 * - `rule-in-cell`: every finding of the rule in the cell, in every block of the team, whatever its devices.
 */
export const WAIVER_SCOPES = ['finding', 'cell', 'rule-in-cell'] as const;
export const waiverScopeSchema = z.enum(WAIVER_SCOPES);
export type WaiverScope = z.infer<typeof waiverScopeSchema>;

export const WAIVER_SCOPE_LABELS: Record<WaiverScope, { label: string; description: string }> = {
  finding: { label: 'This finding', description: 'This finding in this block, while its cell keeps the same devices and nets.' },
  cell: {
    label: 'Every instance of the cell',
    description: 'The same finding wherever this cell is used, in every block of the team, while the cell keeps the same devices and nets.',
  },
  'rule-in-cell': {
    label: 'This rule in this cell',
    description: 'Every finding of this rule in this cell, in every block of the team, even when the cell’s devices change.',
  },
};

export const WAIVER_STATES = ['requested', 'approved', 'rejected', 'revoked'] as const;
export const waiverStateSchema = z.enum(WAIVER_STATES);
export type WaiverState = z.infer<typeof waiverStateSchema>;

/** A waiver's standing now: its state, with an approved waiver past its expiry shown as `expired`. */
export const WAIVER_STANDINGS = ['pending', 'active', 'expired', 'rejected', 'revoked'] as const;
export const waiverStandingSchema = z.enum(WAIVER_STANDINGS);
export type WaiverStanding = z.infer<typeof waiverStandingSchema>;

/**
 * The lapse condition: the waiver stops covering a finding whose measured value is worse than `value`.
 * `sense` follows the rule: `max` when a bigger value is worse (a charge-sharing drop), `min` when a
 * smaller one is (a gain, a margin). Stored with the waiver, in the finding's unit (SI).
 */
export const waiverBoundSchema = z.object({
  value: z.number(),
  unit: z.string(),
  sense: z.enum(['max', 'min']),
});
export type WaiverBound = z.infer<typeof waiverBoundSchema>;

/** Why a waiver that matches a finding no longer covers it. */
export const LAPSE_REASONS = ['expired', 'bound', 'changed'] as const;
export const lapseReasonSchema = z.enum(LAPSE_REASONS);
export type LapseReason = z.infer<typeof lapseReasonSchema>;

/** A stored finding's status, decided by server/services/waivers-status.ts: `waiver-lapsed` when a waiver matched but expired, was exceeded or its circuit changed. */
export const FINDING_STATUSES = ['open', 'waived', 'waiver-requested', 'waiver-lapsed'] as const;

/** Findings by status, in all and per severity. */
export const statusCountsSchema = z.object(Object.fromEntries(FINDING_STATUSES.map((s) => [s, z.number().int()])) as Record<(typeof FINDING_STATUSES)[number], z.ZodNumber>);
export type StatusCounts = z.infer<typeof statusCountsSchema>;
export const findingCountsSchema = z.object({
  bySeverity: z.object({ error: statusCountsSchema, warning: statusCountsSchema, info: statusCountsSchema }),
  total: statusCountsSchema,
});
export type FindingCounts = z.infer<typeof findingCountsSchema>;

/** The waiver that decides a listed finding's status, as the findings list carries it. */
export const findingWaiverSchema = z.object({
  id: z.string().uuid(),
  state: waiverStateSchema,
  scope: waiverScopeSchema,
  /** Set when the finding's status is `waiver-lapsed`. */
  lapse: lapseReasonSchema.nullable(),
  /** The lapse in words ("expired on 2027-03-01", "measured 412 mV is worse than the bound 350 mV"). */
  reason: z.string().nullable(),
  expiresAt: z.string().nullable(),
});
export type FindingWaiver = z.infer<typeof findingWaiverSchema>;

const personSchema = z.object({ id: z.string().uuid(), name: z.string(), email: z.string() });

/** `YYYY-MM-DD` (the waiver holds through that day, UTC) or an ISO date-time with offset. */
export const expirySchema = z.union([z.iso.date(), z.iso.datetime({ offset: true })]);

export const createWaiverBodySchema = z.object({
  runId: z.string().uuid(),
  findingId: z.number().int().min(1),
  scope: waiverScopeSchema,
  justification: z.string().trim().min(10, 'say why the finding is acceptable, in a sentence a reviewer can check').max(4000),
  expiresAt: expirySchema.nullable().optional(),
  /** The lapse bound in the finding's measured unit; its sense is taken from the finding (measured against limit). */
  boundValue: z.number().finite().nullable().optional(),
});
export type CreateWaiverBody = z.infer<typeof createWaiverBodySchema>;

export const decideWaiverBodySchema = z.object({ comment: z.string().trim().max(4000).default('') });
export const rejectWaiverBodySchema = z.object({ comment: z.string().trim().min(1, 'say why the request is rejected').max(4000) });
export const revokeWaiverBodySchema = z.object({ reason: z.string().trim().min(1, 'say why the waiver no longer applies').max(4000) });

const commaSplit = z
  .string()
  .optional()
  .transform((v) => (v ? v.split(',').map((s) => s.trim()).filter(Boolean) : undefined));

export const waiverListQuerySchema = pageQuerySchema.extend({
  standing: commaSplit.pipe(z.array(waiverStandingSchema).optional()),
  blockId: z.string().uuid().optional(),
  ruleId: z.string().max(100).optional(),
  cell: z.string().max(200).optional(),
  /** Only the caller's own requests. */
  mine: z.enum(['true', 'false']).optional().transform((v) => v === 'true'),
});

export const waiverSchema = z.object({
  id: z.string().uuid(),
  scope: waiverScopeSchema,
  state: waiverStateSchema,
  standing: waiverStandingSchema,
  ruleId: z.string(),
  cell: z.string().nullable(),
  fingerprint: z.string().nullable(),
  /** The block the waiver was asked in; `finding` waivers cover only its runs. */
  block: z.object({ id: z.string().uuid(), name: z.string() }).nullable(),
  severity: severitySchema.nullable(),
  message: z.string(),
  devices: z.array(z.string()),
  nets: z.array(z.string()),
  measured: quantitySchema.nullable(),
  bound: waiverBoundSchema.nullable(),
  justification: z.string(),
  requester: personSchema.nullable(),
  decider: personSchema.nullable(),
  decisionComment: z.string().nullable(),
  decidedAt: z.string().nullable(),
  expiresAt: z.string().nullable(),
  revoker: personSchema.nullable(),
  revokedAt: z.string().nullable(),
  revokeReason: z.string().nullable(),
  source: z.object({ runId: z.string().uuid(), findingId: z.number().int().nullable() }).nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type WaiverView = z.infer<typeof waiverSchema>;

export const waiverEventSchema = z.object({
  action: z.string(),
  actor: personSchema.nullable(),
  at: z.string(),
  detail: z.record(z.string(), z.unknown()),
});
export type WaiverEvent = z.infer<typeof waiverEventSchema>;

export const waiverDetailSchema = waiverSchema.extend({ history: z.array(waiverEventSchema) });
export type WaiverDetail = z.infer<typeof waiverDetailSchema>;

export const waiverPageSchema = paged(waiverSchema);

/** Waivers that concern one finding of a run: every request or waiver on its fingerprint or its rule in its cell. */
export const findingWaiversSchema = z.object({ items: z.array(waiverSchema) });
