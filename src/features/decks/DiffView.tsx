// What changed between two deck versions, section by section, old → new with units.

import type { ReactNode } from 'react';
import type { DeckDiff } from '../../../shared/api/decks';
import { findRule } from '../../../rules/registry';
import { ToneBadge } from '../../design/severity';
import { formatQuantity } from './quantity';

function show(value: unknown, unit: string | null): string {
  if (typeof value === 'number') return formatQuantity(value, unit ?? '');
  if (typeof value === 'boolean') return value ? 'yes' : 'no';
  if (value === null || value === undefined) return '—';
  if (typeof value === 'string') return value === '' ? '(empty)' : value;
  return JSON.stringify(value);
}

function Change({ from, to, unit = null }: { from: unknown; to: unknown; unit?: string | null }) {
  return (
    <span className="font-mono text-sm tabular-nums">
      <del className="text-ink-500 decoration-ink-400">{show(from, unit)}</del>
      <span aria-hidden="true" className="px-1.5 text-ink-400">
        →
      </span>
      <span className="sr-only"> becomes </span>
      <ins className="font-medium text-ink-900 no-underline">{show(to, unit)}</ins>
    </span>
  );
}

function Group({ title, children, count }: { title: string; children: ReactNode; count: number }) {
  if (count === 0) return null;
  return (
    <section aria-label={title} className="border-t border-ink-100 pt-3 first:border-t-0 first:pt-0">
      <h3 className="mb-2 text-sm font-semibold text-ink-900">
        {title} <span className="font-normal text-ink-500">({count})</span>
      </h3>
      <ul className="space-y-1.5 text-sm text-ink-800">{children}</ul>
    </section>
  );
}

const ruleTitle = (id: string) => findRule(id)?.meta.title ?? id;

function RuleName({ id }: { id: string }) {
  return (
    <>
      <span className="font-medium">{ruleTitle(id)}</span> <span className="font-mono text-xs text-ink-500">{id}</span>
    </>
  );
}

function Patterns({ label, items }: { label: string; items: string[] }) {
  if (items.length === 0) return null;
  return (
    <li>
      {label}: <span className="font-mono">{items.join(', ')}</span>
    </li>
  );
}

const SETTING_LABELS: Record<DeckDiff['settings'][number]['field'], string> = {
  name: 'Name in reports',
  description: 'Description',
  scale: 'Default scale',
  slowestClockPeriod: 'Slowest clock period',
  useNetlistModels: 'Use the netlist’s .model parameters',
};

export function DiffView({ diff }: { diff: DeckDiff }) {
  const { rules, corners, clocks, supplies, deviceMap, settings } = diff;
  if (diff.paths.length === 0) return <p className="text-sm text-ink-600">The two versions have the same settings.</p>;
  const ruleCount = rules.added.length + rules.removed.length + rules.enabled.length + rules.regraded.length + rules.params.length;
  const clockCount = clocks.added.length + clocks.removed.length + clocks.changed.length + clocks.invertedSuffixesAdded.length + clocks.invertedSuffixesRemoved.length;
  const supplyCount = supplies.powerAdded.length + supplies.powerRemoved.length + supplies.groundAdded.length + supplies.groundRemoved.length;
  const mapCount = deviceMap.added.length + deviceMap.removed.length + deviceMap.changed.length + (deviceMap.reordered ? 1 : 0);

  return (
    <div className="space-y-4" aria-label={`Changes from version ${diff.from.version} to version ${diff.to.version}`} role="region">
      <p className="text-sm text-ink-600">
        {diff.paths.length} change{diff.paths.length === 1 ? '' : 's'} from <strong>version {diff.from.version}</strong> to <strong>version {diff.to.version}</strong>
        {diff.from.deckId !== diff.to.deckId && ` (${diff.from.deckName} → ${diff.to.deckName})`}.
      </p>
      <Group title="Rules" count={ruleCount}>
        {rules.added.map((r) => (
          <li key={`a-${r.ruleId}`}>
            Added <RuleName id={r.ruleId} />, {r.enabled ? 'on' : 'off'}, <ToneBadge tone={r.severity} />
          </li>
        ))}
        {rules.removed.map((r) => (
          <li key={`r-${r.ruleId}`}>
            Removed <RuleName id={r.ruleId} />
          </li>
        ))}
        {rules.enabled.map((r) => (
          <li key={`e-${r.ruleId}`}>
            <RuleName id={r.ruleId} /> turned {r.to ? 'on' : 'off'}
          </li>
        ))}
        {rules.regraded.map((r) => (
          <li key={`s-${r.ruleId}`} className="flex flex-wrap items-center gap-1.5">
            <RuleName id={r.ruleId} /> re-graded <ToneBadge tone={r.from} /> <span aria-hidden="true">→</span>
            <span className="sr-only">to</span> <ToneBadge tone={r.to} />
          </li>
        ))}
        {rules.params.map((p) => (
          <li key={`p-${p.ruleId}-${p.param}`}>
            <RuleName id={p.ruleId} />: {p.label ?? p.param} <Change from={p.from} to={p.to} unit={p.unit} />
          </li>
        ))}
      </Group>
      <Group title="Corners" count={corners.added.length + corners.removed.length + corners.changed.length}>
        {corners.added.map((c) => (
          <li key={`a-${c}`}>
            Added corner <span className="font-mono">{c}</span>
          </li>
        ))}
        {corners.removed.map((c) => (
          <li key={`r-${c}`}>
            Removed corner <span className="font-mono">{c}</span>
          </li>
        ))}
        {corners.changed.map((c) => (
          <li key={`c-${c.corner}-${c.field}`}>
            <span className="font-mono">{c.corner}</span> {c.field} <Change from={c.from} to={c.to} unit={c.unit} />
          </li>
        ))}
      </Group>
      <Group title="Clocks" count={clockCount}>
        {clocks.added.map((r) => (
          <li key={`a-${r.pattern}`}>
            Added clock <span className="font-mono">{r.pattern}</span> ({r.polarity === 'true' ? 'true phase' : 'inverted'}
            {r.phase ? `, phase ${r.phase}` : ''})
          </li>
        ))}
        {clocks.removed.map((r) => (
          <li key={`r-${r.pattern}`}>
            Removed clock <span className="font-mono">{r.pattern}</span>
          </li>
        ))}
        {clocks.changed.map((c) => (
          <li key={`c-${c.pattern}-${c.field}`}>
            Clock <span className="font-mono">{c.pattern}</span> {c.field} <Change from={c.from} to={c.to} />
          </li>
        ))}
        <Patterns label="Inverted endings added" items={clocks.invertedSuffixesAdded} />
        <Patterns label="Inverted endings removed" items={clocks.invertedSuffixesRemoved} />
      </Group>
      <Group title="Supplies" count={supplyCount}>
        <Patterns label="Power patterns added" items={supplies.powerAdded} />
        <Patterns label="Power patterns removed" items={supplies.powerRemoved} />
        <Patterns label="Ground patterns added" items={supplies.groundAdded} />
        <Patterns label="Ground patterns removed" items={supplies.groundRemoved} />
      </Group>
      <Group title="Device map" count={mapCount}>
        {deviceMap.added.map((e) => (
          <li key={`a-${e.pattern}`}>
            Added <span className="font-mono">{e.pattern}</span> as {e.kind}
          </li>
        ))}
        {deviceMap.removed.map((e) => (
          <li key={`r-${e.pattern}`}>
            Removed <span className="font-mono">{e.pattern}</span>
          </li>
        ))}
        {deviceMap.changed.map((e) => (
          <li key={`c-${e.pattern}`}>
            <span className="font-mono">{e.pattern}</span> <Change from={e.from} to={e.to} />
          </li>
        ))}
        {deviceMap.reordered && <li>Patterns in another order (the first match wins)</li>}
      </Group>
      <Group title="Deck settings" count={settings.length}>
        {settings.map((s) => (
          <li key={s.field}>
            {SETTING_LABELS[s.field]} <Change from={s.from} to={s.to} unit={s.unit} />
          </li>
        ))}
      </Group>
    </div>
  );
}
