// Rule decks over the API: decks, their numbered versions (draft or published),
// edits as JSON Patch (RFC 6902, operations add, remove and replace on RFC 6901
// pointers into the version's Deck), publishing, diffs, the preview of what a
// draft would change, and the rule catalogue.

import { z } from 'zod';
import { clockRootSchema, deckSchema, deviceMapEntrySchema, severitySchema } from '../deck';
import { findingSchema } from '../findings';

export const deckParamsSchema = z.object({ deckId: z.string().uuid() });
export const deckVersionParamsSchema = z.object({ deckId: z.string().uuid(), versionId: z.string().uuid() });

export const versionStateSchema = z.enum(['draft', 'published']);
export type VersionState = z.infer<typeof versionStateSchema>;

export const personSchema = z.object({ id: z.string().uuid(), name: z.string() });

// ---- requests ---------------------------------------------------------------

/** New deck: from the built-in deck, or from an exported deck file (`content`, validated as a whole). Version 1 starts as a draft. */
export const createDeckBodySchema = z.object({
  name: z.string().trim().min(1).max(120),
  description: z.string().trim().max(4000).default(''),
  content: z.unknown().optional(),
});

/** A new draft, copied from a published version of the deck (default: the newest published one). */
export const createDraftBodySchema = z.object({ fromVersionId: z.string().uuid().optional() });

/** RFC 6901 JSON pointer into a Deck: `/rules/stage.noise-margin/params/minFraction`, `/corners/1/vdd`, `/corners/-`. */
export const jsonPointerSchema = z
  .string()
  .max(400)
  .regex(/^(\/([^~/]|~[01])*)+$/, 'a JSON pointer such as /corners/0/vdd');

/** An RFC 6901 pointer from keys: `~` → `~0`, `/` → `~1` in each, then joined with `/`. */
export function toPointer(tokens: readonly (string | number)[]): string {
  return tokens.map((t) => '/' + String(t).replace(/~/g, '~0').replace(/\//g, '~1')).join('');
}

export const patchOperationSchema = z.discriminatedUnion('op', [
  z.object({ op: z.literal('add'), path: jsonPointerSchema, value: z.unknown() }),
  z.object({ op: z.literal('replace'), path: jsonPointerSchema, value: z.unknown() }),
  z.object({ op: z.literal('remove'), path: jsonPointerSchema }),
]);
export type PatchOperation = z.infer<typeof patchOperationSchema>;

/** Edit a draft. `lockVersion` is the one the client read; a stale one is a 409 `stale-version`. */
export const patchVersionBodySchema = z.object({
  lockVersion: z.number().int().min(0),
  changes: z.array(patchOperationSchema).min(1).max(500),
});
export type PatchVersionBody = z.infer<typeof patchVersionBodySchema>;

/** Replace a draft's whole content (importing a deck file into the draft). */
export const replaceContentBodySchema = z.object({ lockVersion: z.number().int().min(0), content: z.unknown() });

export const publishBodySchema = z.object({
  lockVersion: z.number().int().min(0),
  changeNote: z.string().trim().min(1, 'say what changed and why').max(4000),
  /** Make this version the deck's default for new runs (default: yes). */
  makeDefault: z.boolean().default(true),
});

export const diffQuerySchema = z.object({ from: z.string().uuid(), to: z.string().uuid() });

/** Which netlist to preview against; default: the newest upload of the team. */
export const previewBodySchema = z.object({ netlistId: z.string().uuid().optional() });

// ---- responses --------------------------------------------------------------

export const deckVersionSummarySchema = z.object({
  id: z.string().uuid(),
  deckId: z.string().uuid(),
  version: z.number().int(),
  state: versionStateSchema,
  changeNote: z.string(),
  lockVersion: z.number().int(),
  parentVersionId: z.string().uuid().nullable(),
  /** The parent's number, for "draft of v3 started from v2". */
  parentVersion: z.number().int().nullable(),
  createdBy: personSchema.nullable(),
  createdAt: z.string(),
  updatedAt: z.string(),
  publishedBy: personSchema.nullable(),
  publishedAt: z.string().nullable(),
  /** The deck's default version for new runs. */
  isDeckDefault: z.boolean(),
});
export type DeckVersionSummary = z.infer<typeof deckVersionSummarySchema>;

export const deckVersionSchema = deckVersionSummarySchema.extend({ deckName: z.string(), content: deckSchema });
export type DeckVersion = z.infer<typeof deckVersionSchema>;

const versionRefSchema = z.object({ id: z.string().uuid(), version: z.number().int() });

export const deckSummarySchema = z.object({
  id: z.string().uuid(),
  name: z.string(),
  description: z.string(),
  /** The team's default deck: its default version is what runs use when they name none. */
  teamDefault: z.boolean(),
  defaultVersion: versionRefSchema.nullable(),
  latestPublished: versionRefSchema.nullable(),
  draft: versionRefSchema.extend({ updatedAt: z.string() }).nullable(),
  versionCount: z.number().int(),
  createdAt: z.string(),
  updatedAt: z.string(),
});
export type DeckSummary = z.infer<typeof deckSummarySchema>;

export const deckListSchema = z.object({ items: z.array(deckSummarySchema) });
export const deckDetailSchema = deckSummarySchema.extend({ versions: z.array(deckVersionSummarySchema) });
export type DeckDetail = z.infer<typeof deckDetailSchema>;

// ---- diff -------------------------------------------------------------------

const ruleBriefSchema = z.object({ ruleId: z.string(), enabled: z.boolean(), severity: severitySchema });

/** What changed from one version to another. Rules, corners, clock roots and device-map entries are matched by id, name or pattern. */
export const deckDiffSchema = z.object({
  from: versionRefSchema.extend({ deckId: z.string().uuid(), deckName: z.string() }),
  to: versionRefSchema.extend({ deckId: z.string().uuid(), deckName: z.string() }),
  rules: z.object({
    added: z.array(ruleBriefSchema),
    removed: z.array(ruleBriefSchema),
    enabled: z.array(z.object({ ruleId: z.string(), from: z.boolean(), to: z.boolean() })),
    regraded: z.array(z.object({ ruleId: z.string(), from: severitySchema, to: severitySchema })),
    params: z.array(
      z.object({ ruleId: z.string(), param: z.string(), from: z.unknown(), to: z.unknown(), unit: z.string().nullable(), label: z.string().nullable() }),
    ),
  }),
  corners: z.object({
    added: z.array(z.string()),
    removed: z.array(z.string()),
    /** `field` is dotted inside the corner: `vdd`, `nmos.vt0`. */
    changed: z.array(z.object({ corner: z.string(), field: z.string(), from: z.unknown(), to: z.unknown(), unit: z.string().nullable() })),
  }),
  clocks: z.object({
    added: z.array(clockRootSchema),
    removed: z.array(clockRootSchema),
    changed: z.array(z.object({ pattern: z.string(), field: z.enum(['phase', 'polarity']), from: z.string(), to: z.string() })),
    invertedSuffixesAdded: z.array(z.string()),
    invertedSuffixesRemoved: z.array(z.string()),
  }),
  supplies: z.object({
    powerAdded: z.array(z.string()),
    powerRemoved: z.array(z.string()),
    groundAdded: z.array(z.string()),
    groundRemoved: z.array(z.string()),
  }),
  deviceMap: z.object({
    added: z.array(deviceMapEntrySchema),
    removed: z.array(deviceMapEntrySchema),
    changed: z.array(z.object({ pattern: z.string(), from: deviceMapEntrySchema.shape.kind, to: deviceMapEntrySchema.shape.kind })),
    /** The entries both versions share come in another order (first match wins, so order matters). */
    reordered: z.boolean(),
  }),
  settings: z.array(
    z.object({
      field: z.enum(['name', 'description', 'scale', 'slowestClockPeriod', 'useNetlistModels']),
      from: z.unknown(),
      to: z.unknown(),
      unit: z.string().nullable(),
    }),
  ),
  /** Every change above as one dotted path (corners and clock roots by name or pattern), in the order listed. */
  paths: z.array(z.string()),
});
export type DeckDiff = z.infer<typeof deckDiffSchema>;

// ---- preview ----------------------------------------------------------------

const previewSideSchema = z.object({ versionId: z.string().uuid().nullable(), version: z.number().int().nullable(), label: z.string() });

/** Findings a draft would add, remove or re-grade on a netlist, compared with the version it started from (matched by fingerprint). */
export const previewSchema = z.object({
  netlist: z.object({ id: z.string().uuid(), blockId: z.string().uuid(), blockName: z.string(), createdAt: z.string(), files: z.number().int() }),
  base: previewSideSchema,
  draft: previewSideSchema,
  added: z.array(findingSchema),
  removed: z.array(findingSchema),
  /** Same fingerprint, other severity. */
  changed: z.array(z.object({ before: findingSchema, after: findingSchema })),
  counts: z.object({ base: z.number().int(), draft: z.number().int(), added: z.number().int(), removed: z.number().int(), changed: z.number().int() }),
  /** Lists are cut at this many entries each; `counts` are complete. */
  listLimit: z.number().int(),
  parseErrors: z.number().int(),
  elapsedMs: z.number(),
});
export type DeckPreview = z.infer<typeof previewSchema>;

// ---- rule catalogue ---------------------------------------------------------

export const ruleAreaSchema = z.enum(['dynamic', 'stage', 'chain', 'net', 'device']);

export const ruleCatalogueEntrySchema = z.object({
  id: z.string(),
  title: z.string(),
  area: ruleAreaSchema,
  rationale: z.string(),
  fix: z.string(),
  defaultSeverity: severitySchema,
  /** The rule's parameters as JSON Schema (draft 2020-12), each property with its `unit`, `label`, `default` and range. */
  params: z.record(z.string(), z.unknown()),
});
export const ruleCatalogueSchema = z.object({ items: z.array(ruleCatalogueEntrySchema) });
export type RuleCatalogueEntry = z.infer<typeof ruleCatalogueEntrySchema>;
