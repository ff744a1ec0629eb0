// The shape of a finding and of a check report, as the command line prints them,
// the worker stores them and the client shows them.

import { z } from 'zod';
import { severitySchema } from './deck';

export const quantitySchema = z.object({
  value: z.number(),
  /** SI unit symbol: V, V/V, s, F, A, m, ratio (dimensionless), count. */
  unit: z.string(),
});
export type Quantity = z.infer<typeof quantitySchema>;

/** A sampled transfer curve Vout(Vin) with its derived points, for the stage plot. */
export const transferPlotSchema = z.object({
  kind: z.literal('transfer'),
  vdd: z.number(),
  vin: z.array(z.number()),
  vout: z.array(z.number()),
  vm: z.number(),
  gainAtVm: z.number(),
  vil: z.number().nullable(),
  vih: z.number().nullable(),
  voh: z.number(),
  vol: z.number(),
});

/** A disturbed level passed stage by stage through a chain (the staircase between a curve and its mirror). */
export const chainPlotSchema = z.object({
  kind: z.literal('chain'),
  vdd: z.number(),
  vin: z.array(z.number()),
  vout: z.array(z.number()),
  /** Successive levels: start, after stage 1, after stage 2, … */
  levels: z.array(z.number()),
  restoredAfter: z.number().nullable(),
  tolerance: z.number(),
});

/** Budget bars: each bar a measured value against its limit (charge-sharing drop, keeper ratio, glitch). */
export const budgetPlotSchema = z.object({
  kind: z.literal('budget'),
  bars: z.array(
    z.object({
      label: z.string(),
      measured: quantitySchema,
      limit: quantitySchema,
      /** Whether exceeding (`max`) or falling below (`min`) the limit fails. */
      sense: z.enum(['max', 'min']),
    }),
  ),
});

export const findingPlotSchema = z.discriminatedUnion('kind', [transferPlotSchema, chainPlotSchema, budgetPlotSchema]);
export type FindingPlot = z.infer<typeof findingPlotSchema>;

export const findingSchema = z.object({
  ruleId: z.string(),
  severity: severitySchema,
  message: z.string(),
  file: z.string(),
  line: z.number().int(),
  column: z.number().int(),
  cell: z.string(),
  /** Names local to `cell`. */
  nets: z.array(z.string()),
  devices: z.array(z.string()),
  /** How many times `cell` occurs in the flattened design. */
  instances: z.number(),
  measured: quantitySchema.nullable(),
  limit: quantitySchema.nullable(),
  /** Stable across line moves and unrelated edits: rule, cell, sorted device and net names. */
  fingerprint: z.string(),
  /** Corner the measurement was taken at, when it depends on one. */
  corner: z.string().nullable().optional(),
  plot: findingPlotSchema.nullable().optional(),
});
export type Finding = z.infer<typeof findingSchema>;

export const checkSummarySchema = z.object({
  cells: z.number().int(),
  /** Flattened device count (can be far larger than what was analysed). */
  devices: z.number(),
  instances: z.number(),
  parseErrors: z.number().int(),
  errors: z.number().int(),
  warnings: z.number().int(),
  infos: z.number().int(),
  elapsedMs: z.number(),
});
export type CheckSummary = z.infer<typeof checkSummarySchema>;

export const checkReportSchema = z.object({
  tool: z.object({ name: z.literal('keepwell'), version: z.string() }),
  deck: z.object({ name: z.string(), version: z.string().nullable() }),
  summary: checkSummarySchema,
  findings: z.array(findingSchema),
});
export type CheckReport = z.infer<typeof checkReportSchema>;

export const REVIEW_CAUTION =
  'Keepwell findings support design review. They never replace the foundry\u2019s design rules or the team\u2019s sign-off.';
