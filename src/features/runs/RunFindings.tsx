// A finished run's review: the findings table (filters, sort, pages in the address), the
// selected finding beside it, and the netlist below with that finding's lines marked.

import { useQuery } from '@tanstack/react-query';
import type { VisibilityState } from '@tanstack/react-table';
import { useEffect, useRef, useState } from 'react';
import { useSearchParams } from 'react-router';
import type { RunDetail, StoredFinding } from '../../../shared/api/runs';
import { EmptyState } from '../../components/EmptyState';
import { Loading } from '../../components/LoadState';
import { ErrorNotice } from '../../components/Notice';
import { FindingDetail } from '../findings/FindingDetail';
import { FindingWaiver } from '../waivers/FindingWaiver';
import { DEFAULT_COLUMNS, FindingsTable } from '../findings/FindingsTable';
import { findingQuery, findingsQuery, ruleCatalogueQuery } from '../findings/queries';
import { FINDING_KEY, hasFilters, readView, writeView, type FindingsView } from '../findings/view-state';
import { RunNetlistView } from './RunNetlistView';

const COLUMNS_STORAGE_KEY = 'keepwell.findings.columns';

function storedColumns(): VisibilityState {
  try {
    const saved = JSON.parse(window.localStorage.getItem(COLUMNS_STORAGE_KEY) ?? 'null');
    return saved && typeof saved === 'object' ? { ...DEFAULT_COLUMNS, ...saved } : DEFAULT_COLUMNS;
  } catch {
    return DEFAULT_COLUMNS;
  }
}

export function RunFindings({ run }: { run: RunDetail }) {
  const [params, setParams] = useSearchParams();
  const view = readView(params);
  const selectedId = Number(params.get(FINDING_KEY)) || null;
  const [columns, setColumns] = useState<VisibilityState>(storedColumns);
  /** The finding last opened from anywhere (a row, a gutter mark, next/previous), which may not be on the table's page. */
  const [opened, setOpened] = useState<StoredFinding | null>(null);
  const netlistRef = useRef<HTMLElement>(null);

  const findings = useQuery(findingsQuery(run.id, view));
  const rules = useQuery(ruleCatalogueQuery);
  const rows = findings.data?.items ?? [];
  const known = rows.find((f) => f.id === selectedId) ?? (opened?.id === selectedId ? opened : undefined);
  // A shared link to a finding on another page than the one shown: fetched on its own.
  const single = useQuery({ ...findingQuery(run.id, selectedId ?? 0), enabled: selectedId !== null && !known && !findings.isPlaceholderData && findings.isSuccess });
  const selected: StoredFinding | null = known ?? (selectedId !== null ? (single.data ?? null) : null);

  useEffect(() => {
    window.localStorage.setItem(COLUMNS_STORAGE_KEY, JSON.stringify(columns));
  }, [columns]);

  function setView(next: FindingsView) {
    setParams((p) => writeView(p, next), { replace: true });
  }
  function open(finding: StoredFinding) {
    setOpened(finding);
    setParams(
      (p) => {
        const next = new URLSearchParams(p);
        next.set(FINDING_KEY, String(finding.id));
        return next;
      },
      { replace: true },
    );
  }

  const breakdown = run.breakdown;
  // The breakdown has a row per rule and severity (a rule's findings may differ in severity); the filter has one per rule.
  const findingsByRule = new Map<string, number>();
  for (const r of breakdown?.byRule ?? []) findingsByRule.set(r.ruleId, (findingsByRule.get(r.ruleId) ?? 0) + r.findings);
  const ruleOptions = [...findingsByRule].map(([id, findings]) => ({ id, findings }));
  const cellOptions = (breakdown?.byCell ?? []).map((c) => ({ cell: c.cell, findings: c.findings }));
  const totalFindings = run.summary ? run.summary.errors + run.summary.warnings + run.summary.infos : null;

  if (totalFindings === 0)
    return (
      <EmptyState title="No findings in this run" illustration="well" steps={['Every enabled rule of the deck version was checked against every cell.', 'Compare with an earlier run of the block to see what was fixed since.']}>
        The check finished without a finding. That is no sign-off: it says only that these rules, with these thresholds, found nothing to report.
      </EmptyState>
    );

  return (
    <div className="space-y-6">
      <div className="grid gap-6 xl:grid-cols-[minmax(0,1fr)_24rem] 2xl:grid-cols-[minmax(0,1fr)_30rem]">
        <section aria-labelledby="findings-heading" className="min-w-0">
          <h2 id="findings-heading" className="sr-only">
            Findings
          </h2>
          {findings.isError && <ErrorNotice error={findings.error} title="Could not load the findings" className="mb-3" />}
          {findings.isPending ? (
            <Loading label="Loading findings…" />
          ) : (
            <FindingsTable
              caption={`Findings of this run${hasFilters(view) ? ', filtered' : ''}`}
              rows={rows}
              total={findings.data?.total ?? 0}
              view={view}
              onViewChange={setView}
              selectedId={selectedId}
              onOpen={open}
              columnVisibility={columns}
              onColumnVisibilityChange={setColumns}
              rules={rules.data}
              ruleOptions={ruleOptions}
              cellOptions={cellOptions}
              busy={findings.isFetching}
            />
          )}
        </section>
        <aside aria-label="Selected finding" className="min-w-0 xl:sticky xl:top-4 xl:max-h-[calc(100vh-2rem)] xl:self-start xl:overflow-y-auto">
          <div className="rounded-lg border border-ink-200 bg-ink-50/60 p-4">
            {selected ? (
              <FindingDetail
                finding={selected}
                rule={rules.data?.get(selected.ruleId)}
                ruleLoading={rules.isPending}
                onShowInNetlist={() => netlistRef.current?.scrollIntoView({ behavior: 'smooth', block: 'start' })}
              >
                <FindingWaiver finding={selected} runId={run.id} />
              </FindingDetail>
            ) : selectedId !== null && single.isError ? (
              <ErrorNotice error={single.error} title="Could not load that finding" />
            ) : selectedId !== null && (single.isFetching || findings.isFetching) ? (
              <Loading label="Loading the finding…" />
            ) : (
              <div className="py-6 text-center text-sm text-ink-600">
                <p className="font-medium text-ink-800">No finding selected</p>
                <p className="mt-1">Choose a row, or move with j and k and press Enter, to read the finding here and see its lines in the netlist below.</p>
              </div>
            )}
          </div>
        </aside>
      </div>
      <section ref={netlistRef} aria-labelledby="netlist-heading" className="scroll-mt-4">
        <h2 id="netlist-heading" className="mb-2 text-base font-semibold text-ink-900">
          Netlist
        </h2>
        <RunNetlistView run={run} selected={selected} onSelect={open} />
      </section>
    </div>
  );
}
