// Findings as a SARIF 2.1.0 log (OASIS Static Analysis Results Interchange Format),
// for code-review hosts and CI: one run, the rules it used with their rationale and
// fix, one result per finding with its netlist location, the Keepwell fingerprint as
// a partial fingerprint, and waivers as external suppressions. Used by
// `keepwell check --format sarif` and by the API's SARIF of a run. Pure: no I/O.

import type { Severity } from '../shared/deck';
import { REVIEW_CAUTION, type Finding } from '../shared/findings';
import { ruleRegistry } from './registry';
import type { RuleMeta } from './types';

/** Where the OASIS SARIF TC keeps the 2.1.0 schema (a copy is tests/fixtures/sarif-schema-2.1.0.json). */
export const SARIF_SCHEMA_URI = 'https://raw.githubusercontent.com/oasis-tcs/sarif-spec/master/Schemata/sarif-schema-2.1.0.json';
/** The base every result's relative `artifactLocation.uri` is resolved against. */
export const SARIF_ROOT_ID = 'NETLISTROOT';
/** The name under which the Keepwell fingerprint travels in `partialFingerprints` (versioned, as SARIF §3.27.17 recommends). */
export const SARIF_FINGERPRINT_KEY = 'keepwellFindingFingerprint/v1';

export type SarifLevel = 'error' | 'warning' | 'note';

const LEVELS: Record<Severity, SarifLevel> = { error: 'error', warning: 'warning', info: 'note' };

export interface SarifMessage {
  text: string;
}

export interface SarifRule {
  id: string;
  name: string;
  shortDescription: SarifMessage;
  fullDescription: SarifMessage;
  help: SarifMessage;
  defaultConfiguration: { level: SarifLevel };
  properties: { area: string };
}

export interface SarifSuppression {
  kind: 'external';
  status: 'accepted' | 'underReview';
  justification: string;
  guid?: string;
  properties?: Record<string, unknown>;
}

export interface SarifResult {
  ruleId: string;
  ruleIndex: number;
  level: SarifLevel;
  message: SarifMessage;
  locations: {
    physicalLocation: { artifactLocation: { uri: string; uriBaseId?: string }; region: { startLine: number; startColumn: number } };
    logicalLocations: { name: string; kind: string }[];
  }[];
  partialFingerprints: Record<string, string>;
  suppressions?: SarifSuppression[];
  properties: Record<string, unknown>;
}

export interface SarifLog {
  $schema: string;
  version: '2.1.0';
  runs: {
    tool: { driver: { name: string; version: string; rules: SarifRule[] } };
    originalUriBaseIds: Record<string, { uri?: string; description: SarifMessage }>;
    columnKind: 'utf16CodeUnits';
    invocations: { executionSuccessful: boolean }[];
    results: SarifResult[];
    properties: Record<string, unknown>;
  }[];
}

/** A waiver that covers (`accepted`) or is asked for (`underReview`) on a finding. */
export interface SarifWaiver {
  id: string;
  status: 'accepted' | 'underReview';
  justification: string;
  scope: string;
  requestedBy?: string | null;
  approvedBy?: string | null;
  expiresAt?: string | null;
}

export interface SarifInput {
  toolVersion: string;
  deck: { name: string; version: string | null };
  findings: readonly (Finding & { waiver?: SarifWaiver | null })[];
  /** Rules to describe besides those with results (the deck's enabled rules). */
  ruleIds?: readonly string[];
  /** The absolute `file:` URI of the folder result paths are relative to, when known (the command line). */
  rootUri?: string;
  rootDescription: string;
  /** False when the netlists could not all be read. */
  executionSuccessful?: boolean;
}

/** `dynamic.no-keeper` → `DynamicNoKeeper`: SARIF's rule `name` is an identifier-like word. */
export function sarifRuleName(id: string): string {
  return id
    .split(/[^A-Za-z0-9]+/)
    .filter(Boolean)
    .map((w) => w[0].toUpperCase() + w.slice(1))
    .join('');
}

/** A relative path as a URI reference: forward slashes, each segment percent-encoded (RFC 3986 §4.2). */
export function relativeUri(path: string): string {
  return path
    .replace(/\\/g, '/')
    .split('/')
    .map((segment) => encodeURIComponent(segment))
    .join('/');
}

function describe(meta: RuleMeta): SarifRule {
  return {
    id: meta.id,
    name: sarifRuleName(meta.id),
    shortDescription: { text: meta.title },
    fullDescription: { text: meta.rationale },
    help: { text: meta.fix },
    defaultConfiguration: { level: LEVELS[meta.defaultSeverity] },
    properties: { area: meta.area },
  };
}

export function buildSarif(input: SarifInput): SarifLog {
  const wanted = new Set([...(input.ruleIds ?? []), ...input.findings.map((f) => f.ruleId)]);
  const rules: SarifRule[] = [];
  const index = new Map<string, number>();
  for (const r of ruleRegistry) {
    if (!wanted.has(r.meta.id)) continue;
    index.set(r.meta.id, rules.length);
    rules.push(describe(r.meta));
  }
  // A finding of a rule this build no longer knows still needs a descriptor to point at.
  for (const id of wanted) {
    if (index.has(id)) continue;
    index.set(id, rules.length);
    rules.push({
      id,
      name: sarifRuleName(id),
      shortDescription: { text: id },
      fullDescription: { text: `Rule ${id}, not known to this Keepwell version.` },
      help: { text: 'See the rule deck the run used.' },
      defaultConfiguration: { level: 'warning' },
      properties: { area: id.split('.')[0] },
    });
  }

  const absolute = (p: string) => /^([A-Za-z]:)?[\\/]/.test(p);
  const results: SarifResult[] = input.findings.map((f) => {
    const artifactLocation = absolute(f.file)
      ? { uri: `file://${relativeUri(f.file.startsWith('/') ? f.file : `/${f.file}`)}` }
      : { uri: relativeUri(f.file), uriBaseId: SARIF_ROOT_ID };
    const result: SarifResult = {
      ruleId: f.ruleId,
      ruleIndex: index.get(f.ruleId)!,
      level: LEVELS[f.severity],
      message: { text: f.message },
      locations: [
        {
          physicalLocation: { artifactLocation, region: { startLine: Math.max(1, f.line), startColumn: Math.max(1, f.column) } },
          logicalLocations: [{ name: f.cell, kind: 'module' }],
        },
      ],
      partialFingerprints: { [SARIF_FINGERPRINT_KEY]: f.fingerprint },
      properties: {
        cell: f.cell,
        instances: f.instances,
        nets: f.nets,
        devices: f.devices,
        ...(f.measured ? { measured: f.measured } : {}),
        ...(f.limit ? { limit: f.limit } : {}),
        ...(f.corner ? { corner: f.corner } : {}),
      },
    };
    if (f.waiver) {
      result.suppressions = [
        {
          kind: 'external',
          status: f.waiver.status,
          justification: f.waiver.justification,
          guid: f.waiver.id,
          properties: {
            scope: f.waiver.scope,
            ...(f.waiver.requestedBy ? { requestedBy: f.waiver.requestedBy } : {}),
            ...(f.waiver.approvedBy ? { approvedBy: f.waiver.approvedBy } : {}),
            ...(f.waiver.expiresAt ? { expiresAt: f.waiver.expiresAt } : {}),
          },
        },
      ];
    }
    return result;
  });

  return {
    $schema: SARIF_SCHEMA_URI,
    version: '2.1.0',
    runs: [
      {
        tool: { driver: { name: 'Keepwell', version: input.toolVersion, rules } },
        originalUriBaseIds: { [SARIF_ROOT_ID]: { ...(input.rootUri ? { uri: input.rootUri } : {}), description: { text: input.rootDescription } } },
        columnKind: 'utf16CodeUnits',
        invocations: [{ executionSuccessful: input.executionSuccessful ?? true }],
        results,
        properties: { deck: input.deck, caution: REVIEW_CAUTION },
      },
    ],
  };
}
