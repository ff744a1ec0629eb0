// Check runs: uploads of netlist sets, runs queued on them, their progress, their
// findings (paged, sorted, filtered), their files for the editor view, and the
// comparison of two runs of a block.

import { z } from 'zod';
import { severitySchema } from '../deck';
import { checkSummarySchema, findingSchema } from '../findings';
import { paged, pageQuerySchema } from './common';
import { FINDING_STATUSES, findingCountsSchema, findingWaiverSchema } from './waivers';

export const RUN_STATES = ['queued', 'running', 'succeeded', 'failed', 'cancelled'] as const;
export const runStateSchema = z.enum(RUN_STATES);
export type RunState = z.infer<typeof runStateSchema>;
export const FINISHED_RUN_STATES: readonly RunState[] = ['succeeded', 'failed', 'cancelled'];

/** Netlist files the upload accepts as they are; `.lib` is the usual home of included model cards. */
export const NETLIST_EXTENSIONS = ['.sp', '.spice', '.cir', '.cdl', '.net', '.inc', '.lib'] as const;
/** Bundles of a netlist with its includes. */
export const ARCHIVE_EXTENSIONS = ['.zip', '.tar.gz', '.tgz', '.tar'] as const;

/** A problem with the input text, as the netlist reader reports it (grammar/design.ts Diagnostic). */
export const diagnosticSchema = z.object({
  severity: z.enum(['error', 'warning']),
  code: z.string(),
  message: z.string(),
  hint: z.string().optional(),
  file: z.string(),
  line: z.number().int(),
  column: z.number().int(),
});
export type RunDiagnostic = z.infer<typeof diagnosticSchema>;

// ---------------------------------------------------------------- uploads

export const netlistFileSchema = z.object({
  path: z.string(),
  size: z.number().int(),
  /** Lower-case hex SHA-256 of the stored bytes. */
  sha256: z.string(),
});
export type NetlistFileInfo = z.infer<typeof netlistFileSchema>;

export const netlistSchema = z.object({
  id: z.string().uuid(),
  blockId: z.string().uuid(),
  /** SHA-256 over the sorted (file hash, path) list: identical sets have identical hashes. */
  contentHash: z.string(),
  fileCount: z.number().int(),
  totalBytes: z.number().int(),
  files: z.array(netlistFileSchema),
  createdAt: z.string(),
});
export type NetlistView = z.infer<typeof netlistSchema>;

export const uploadResultSchema = z.object({
  netlist: netlistSchema,
  /** True when an identical file set was already stored for this block: it is reused, nothing new is stored. */
  reused: z.boolean(),
  /** Archive members that are not netlists (by extension) and were left out. */
  ignored: z.array(z.object({ path: z.string(), reason: z.string() })),
  /** Problems found while reading the bytes (invalid UTF-8 replaced by U+FFFD). */
  diagnostics: z.array(diagnosticSchema),
});
export type UploadResult = z.infer<typeof uploadResultSchema>;

/** The text fields of a multipart upload (files go in the `files` field). */
export const uploadFieldsSchema = z.object({
  blockId: z.string().uuid(),
});

/** Text fields of `POST /api/runs` as multipart (files in `files`), or the JSON body with `netlistId`. */
export const runOptionsSchema = z.object({
  /** A published version of the team's deck (drafts are refused, so no run changes under its submitter); default: the team deck's default version. */
  deckVersionId: z.string().uuid().optional(),
  note: z.string().trim().max(2000).default(''),
  /** Subcircuit to check from; default: every cell nobody instantiates. */
  top: z
    .string()
    .trim()
    .max(200)
    .optional()
    .transform((v) => (v ? v : undefined)),
});
export const createRunFieldsSchema = runOptionsSchema.extend({ blockId: z.string().uuid() });
export const createRunBodySchema = runOptionsSchema.extend({ netlistId: z.string().uuid() });

// ---------------------------------------------------------------- runs

export const RUN_STAGES = ['queued', 'reading', 'elaborating', 'planning', 'checking', 'merging', 'writing', 'done'] as const;
export const runStageSchema = z.enum(RUN_STAGES);

export const runProgressSchema = z.object({
  stage: runStageSchema,
  /** Units done and in all for the stage (cells while checking); 0/0 when a stage has no count. */
  done: z.number(),
  total: z.number(),
  /** For a run split into parts: parts finished and in all. */
  parts: z.object({ done: z.number().int(), total: z.number().int() }).optional(),
  label: z.string(),
  updatedAt: z.string(),
});
export type RunProgress = z.infer<typeof runProgressSchema>;

const personSchema = z.object({ id: z.string().uuid(), name: z.string(), email: z.string() });

export const runSchema = z.object({
  id: z.string().uuid(),
  block: z.object({ id: z.string().uuid(), name: z.string() }),
  netlistId: z.string().uuid(),
  deck: z.object({ versionId: z.string().uuid(), name: z.string(), version: z.number().int() }),
  state: runStateSchema,
  progress: runProgressSchema.nullable(),
  /** Executions started so far (a retry after a crash counts again). */
  attempt: z.number().int(),
  /** Why the run failed (parse messages for bad input). */
  error: z.string().nullable(),
  summary: checkSummarySchema.nullable(),
  note: z.string(),
  topCell: z.string().nullable(),
  /** Child jobs the run was split into; null when it ran as one job. */
  parts: z.number().int().nullable(),
  submitter: personSchema.nullable(),
  createdAt: z.string(),
  startedAt: z.string().nullable(),
  finishedAt: z.string().nullable(),
});
export type RunView = z.infer<typeof runSchema>;

/** `a,b,c` → ['a', 'b', 'c']; absent or empty → undefined. */
const commaSplit = z
  .string()
  .optional()
  .transform((v) => (v ? v.split(',').map((s) => s.trim()).filter(Boolean) : undefined));

export const runListQuerySchema = pageQuerySchema.extend({
  blockId: z.string().uuid().optional(),
  /** One state or a comma list. */
  state: commaSplit.pipe(z.array(runStateSchema).optional()),
  /** A user id, or `me`. */
  submittedBy: z.union([z.literal('me'), z.string().uuid()]).optional(),
});
export const runPageSchema = paged(runSchema);

export const ruleBreakdownSchema = z.object({
  ruleId: z.string(),
  severity: severitySchema,
  findings: z.number().int(),
  /** Occurrences in the flattened design (sum of the findings' instance counts). */
  instances: z.number(),
});
export const cellBreakdownSchema = z.object({
  cell: z.string(),
  /** How many times the cell occurs in the flattened design. */
  cellInstances: z.number(),
  findings: z.number().int(),
  errors: z.number().int(),
  warnings: z.number().int(),
  infos: z.number().int(),
});
export const runBreakdownSchema = z.object({
  byRule: z.array(ruleBreakdownSchema),
  byCell: z.array(cellBreakdownSchema),
});
export type RunBreakdown = z.infer<typeof runBreakdownSchema>;

export const runDetailSchema = runSchema.extend({
  diagnostics: z.array(diagnosticSchema),
  breakdown: runBreakdownSchema.nullable(),
  files: z.array(netlistFileSchema),
  /** Said wherever results are read. */
  caution: z.string(),
  /** For a succeeded run: its findings by severity and waiver status, as of now. */
  statusCounts: findingCountsSchema.nullable().optional(),
});
export type RunDetail = z.infer<typeof runDetailSchema>;

export const runCreatedSchema = z.object({ run: runSchema, upload: uploadResultSchema.optional() });

// ---------------------------------------------------------------- findings

export const FINDING_SORTS = ['severity', 'rule', 'cell', 'location', 'instances'] as const;
export { FINDING_STATUSES };

export const findingsQuerySchema = pageQuerySchema.extend({
  sort: z.enum(FINDING_SORTS).default('severity'),
  order: z.enum(['asc', 'desc']).default('asc'),
  rule: commaSplit.pipe(z.array(z.string().max(100)).max(100).optional()),
  severity: commaSplit.pipe(z.array(severitySchema).max(3).optional()),
  cell: commaSplit.pipe(z.array(z.string().max(200)).max(100).optional()),
  status: z.enum(FINDING_STATUSES).optional(),
  /** Case-insensitive substring of the message, a net or a device name. */
  q: z.string().trim().max(200).optional(),
  /** Only findings anchored in this file of the run (the editor view's gutter marks). */
  file: z.string().min(1).max(1000).optional(),
});
export type FindingsQuery = z.infer<typeof findingsQuerySchema>;

/** One finding of a run by its id (a shared link to a finding the table's page does not hold). */
export const findingParamsSchema = z.object({ id: z.string().uuid(), findingId: z.coerce.number().int().min(1) });

export const storedFindingSchema = findingSchema.extend({
  id: z.number().int(),
  /** `waived` when an approved, unexpired waiver of the team covers the finding (server/services/waivers-status.ts). */
  status: z.enum(FINDING_STATUSES),
  /** The waiver behind a status other than `open`. */
  waiver: findingWaiverSchema.nullable().optional(),
});
export type StoredFinding = z.infer<typeof storedFindingSchema>;

export const findingPageSchema = paged(storedFindingSchema);

export const COMPARE_KINDS = ['new', 'fixed', 'persisting'] as const;
export const compareQuerySchema = pageQuerySchema.extend({ kind: z.enum(COMPARE_KINDS).default('new') });
export const compareParamsSchema = z.object({ id: z.string().uuid(), baseId: z.string().uuid() });
export const compareResultSchema = paged(storedFindingSchema).extend({
  head: z.string().uuid(),
  base: z.string().uuid(),
  kind: z.enum(COMPARE_KINDS),
  /** New: in the run, not in the base; fixed: in the base, not in the run; persisting: in both (matched by fingerprint). */
  counts: z.object({ new: z.number().int(), fixed: z.number().int(), persisting: z.number().int() }),
});

// ---------------------------------------------------------------- files

export const runFilesSchema = z.object({ items: z.array(netlistFileSchema) });
export const fileQuerySchema = z.object({ path: z.string().min(1).max(1000) });
export const runFileSchema = netlistFileSchema.extend({
  /** The file decoded as UTF-8; invalid bytes are U+FFFD and reported in `diagnostics`. */
  text: z.string(),
  diagnostics: z.array(diagnosticSchema),
});
