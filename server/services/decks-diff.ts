// What changed between two deck contents, section by section, as the version
// history and the publish dialog show it. Rules are matched by id, corners by name,
// clock roots and device-map entries by pattern; everything else field by field.

import { isDeepStrictEqual } from 'node:util';
import type { z } from 'zod';
import type { DeckDiff } from '../../shared/api/decks';
import type { ClockRoot, Deck, DeviceMapEntry, RuleSetting } from '../../shared/deck';
import { cornerSchema, deckSchema, deviceParamsSchema } from '../../shared/deck';
import { findRule, ruleRegistry } from '../../rules/registry';

export type DeckContentDiff = Omit<DeckDiff, 'from' | 'to'>;

type Meta = { unit?: string; label?: string };

function metaOf(schema: z.ZodType | undefined): Meta {
  return ((schema?.meta() as Meta | undefined) ?? {}) as Meta;
}

function paramMeta(ruleId: string, param: string): Meta {
  const shape = findRule(ruleId)?.params.shape as Record<string, z.ZodType> | undefined;
  return metaOf(shape?.[param]);
}

function cornerFieldUnit(field: string): string | null {
  const [head, tail] = field.split('.');
  if (tail !== undefined) return metaOf((deviceParamsSchema.shape as Record<string, z.ZodType>)[tail]).unit ?? null;
  return metaOf((cornerSchema.shape as Record<string, z.ZodType>)[head]).unit ?? null;
}

/** Report order: the registry's, then unknown ids alphabetically. */
function ruleOrder(ids: Iterable<string>): string[] {
  const rank = new Map(ruleRegistry.map((r, i) => [r.meta.id, i]));
  return [...new Set(ids)].sort((a, b) => (rank.get(a) ?? Infinity) - (rank.get(b) ?? Infinity) || a.localeCompare(b));
}

/** Leaf fields of a plain object, dotted: `{ nmos: { vt0 } }` → `nmos.vt0`. */
function leaves(value: unknown, prefix = ''): Map<string, unknown> {
  const out = new Map<string, unknown>();
  if (typeof value === 'object' && value !== null && !Array.isArray(value)) {
    for (const [k, v] of Object.entries(value)) for (const [p, leaf] of leaves(v, prefix ? `${prefix}.${k}` : k)) out.set(p, leaf);
  } else out.set(prefix, value);
  return out;
}

function changedLeaves(a: unknown, b: unknown): { field: string; from: unknown; to: unknown }[] {
  const la = leaves(a);
  const lb = leaves(b);
  const fields = [...new Set([...la.keys(), ...lb.keys()])];
  return fields
    .filter((f) => !isDeepStrictEqual(la.get(f), lb.get(f)))
    .map((field) => ({ field, from: la.get(field) ?? null, to: lb.get(field) ?? null }));
}

function byKey<T>(items: readonly T[], key: (item: T) => string): Map<string, T> {
  const map = new Map<string, T>();
  for (const item of items) if (!map.has(key(item))) map.set(key(item), item);
  return map;
}

function setDifference(a: readonly string[], b: readonly string[]): string[] {
  const other = new Set(b);
  return [...new Set(a)].filter((x) => !other.has(x));
}

function brief(ruleId: string, s: RuleSetting) {
  return { ruleId, enabled: s.enabled, severity: s.severity };
}

export function diffDeckContents(a: Deck, b: Deck): DeckContentDiff {
  const paths: string[] = [];

  // Rules.
  const rules: DeckContentDiff['rules'] = { added: [], removed: [], enabled: [], regraded: [], params: [] };
  for (const id of ruleOrder([...Object.keys(a.rules), ...Object.keys(b.rules)])) {
    const before = a.rules[id];
    const after = b.rules[id];
    if (!before) {
      rules.added.push(brief(id, after));
      paths.push(`rules.${id}`);
      continue;
    }
    if (!after) {
      rules.removed.push(brief(id, before));
      paths.push(`rules.${id}`);
      continue;
    }
    if (before.enabled !== after.enabled) {
      rules.enabled.push({ ruleId: id, from: before.enabled, to: after.enabled });
      paths.push(`rules.${id}.enabled`);
    }
    if (before.severity !== after.severity) {
      rules.regraded.push({ ruleId: id, from: before.severity, to: after.severity });
      paths.push(`rules.${id}.severity`);
    }
    const names = [...new Set([...Object.keys(before.params ?? {}), ...Object.keys(after.params ?? {})])];
    const shapeOrder = Object.keys(findRule(id)?.params.shape ?? {});
    names.sort((x, y) => (shapeOrder.indexOf(x) + 1 || Infinity) - (shapeOrder.indexOf(y) + 1 || Infinity) || x.localeCompare(y));
    for (const param of names) {
      const from = before.params?.[param] ?? null;
      const to = after.params?.[param] ?? null;
      if (isDeepStrictEqual(from, to)) continue;
      const meta = paramMeta(id, param);
      rules.params.push({ ruleId: id, param, from, to, unit: meta.unit ?? null, label: meta.label ?? null });
      paths.push(`rules.${id}.params.${param}`);
    }
  }

  // Corners, by name, in the order of the newer version (removed ones after).
  const corners: DeckContentDiff['corners'] = { added: [], removed: [], changed: [] };
  const cornersA = byKey(a.corners, (c) => c.name);
  const cornersB = byKey(b.corners, (c) => c.name);
  for (const [name, after] of cornersB) {
    const before = cornersA.get(name);
    if (!before) {
      corners.added.push(name);
      paths.push(`corners.${name}`);
      continue;
    }
    for (const { field, from, to } of changedLeaves(before, after)) {
      corners.changed.push({ corner: name, field, from, to, unit: cornerFieldUnit(field) });
      paths.push(`corners.${name}.${field}`);
    }
  }
  for (const name of cornersA.keys()) {
    if (!cornersB.has(name)) {
      corners.removed.push(name);
      paths.push(`corners.${name}`);
    }
  }

  // Clock roots by pattern, and the inverted-phase suffixes.
  const clocks: DeckContentDiff['clocks'] = { added: [], removed: [], changed: [], invertedSuffixesAdded: [], invertedSuffixesRemoved: [] };
  const rootsA = byKey<ClockRoot>(a.clocks.roots, (r) => r.pattern);
  const rootsB = byKey<ClockRoot>(b.clocks.roots, (r) => r.pattern);
  for (const [pattern, after] of rootsB) {
    const before = rootsA.get(pattern);
    if (!before) {
      clocks.added.push(after);
      paths.push(`clocks.roots.${pattern}`);
      continue;
    }
    for (const field of ['phase', 'polarity'] as const) {
      if (before[field] !== after[field]) {
        clocks.changed.push({ pattern, field, from: before[field], to: after[field] });
        paths.push(`clocks.roots.${pattern}.${field}`);
      }
    }
  }
  for (const [pattern, before] of rootsA) {
    if (!rootsB.has(pattern)) {
      clocks.removed.push(before);
      paths.push(`clocks.roots.${pattern}`);
    }
  }
  clocks.invertedSuffixesAdded = setDifference(b.clocks.invertedSuffixes, a.clocks.invertedSuffixes);
  clocks.invertedSuffixesRemoved = setDifference(a.clocks.invertedSuffixes, b.clocks.invertedSuffixes);
  for (const s of [...clocks.invertedSuffixesAdded, ...clocks.invertedSuffixesRemoved]) paths.push(`clocks.invertedSuffixes.${s}`);

  // Supply and ground patterns.
  const supplies: DeckContentDiff['supplies'] = {
    powerAdded: setDifference(b.supplies.power, a.supplies.power),
    powerRemoved: setDifference(a.supplies.power, b.supplies.power),
    groundAdded: setDifference(b.supplies.ground, a.supplies.ground),
    groundRemoved: setDifference(a.supplies.ground, b.supplies.ground),
  };
  for (const p of [...supplies.powerAdded, ...supplies.powerRemoved]) paths.push(`supplies.power.${p}`);
  for (const p of [...supplies.groundAdded, ...supplies.groundRemoved]) paths.push(`supplies.ground.${p}`);

  // Device map by pattern; order matters because the first match wins.
  const deviceMap: DeckContentDiff['deviceMap'] = { added: [], removed: [], changed: [], reordered: false };
  const mapA = byKey<DeviceMapEntry>(a.deviceMap, (e) => e.pattern);
  const mapB = byKey<DeviceMapEntry>(b.deviceMap, (e) => e.pattern);
  for (const [pattern, after] of mapB) {
    const before = mapA.get(pattern);
    if (!before) {
      deviceMap.added.push(after);
      paths.push(`deviceMap.${pattern}`);
    } else if (before.kind !== after.kind) {
      deviceMap.changed.push({ pattern, from: before.kind, to: after.kind });
      paths.push(`deviceMap.${pattern}.kind`);
    }
  }
  for (const [pattern, before] of mapA) {
    if (!mapB.has(pattern)) {
      deviceMap.removed.push(before);
      paths.push(`deviceMap.${pattern}`);
    }
  }
  const sharedA = [...mapA.keys()].filter((p) => mapB.has(p));
  const sharedB = [...mapB.keys()].filter((p) => mapA.has(p));
  deviceMap.reordered = !isDeepStrictEqual(sharedA, sharedB);
  if (deviceMap.reordered) paths.push('deviceMap.order');

  // Deck-wide settings.
  const settings: DeckContentDiff['settings'] = [];
  for (const field of ['name', 'description', 'scale', 'slowestClockPeriod', 'useNetlistModels'] as const) {
    if (isDeepStrictEqual(a[field], b[field])) continue;
    settings.push({ field, from: a[field], to: b[field], unit: metaOf((deckSchema.shape as Record<string, z.ZodType>)[field]).unit ?? null });
    paths.push(field);
  }

  return { rules, corners, clocks, supplies, deviceMap, settings, paths };
}
