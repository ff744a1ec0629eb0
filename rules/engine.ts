// Runs a deck's enabled rules over a design, hierarchically.
//
// Cells are visited parents first. Each cell is analysed once per distinct port
// context (which of its ports its parents tie to a rail, and which clock phase or
// domino timing its parents feed each port), never once per instance, so a design of
// billions of flattened devices costs what its distinct cells cost.

import type { Cell, Design, RailKind } from '../grammar/design';
import { flattenedTotals, instanceCounts, occurringOrder } from '../grammar/design';
import type { Deck } from '../shared/deck';
import type { Finding, CheckSummary } from '../shared/findings';
import { fingerprint } from './fingerprint';
import { ruleRegistry } from './registry';
import type { CellContext, PortSignal, RawFinding, RuleModule } from './types';
import { adoptChildStages, cellIndex, localRails, localRailsOf, makeContext } from './recognition/context';
import { primeClockHint, timingOf, timingSignature } from './recognition/timing';

export { localRails };

export interface CheckProgress {
  /** Cells done so far and in all. */
  done: number;
  total: number;
}

export interface CheckOptions {
  /** Only these cell keys (a worker's share of a split run); all reachable cells when absent. */
  cells?: readonly string[];
  onProgress?: (progress: CheckProgress) => void;
  /** Rules to run instead of the registry (tests). */
  rules?: readonly RuleModule[];
}

export interface CheckResult {
  findings: Finding[];
  summary: Omit<CheckSummary, 'elapsedMs' | 'parseErrors'>;
}

interface PortContext {
  rails: (RailKind | undefined)[];
  /** Timing of each port, as traced in the parent. */
  signals: (PortSignal | undefined)[];
  count: number;
}

export function checkDesign(design: Design, deck: Deck, options: CheckOptions = {}): CheckResult {
  const rules = (options.rules ?? ruleRegistry).filter((r) => deck.rules[r.meta.id]?.enabled ?? false);
  const settings = rules.map((r) => {
    const s = deck.rules[r.meta.id];
    return { rule: r, severity: s.severity, params: r.params.parse(s.params ?? {}) };
  });

  const counts = instanceCounts(design);
  const order = occurringOrder(design, counts);
  const wanted = options.cells ? new Set(options.cells) : null;

  // Port contexts flow from parents to children; every cell's parents come before it in `order`.
  const contexts = new Map<string, Map<string, PortContext>>();
  for (const root of design.roots) addContext(contexts, root, [], [], 1);

  const findings: Finding[] = [];
  const seen = new Map<string, Finding>();
  let done = 0;
  let analysedCells = 0;
  const total = wanted ? order.filter((k) => wanted.has(k)).length : order.length;

  for (const key of order) {
    const cell = design.cells.get(key);
    if (!cell) continue;
    const base = localRailsOf(design, deck, cell);
    const cellContexts = contexts.get(key) ?? new Map([['', { rails: [], signals: [], count: counts.get(key) ?? 1 }]]);
    const isRoot = design.roots.includes(key);
    for (const context of cellContexts.values()) {
      const rails = base.slice();
      cell.ports.forEach((net, i) => {
        if (rails[net] === undefined && context.rails[i] !== undefined) rails[net] = context.rails[i];
      });
      const skip = wanted !== null && !wanted.has(key);
      if (skip && cell.instances.length === 0) continue;
      const ctx: CellContext = makeContext(design, deck, cell, rails, {
        instances: context.count,
        signals: context.signals.length ? context.signals : undefined,
        root: isRoot,
      });
      // Clock tracing comes first: its hint decides how footless dynamic stages are classified, for every rule.
      adoptChildStages(ctx, context.rails.length ? context.rails : cell.ports.map(() => undefined));
      primeClockHint(ctx);
      const timing = timingOf(ctx);
      // Children inherit what this context makes of the nets they are tied to: rails and timings.
      if (cell.instances.length) {
        const alias = cellIndex(ctx).alias;
        for (const inst of cell.instances) {
          addContext(
            contexts,
            inst.cell,
            inst.pins.map((p) => rails[p]),
            inst.pins.map((p) => timing.timing[alias[p]]),
            context.count,
          );
        }
      }
      if (skip) continue;
      for (const { rule, severity, params } of settings) {
        rule.check(ctx, params, (raw) => emit(rule, severity, cell, context.count, raw));
      }
    }
    if (!wanted || wanted.has(key)) {
      analysedCells++;
      options.onProgress?.({ done: ++done, total });
    }
  }

  function emit(rule: RuleModule, severity: Finding['severity'], cell: Cell, instances: number, raw: RawFinding) {
    const fp = fingerprint(rule.meta.id, cell.name, raw.devices, raw.nets);
    const existing = seen.get(fp);
    if (existing) {
      // The same problem found again in another port context of the same cell.
      existing.instances += instances;
      return;
    }
    const finding: Finding = {
      ruleId: rule.meta.id,
      severity,
      message: raw.message,
      file: raw.loc.file,
      line: raw.loc.line,
      column: raw.loc.column,
      cell: cell.name,
      nets: raw.nets,
      devices: raw.devices,
      instances,
      measured: raw.measured ?? null,
      limit: raw.limit ?? null,
      fingerprint: fp,
      corner: raw.corner ?? null,
      plot: raw.plot ?? null,
    };
    seen.set(fp, finding);
    findings.push(finding);
  }

  const { devices, instances } = flattenedTotals(design, counts);
  return {
    findings,
    summary: {
      cells: analysedCells,
      devices,
      instances,
      errors: findings.filter((f) => f.severity === 'error').length,
      warnings: findings.filter((f) => f.severity === 'warning').length,
      infos: findings.filter((f) => f.severity === 'info').length,
    },
  };
}

function addContext(
  contexts: Map<string, Map<string, PortContext>>,
  cellKey: string,
  rails: (RailKind | undefined)[],
  signals: (PortSignal | undefined)[],
  count: number,
) {
  let byKey = contexts.get(cellKey);
  if (!byKey) contexts.set(cellKey, (byKey = new Map()));
  let sig = rails.map((r) => (r === 'power' ? 'P' : r === 'ground' ? 'G' : '-')).join('');
  const timed = signals.some((t) => t !== undefined);
  if (timed) sig += '|' + signals.map(timingSignature).join(',');
  const existing = byKey.get(sig);
  if (existing) existing.count += count;
  else byKey.set(sig, { rails, signals: timed ? signals : [], count });
}
