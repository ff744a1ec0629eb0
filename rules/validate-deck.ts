// Validate a deck as a whole: the shared schema, then each rule's own parameter schema.
// Errors name the offending field by its dotted path, as the import dialog and API show them.

import type { z } from 'zod';
import type { Deck } from '../shared/deck';
import { deckSchema } from '../shared/deck';
import { defaultRuleSettings } from './default-deck';
import { findRule } from './registry';

export interface DeckIssue {
  path: string;
  message: string;
}

export type DeckValidation = { ok: true; deck: Deck } | { ok: false; issues: DeckIssue[] };

function issuesOf(error: z.ZodError, prefix: (string | number)[] = []): DeckIssue[] {
  return error.issues.map((i) => ({
    path: [...prefix, ...i.path.map((p) => (typeof p === 'symbol' ? String(p) : p))].join('.'),
    message: i.message,
  }));
}

export function validateDeck(input: unknown): DeckValidation {
  const parsed = deckSchema.safeParse(input);
  if (!parsed.success) return { ok: false, issues: issuesOf(parsed.error) };
  const deck = parsed.data;
  const issues: DeckIssue[] = [];
  const rules = { ...defaultRuleSettings(), ...deck.rules };
  for (const [id, setting] of Object.entries(deck.rules)) {
    const rule = findRule(id);
    if (!rule) {
      issues.push({ path: `rules.${id}`, message: `unknown rule "${id}"` });
      continue;
    }
    const params = rule.params.safeParse(setting.params);
    if (!params.success) issues.push(...issuesOf(params.error, ['rules', id, 'params']));
    else rules[id] = { ...setting, params: params.data as Record<string, unknown> };
  }
  const names = new Set<string>();
  deck.corners.forEach((c, i) => {
    if (names.has(c.name)) issues.push({ path: `corners.${i}.name`, message: `duplicate corner "${c.name}"` });
    names.add(c.name);
  });
  if (issues.length) return { ok: false, issues };
  return { ok: true, deck: { ...deck, rules } };
}
