// The team's waivers: requests awaiting a decision first, then the rest, filtered by
// standing; each opens its own page with its history and the decision.

import { useQuery } from '@tanstack/react-query';
import { Link, useSearchParams } from 'react-router';
import { WAIVER_SCOPE_LABELS, WAIVER_STANDINGS, type WaiverStanding, type WaiverView } from '../../../shared/api/waivers';
import { Button } from '../../components/Button';
import { DataTable, type ColumnDef } from '../../components/DataTable';
import { EmptyState } from '../../components/EmptyState';
import { Loading } from '../../components/LoadState';
import { ErrorNotice } from '../../components/Notice';
import { PageHeader } from '../../components/PageHeader';
import { useDocumentTitle } from '../../lib/document-title';
import { formatDate } from '../../lib/format';
import { useCan } from '../../lib/session';
import { waiverListQuery } from './queries';
import { lastDay, STANDING_LABELS, StandingBadge } from './WaiverStatus';

const columns: ColumnDef<WaiverView, any>[] = [
  { id: 'standing', header: 'Standing', cell: ({ row }) => <StandingBadge standing={row.original.standing} /> },
  {
    id: 'what',
    header: 'Rule and cell',
    cell: ({ row }) => (
      <Link to={`/waivers/${row.original.id}`} className="font-medium text-well-800 hover:underline">
        <span className="font-mono text-xs">{row.original.ruleId}</span> in <span className="font-mono text-xs">{row.original.cell ?? 'every cell'}</span>
      </Link>
    ),
  },
  { id: 'scope', header: 'Covers', cell: ({ row }) => <span className="text-ink-700">{WAIVER_SCOPE_LABELS[row.original.scope].label}</span> },
  { id: 'block', header: 'Asked in', cell: ({ row }) => <span className="text-ink-700">{row.original.block?.name ?? '—'}</span> },
  {
    id: 'justification',
    header: 'Justification',
    cell: ({ row }) => <span className="line-clamp-2 max-w-md text-ink-700">{row.original.justification}</span>,
  },
  { id: 'requester', header: 'Asked by', cell: ({ row }) => <span className="whitespace-nowrap text-ink-700">{row.original.requester?.name ?? '—'}, {formatDate(row.original.createdAt)}</span> },
  { id: 'decider', header: 'Decided by', cell: ({ row }) => <span className="whitespace-nowrap text-ink-700">{row.original.decider ? `${row.original.decider.name}, ${formatDate(row.original.decidedAt)}` : '—'}</span> },
  { id: 'expiry', header: 'Holds through', cell: ({ row }) => <span className="whitespace-nowrap tabular-nums text-ink-700">{lastDay(row.original.expiresAt) ?? 'no expiry'}</span> },
];

export function WaiversPage() {
  useDocumentTitle('Waivers');
  const canRequest = useCan('waiver.request');
  const canDecide = useCan('waiver.decide');
  const [params, setParams] = useSearchParams();
  const standing = (params.get('standing') ?? '').split(',').filter((s): s is WaiverStanding => (WAIVER_STANDINGS as readonly string[]).includes(s));
  const mine = params.get('mine') === 'true';
  const page = Math.max(1, Number.parseInt(params.get('page') ?? '1', 10) || 1);
  const list = useQuery(waiverListQuery({ standing, mine, page }));
  const pages = list.data ? Math.max(1, Math.ceil(list.data.total / list.data.pageSize)) : 1;
  const update = (next: { standing?: WaiverStanding[]; mine?: boolean; page?: number }) => {
    const p = new URLSearchParams();
    const s = next.standing ?? standing;
    if (s.length) p.set('standing', s.join(','));
    if (next.mine ?? mine) p.set('mine', 'true');
    if ((next.page ?? 1) > 1) p.set('page', String(next.page));
    setParams(p);
  };
  const filtered = standing.length > 0 || mine;
  const steps = [
    canRequest
      ? 'On a run’s page, choose a finding you have reviewed and ask to waive it, with a justification a reviewer can check.'
      : 'A designer asks to waive a finding from a run’s page, with a justification.',
    canDecide ? 'You approve or reject each request; approved waivers then apply to later runs while the circuit is unchanged.' : 'A reviewer approves or rejects the request; approved waivers apply to later runs while the circuit is unchanged.',
  ];

  return (
    <>
      <PageHeader title="Waivers" description="A waiver records that a finding was reviewed and accepted, by whom and why. Findings it covers show as waived instead of open." />
      <div className="mb-4 flex flex-wrap items-end gap-3" role="group" aria-label="Filter waivers">
        <label className="text-xs font-medium text-ink-700">
          <span className="mb-1 block">Standing</span>
          <select
            className="h-9 rounded-md border border-ink-300 bg-white px-2 text-sm"
            value={standing.join(',')}
            onChange={(e) => update({ standing: e.target.value ? (e.target.value.split(',') as WaiverStanding[]) : [] })}
          >
            <option value="">Any</option>
            {WAIVER_STANDINGS.map((s) => (
              <option key={s} value={s}>
                {STANDING_LABELS[s]}
              </option>
            ))}
          </select>
        </label>
        {canRequest && (
          <label className="flex items-center gap-2 pb-2 text-sm text-ink-800">
            <input type="checkbox" checked={mine} onChange={(e) => update({ mine: e.target.checked })} />
            Only my requests
          </label>
        )}
      </div>
      {list.isPending && <Loading label="Loading the waivers…" />}
      {list.isError && <ErrorNotice error={list.error} title="Could not load the waivers" />}
      {list.data &&
        (list.data.total === 0 && !filtered ? (
          <EmptyState title="No waivers yet" illustration="list" steps={steps}>
            Requested, approved, rejected and revoked waivers of your team will be listed here with their justification, scope and expiry.
          </EmptyState>
        ) : (
          <>
            <DataTable data={list.data.items} columns={columns} caption="Waivers" rowKey={(w) => w.id} emptyMessage="No waiver matches these filters." />
            {pages > 1 && (
              <div className="mt-3 flex items-center gap-2 text-sm text-ink-700">
                <Button size="sm" disabled={page <= 1} onClick={() => update({ page: page - 1 })}>
                  Previous
                </Button>
                <span>
                  Page {page} of {pages}
                </span>
                <Button size="sm" disabled={page >= pages} onClick={() => update({ page: page + 1 })}>
                  Next
                </Button>
              </div>
            )}
          </>
        ))}
    </>
  );
}
