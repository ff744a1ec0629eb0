// The rule catalogue: every rule Keepwell knows, with what a methodology owner needs
// to tune it: its rationale and fix, default severity, and its parameters as JSON
// Schema (zod 4's z.toJSONSchema keeps each field's `unit` and `label` from `.meta`).

import { z } from 'zod';
import type { RuleCatalogueEntry } from '../../shared/api/decks';
import { ruleRegistry } from '../../rules/registry';

let cached: RuleCatalogueEntry[] | undefined;

export function ruleCatalogue(): RuleCatalogueEntry[] {
  cached ??= ruleRegistry.map((rule) => ({
    id: rule.meta.id,
    title: rule.meta.title,
    area: rule.meta.area,
    rationale: rule.meta.rationale,
    fix: rule.meta.fix,
    defaultSeverity: rule.meta.defaultSeverity,
    // `input`: a deck may leave out any parameter that has a default.
    params: z.toJSONSchema(rule.params, { io: 'input' }) as Record<string, unknown>,
  }));
  return cached;
}
