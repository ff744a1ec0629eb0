// One finding, beside the table: what the rule is about and why it matters, what was measured
// against which limit, where it is (cell, instances, nets, devices, the netlist line), what
// usually fixes it, its waiver state, and its picture when the rule measured a curve or a budget.

import type { ReactNode } from 'react';
import type { RuleCatalogueEntry } from '../../../shared/api/decks';
import { WAIVER_SCOPE_LABELS } from '../../../shared/api/waivers';
import type { StoredFinding } from '../../../shared/api/runs';
import { REVIEW_CAUTION } from '../../../shared/findings';
import { Button } from '../../components/Button';
import { ToneBadge, ToneGlyph } from '../../design/severity';
import { FindingPlot, PLOT_TITLES } from '../plots';
import { formatDate } from '../../lib/format';
import { formatQuantity } from './quantity';

const WAIVER_WORDS: Record<StoredFinding['status'], string> = {
  open: 'Not waived.',
  waived: 'Waived: an approved waiver of your team covers this finding.',
  'waiver-requested': 'Not waived yet: a waiver has been requested and awaits a reviewer.',
  'waiver-lapsed': 'Not waived: the waiver that covered this finding has lapsed.',
};

function NameList({ label, names }: { label: string; names: string[] }) {
  return (
    <div>
      <dt className="text-xs font-medium text-ink-500">{label}</dt>
      <dd className="mt-0.5">
        {names.length === 0 ? (
          <span className="text-sm text-ink-400">none named</span>
        ) : (
          <ul className="flex flex-wrap gap-1" aria-label={label}>
            {names.map((n) => (
              <li key={n} className="rounded border border-ink-200 bg-ink-50 px-1.5 py-0.5 font-mono text-xs text-ink-800">
                {n}
              </li>
            ))}
          </ul>
        )}
      </dd>
    </div>
  );
}

export function FindingDetail({
  finding,
  rule,
  ruleLoading = false,
  onShowInNetlist,
  headingLevel = 2,
  children,
}: {
  /** Below the waiver state: where waiver requests and decisions are made (the waivers feature's part). */
  children?: ReactNode;
  finding: StoredFinding;
  rule: RuleCatalogueEntry | undefined;
  ruleLoading?: boolean;
  onShowInNetlist?: (finding: StoredFinding) => void;
  headingLevel?: 2 | 3;
}) {
  const Heading = headingLevel === 2 ? 'h2' : 'h3';
  const SubHeading = headingLevel === 2 ? 'h3' : 'h4';
  const waived = finding.status === 'waived';
  return (
    <article aria-labelledby="finding-title" className="space-y-4 text-sm" data-finding={finding.id}>
      <header>
        <div className="flex flex-wrap items-center gap-2">
          <ToneBadge tone={finding.severity} />
          {waived && <ToneBadge tone="waived" />}
          <span className="font-mono text-xs text-ink-600">{finding.ruleId}</span>
        </div>
        <Heading id="finding-title" className="mt-1.5 text-base font-semibold text-ink-900">
          {rule?.title ?? (ruleLoading ? 'Loading the rule…' : finding.ruleId)}
        </Heading>
        <p className="mt-1 leading-6 text-ink-800">{finding.message}</p>
      </header>

      {(finding.measured || finding.limit) && (
        <dl className="grid grid-cols-2 gap-2" aria-label="Measured against limit">
          <div className="rounded-md border border-ink-200 bg-white px-3 py-2">
            <dt className="text-xs font-medium text-ink-500">Measured</dt>
            <dd className="mt-0.5 text-lg font-semibold tabular-nums text-ink-900" data-quantity="measured">
              {formatQuantity(finding.measured)}
            </dd>
          </div>
          <div className="rounded-md border border-ink-200 bg-white px-3 py-2">
            <dt className="text-xs font-medium text-ink-500">Limit</dt>
            <dd className="mt-0.5 text-lg font-semibold tabular-nums text-ink-900" data-quantity="limit">
              {formatQuantity(finding.limit)}
            </dd>
          </div>
          {finding.corner && (
            <div className="col-span-2 text-xs text-ink-600">
              At corner <span className="font-mono">{finding.corner}</span>
            </div>
          )}
        </dl>
      )}

      <dl className="grid grid-cols-2 gap-x-4 gap-y-3">
        <div>
          <dt className="text-xs font-medium text-ink-500">Cell</dt>
          <dd className="mt-0.5 font-mono text-ink-900">{finding.cell}</dd>
        </div>
        <div>
          <dt className="text-xs font-medium text-ink-500">Instances in the design</dt>
          <dd className="mt-0.5 tabular-nums text-ink-900">×{finding.instances}</dd>
        </div>
        <div className="col-span-2">
          <dt className="text-xs font-medium text-ink-500">Netlist line</dt>
          <dd className="mt-0.5 flex flex-wrap items-center gap-2">
            <span className="font-mono text-ink-900">
              {finding.file}:{finding.line}:{finding.column}
            </span>
            {onShowInNetlist && (
              <Button size="sm" onClick={() => onShowInNetlist(finding)}>
                Show in netlist
              </Button>
            )}
          </dd>
        </div>
        <div className="col-span-2">
          <NameList label="Nets" names={finding.nets} />
        </div>
        <div className="col-span-2">
          <NameList label="Devices" names={finding.devices} />
        </div>
      </dl>

      {finding.plot && (
        <section aria-label={PLOT_TITLES[finding.plot.kind]} className="rounded-md border border-ink-200 bg-white p-3">
          <SubHeading className="mb-2 text-sm font-semibold text-ink-900">{PLOT_TITLES[finding.plot.kind]}</SubHeading>
          <FindingPlot plot={finding.plot} />
        </section>
      )}

      <section aria-label="Why it matters">
        <SubHeading className="text-sm font-semibold text-ink-900">Why it matters</SubHeading>
        <p className="mt-1 leading-6 text-ink-700">{rule?.rationale ?? (ruleLoading ? 'Loading…' : 'This rule’s description is not available.')}</p>
      </section>
      <section aria-label="How to fix it">
        <SubHeading className="text-sm font-semibold text-ink-900">How to fix it</SubHeading>
        <p className="mt-1 leading-6 text-ink-700">{rule?.fix ?? (ruleLoading ? 'Loading…' : '—')}</p>
      </section>

      <section aria-label="Waiver" className="rounded-md border border-dashed border-ink-300 bg-ink-50 px-3 py-2.5">
        <SubHeading className="flex items-center gap-1.5 text-sm font-semibold text-ink-900">
          <ToneGlyph tone="waived" size={11} />
          Waiver
        </SubHeading>
        <p className="mt-1 text-ink-700" data-waiver-state={finding.status}>
          {WAIVER_WORDS[finding.status]}
        </p>
        {finding.waiver && (
          <dl className="mt-1 grid grid-cols-[auto_1fr] gap-x-3 text-xs text-ink-600">
            <dt>Covers</dt>
            <dd>{WAIVER_SCOPE_LABELS[finding.waiver.scope].label}</dd>
            {finding.waiver.expiresAt && (
              <>
                <dt>Expires</dt>
                <dd>{formatDate(finding.waiver.expiresAt)}</dd>
              </>
            )}
            {finding.waiver.reason && (
              <>
                <dt>Why it lapsed</dt>
                <dd>{finding.waiver.reason}</dd>
              </>
            )}
          </dl>
        )}
        {children}
      </section>

      <p className="flex items-start gap-1.5 text-xs text-ink-600">
        <ToneGlyph tone="info" size={11} className="mt-0.5" />
        {REVIEW_CAUTION}
      </p>
    </article>
  );
}
