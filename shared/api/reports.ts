// The review report of one run: what the team signs off on before tape-in review.
// The deck version and its publish note, counts by severity and status, every open
// error, every finding whose waiver lapsed (and why), and every waiver that concerns
// the run's findings, with justification, requester, approver and dates. The same
// content is served as JSON (the printable page), PDF, CSV of the findings and SARIF.

import { z } from 'zod';
import { storedFindingSchema } from './runs';
import { FINDING_STATUSES, findingCountsSchema, waiverSchema, type FindingCounts } from './waivers';

const personSchema = z.object({ id: z.string().uuid(), name: z.string(), email: z.string() });

export { statusCountsSchema, type StatusCounts } from './waivers';
export const reportCountsSchema = findingCountsSchema;
export type ReportCounts = FindingCounts;

export const reportWaiverSchema = waiverSchema.extend({
  /** Findings of this run whose status this waiver decides, and what it makes of them. */
  findings: z.number().int(),
  statusInRun: z.enum(FINDING_STATUSES),
});
export type ReportWaiver = z.infer<typeof reportWaiverSchema>;

export const reviewReportSchema = z.object({
  run: z.object({
    id: z.string().uuid(),
    block: z.object({ id: z.string().uuid(), name: z.string() }),
    state: z.string(),
    note: z.string(),
    submitter: personSchema.nullable(),
    createdAt: z.string(),
    finishedAt: z.string().nullable(),
    files: z.array(z.object({ path: z.string(), sha256: z.string() })),
  }),
  deck: z.object({
    name: z.string(),
    version: z.number().int(),
    versionId: z.string().uuid(),
    state: z.string(),
    /** What the methodology owner wrote when publishing this version. */
    publishNote: z.string(),
    publishedAt: z.string().nullable(),
    publishedBy: personSchema.nullable(),
  }),
  counts: reportCountsSchema,
  /** Every open error (status `open`), in location order; `openErrorsTotal` says how many there are in all. */
  openErrors: z.array(storedFindingSchema),
  openErrorsTotal: z.number().int(),
  /** Findings whose waiver lapsed, with the reason in `waiver.reason`. */
  lapsed: z.array(storedFindingSchema),
  lapsedTotal: z.number().int(),
  waivers: z.array(reportWaiverSchema),
  generatedAt: z.string(),
  caution: z.string(),
});
export type ReviewReport = z.infer<typeof reviewReportSchema>;

/** How many open errors and lapsed findings the report lists in full (the CSV and SARIF carry every finding). */
export const REPORT_LIST_LIMIT = 2000;
