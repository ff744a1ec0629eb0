// Runs a deck's enabled rules over a design, hierarchically.
//
// Cells are visited parents first. Each cell is analysed once per distinct port
// context (which of its ports its parents tie to a rail), never once per instance,
// so a design of billions of flattened devices costs what its distinct cells cost.

import type { Cell, Design, RailKind } from '../grammar/design';
import { instanceCounts, topologicalOrder } from '../grammar/design';
import type { Deck } from '../shared/deck';
import { globMatcher } from '../shared/deck';
import type { Finding, CheckSummary } from '../shared/findings';
import { fingerprint } from './fingerprint';
import { ruleRegistry } from './registry';
import type { CellContext, RawFinding, RuleModule } from './types';

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
  count: number;
}

/** Rails each net of a cell carries from local evidence: name patterns, `.global` names held by a source, sources inside the cell. */
export function localRails(design: Design, cell: Cell, deck: Deck): (RailKind | undefined)[] {
  const isPower = globMatcher(deck.supplies.power);
  const isGround = globMatcher(deck.supplies.ground);
  const rails: (RailKind | undefined)[] = new Array(cell.nets.length);
  for (let i = 0; i < cell.nets.length; i++) {
    const name = cell.nets[i];
    const sourced = design.sourcedRails.get(name.toLowerCase());
    if (sourced) rails[i] = sourced.rail;
    else if (isGround(name)) rails[i] = 'ground';
    else if (isPower(name)) rails[i] = 'power';
  }
  return rails;
}

export function checkDesign(design: Design, deck: Deck, options: CheckOptions = {}): CheckResult {
  const rules = (options.rules ?? ruleRegistry).filter((r) => deck.rules[r.meta.id]?.enabled ?? false);
  const settings = rules.map((r) => {
    const s = deck.rules[r.meta.id];
    return { rule: r, severity: s.severity, params: r.params.parse(s.params ?? {}) };
  });

  const counts = instanceCounts(design);
  const order = topologicalOrder(design).filter((k) => (counts.get(k) ?? 0) > 0);
  const wanted = options.cells ? new Set(options.cells) : null;

  // Port contexts flow from parents to children; every cell's parents come before it in `order`.
  const contexts = new Map<string, Map<string, PortContext>>();
  for (const root of design.roots) addContext(contexts, root, [], 1);

  const findings: Finding[] = [];
  const seen = new Map<string, Finding>();
  let done = 0;
  let analysedCells = 0;
  const total = wanted ? order.filter((k) => wanted.has(k)).length : order.length;

  for (const key of order) {
    const cell = design.cells.get(key);
    if (!cell) continue;
    const base = localRails(design, cell, deck);
    const cellContexts = contexts.get(key) ?? new Map([['', { rails: [], count: counts.get(key) ?? 1 }]]);
    for (const context of cellContexts.values()) {
      const rails = base.slice();
      cell.ports.forEach((net, i) => {
        if (rails[net] === undefined && context.rails[i] !== undefined) rails[net] = context.rails[i];
      });
      // Children inherit what this context makes of the nets they are tied to.
      for (const inst of cell.instances) {
        addContext(contexts, inst.cell, inst.pins.map((p) => rails[p]), context.count);
      }
      if (wanted && !wanted.has(key)) continue;
      const memo = new Map<string, unknown>();
      const ctx: CellContext = {
        design,
        cell,
        deck,
        instances: context.count,
        rails,
        memo<T>(k: string, compute: () => T): T {
          if (!memo.has(k)) memo.set(k, compute());
          return memo.get(k) as T;
        },
      };
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

  let devices = 0;
  let instances = 0;
  for (const [key, n] of counts) {
    const cell = design.cells.get(key);
    if (!cell) continue;
    devices += n * (cell.mosfets.length + cell.others.length);
    instances += n * cell.instances.length;
  }
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
  count: number,
) {
  let byKey = contexts.get(cellKey);
  if (!byKey) contexts.set(cellKey, (byKey = new Map()));
  const sig = rails.map((r) => (r === 'power' ? 'P' : r === 'ground' ? 'G' : '-')).join('');
  const existing = byKey.get(sig);
  if (existing) existing.count += count;
  else byKey.set(sig, { rails, count });
}
