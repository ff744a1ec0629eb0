// Shared set-up for the recognition and rule tests: netlist text read with the real
// reader, checked with the real engine, under the built-in deck or a one-corner
// square-law deck whose device values the `.model` cards of the netlist replace
// (the same equations as ngspice level 1, for comparisons with ngspice).

import { readDesign } from '../../grammar/index';
import type { Design } from '../../grammar/design';
import { defaultDeck } from '../../rules/default-deck';
import { checkDesign } from '../../rules/engine';
import { ruleRegistry } from '../../rules/registry';
import type { RuleModule } from '../../rules/types';
import type { Deck } from '../../shared/deck';
import type { Finding } from '../../shared/findings';
import { MODEL_LINES, levelOneDeck } from '../electrical/stage-fixtures';

export { MODEL_LINES, levelOneDeck };

/** Level-1 cards as netlist lines, for netlists compared with ngspice. */
export const MODELS = MODEL_LINES.join('\n');

export function read(files: string | Record<string, string>, deck: Deck = defaultDeck(), scale?: number): Design {
  const map = typeof files === 'string' ? { 'test.sp': files } : files;
  return readDesign(map, { defaultScale: deck.scale, ...(scale ? { scale } : {}), deviceMap: deck.deviceMap, supplies: deck.supplies });
}

export interface RunOptions {
  deck?: Deck;
  /** Only these rules (default: every registered rule). */
  rules?: readonly RuleModule[];
  /** Parameter overrides by rule id. */
  params?: Record<string, Record<string, unknown>>;
  scale?: number;
}

/** Every finding of the given rules (all registered rules by default), each rule at its default severity and parameters. */
export function check(files: string | Record<string, string>, options: RunOptions = {}): Finding[] {
  const deck = options.deck ?? defaultDeck();
  const rules = options.rules ?? ruleRegistry;
  const configured: Deck = {
    ...deck,
    rules: Object.fromEntries(
      rules.map((r) => [r.meta.id, { enabled: true, severity: r.meta.defaultSeverity, params: r.params.parse(options.params?.[r.meta.id] ?? {}) as Record<string, unknown> }]),
    ),
  };
  const design = read(files, deck, options.scale);
  const errors = design.diagnostics.filter((d) => d.severity === 'error');
  if (errors.length) throw new Error(`netlist errors: ${errors.map((e) => `${e.line}: ${e.message}`).join('; ')}`);
  return checkDesign(design, configured, { rules }).findings;
}

/** Findings of one rule. */
export function findingsOf(rule: RuleModule, files: string | Record<string, string>, options: Omit<RunOptions, 'rules'> = {}): Finding[] {
  return check(files, { ...options, rules: [rule] });
}

/** 1-based line of the first line of `text` that starts with `prefix` (after leading blanks). */
export function lineOf(text: string, prefix: string): number {
  const i = text.split('\n').findIndex((l) => l.trimStart().startsWith(prefix));
  if (i < 0) throw new Error(`no line starts with ${prefix}`);
  return i + 1;
}

/** Rule ids of a list of findings, sorted. */
export function ids(findings: readonly Finding[]): string[] {
  return findings.map((f) => f.ruleId).sort();
}
