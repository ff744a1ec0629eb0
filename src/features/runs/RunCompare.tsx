// This run against another finished run of the same block: findings new in this run, fixed
// since the other, and persisting in both. Findings are matched by fingerprint (rule, cell,
// devices and nets), not by line, so an edit that moves lines does not make everything "new".

import { useQuery } from '@tanstack/react-query';
import { Link, useSearchParams } from 'react-router';
import { COMPARE_KINDS, type RunDetail, type StoredFinding } from '../../../shared/api/runs';
import { Button } from '../../components/Button';
import { DataTable, type ColumnDef } from '../../components/DataTable';
import { EmptyState } from '../../components/EmptyState';
import { Loading } from '../../components/LoadState';
import { ErrorNotice } from '../../components/Notice';
import { ToneBadge } from '../../design/severity';
import { formatDateTime } from '../../lib/format';
import { ruleCatalogueQuery } from '../findings/queries';
import { blockRunsQuery, compareQuery } from './queries';

type Kind = (typeof COMPARE_KINDS)[number];

const KIND_WORDS: Record<Kind, { label: string; explain: string }> = {
  new: { label: 'New', explain: 'in this run, not in the other' },
  fixed: { label: 'Fixed', explain: 'in the other run, gone from this one' },
  persisting: { label: 'Persisting', explain: 'in both runs' },
};

const PAGE_SIZE = 50;

export function RunCompare({ run }: { run: RunDetail }) {
  const [params, setParams] = useSearchParams();
  const others = useQuery(blockRunsQuery(run.block.id, 1, 100, ['succeeded']));
  const rules = useQuery(ruleCatalogueQuery);
  const candidates = (others.data?.items ?? []).filter((r) => r.id !== run.id);
  const earlier = candidates.find((r) => r.createdAt < run.createdAt);
  const baseId = params.get('base') ?? earlier?.id ?? candidates[0]?.id ?? null;
  const kind = (COMPARE_KINDS as readonly string[]).includes(params.get('kind') ?? '') ? (params.get('kind') as Kind) : 'new';
  const page = Math.max(1, Number(params.get('cpage')) || 1);
  const result = useQuery({ ...compareQuery(run.id, baseId ?? '', kind, page, PAGE_SIZE), enabled: baseId !== null && run.state === 'succeeded' });

  const set = (changes: Record<string, string | null>) =>
    setParams(
      (p) => {
        const next = new URLSearchParams(p);
        for (const [k, v] of Object.entries(changes)) {
          if (v === null) next.delete(k);
          else next.set(k, v);
        }
        return next;
      },
      { replace: true },
    );

  if (others.isPending) return <Loading label="Loading the block’s runs…" />;
  if (others.isError) return <ErrorNotice error={others.error} title="Could not load the block’s runs" />;
  if (!candidates.length)
    return (
      <EmptyState title="Nothing to compare with yet" illustration="list" steps={['Submit the block’s netlist again after a change.', 'When that run finishes, come back here to see what is new, fixed and still there.']}>
        Comparison needs another finished run of <span className="font-mono">{run.block.name}</span>.
      </EmptyState>
    );

  const findingLink = (f: StoredFinding) =>
    kind === 'fixed' ? `/runs/${encodeURIComponent(baseId!)}?tab=findings&finding=${f.id}` : `/runs/${encodeURIComponent(run.id)}?tab=findings&finding=${f.id}`;
  const columns: ColumnDef<StoredFinding, any>[] = [
    { accessorKey: 'severity', header: 'Severity', cell: ({ row }) => <ToneBadge tone={row.original.severity} /> },
    {
      accessorKey: 'ruleId',
      header: 'Rule',
      cell: ({ row }) => (
        <span>
          <span className="block">{rules.data?.get(row.original.ruleId)?.title ?? row.original.ruleId}</span>
          <span className="font-mono text-xs text-ink-600">{row.original.ruleId}</span>
        </span>
      ),
    },
    {
      accessorKey: 'message',
      header: 'Message',
      cell: ({ row }) => (
        <Link to={findingLink(row.original)} className="line-clamp-2 text-well-800 hover:underline">
          {row.original.message}
        </Link>
      ),
    },
    { accessorKey: 'cell', header: 'Cell', cell: ({ row }) => <span className="font-mono text-xs">{row.original.cell}</span> },
    {
      id: 'location',
      header: kind === 'fixed' ? 'Was at' : 'Location',
      cell: ({ row }) => (
        <span className="whitespace-nowrap font-mono text-xs">
          {row.original.file}:{row.original.line}
        </span>
      ),
    },
  ];

  const counts = result.data?.counts;
  const total = result.data?.total ?? 0;
  return (
    <div className="space-y-4">
      <div className="flex flex-wrap items-end gap-4">
        <label className="text-sm">
          <span className="mb-1 block font-medium text-ink-800">Compare with</span>
          <select className="h-9 min-w-[22rem] rounded-md border border-ink-300 bg-white px-2 text-sm" value={baseId ?? ''} onChange={(e) => set({ base: e.target.value, cpage: null })}>
            {candidates.map((r) => (
              <option key={r.id} value={r.id}>
                {formatDateTime(r.createdAt)} · {r.deck.name} v{r.deck.version} · {r.submitter?.name ?? 'unknown'}
                {r.summary ? ` · ${r.summary.errors}E ${r.summary.warnings}W ${r.summary.infos}I` : ''}
              </option>
            ))}
          </select>
        </label>
        <p className="pb-2 text-xs text-ink-500">Findings are matched by fingerprint (rule, cell, devices, nets), so moved lines still match.</p>
      </div>
      <div role="tablist" aria-label="Kind of change" className="flex flex-wrap gap-2">
        {COMPARE_KINDS.map((k) => (
          <button
            key={k}
            type="button"
            role="tab"
            aria-selected={k === kind}
            onClick={() => set({ kind: k, cpage: null })}
            className={`rounded-md border px-3 py-1.5 text-sm ${k === kind ? 'border-well-600 bg-well-50 font-semibold text-well-900' : 'border-ink-300 bg-white text-ink-700 hover:bg-ink-50'}`}
          >
            {KIND_WORDS[k].label} <span className="tabular-nums">{counts ? counts[k] : '…'}</span>
            <span className="sr-only">: {KIND_WORDS[k].explain}</span>
          </button>
        ))}
      </div>
      <p className="text-sm text-ink-600">
        {KIND_WORDS[kind].label}: findings {KIND_WORDS[kind].explain}.
      </p>
      {result.isError && <ErrorNotice error={result.error} title="Could not compare the runs" />}
      {result.isPending && baseId && <Loading label="Comparing…" />}
      {result.data && (
        <>
          <DataTable caption={`${KIND_WORDS[kind].label} findings`} data={result.data.items} columns={columns} rowKey={(f) => String(f.id)} manualSorting emptyMessage={`No ${KIND_WORDS[kind].label.toLowerCase()} findings.`} />
          {total > PAGE_SIZE && (
            <nav aria-label="Pages of the comparison" className="flex items-center justify-end gap-2 text-sm text-ink-600">
              <span className="tabular-nums">
                Page {page} of {Math.ceil(total / PAGE_SIZE)}
              </span>
              <Button size="sm" disabled={page <= 1} onClick={() => set({ cpage: String(page - 1) })}>
                Previous page
              </Button>
              <Button size="sm" disabled={page * PAGE_SIZE >= total} onClick={() => set({ cpage: String(page + 1) })}>
                Next page
              </Button>
            </nav>
          )}
        </>
      )}
    </div>
  );
}
