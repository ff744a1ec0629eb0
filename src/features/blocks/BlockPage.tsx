import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Link, useNavigate, useParams } from 'react-router';
import type { RunView } from '../../../shared/api/runs';
import { Button } from '../../components/Button';
import { DataTable, type ColumnDef } from '../../components/DataTable';
import { EmptyState } from '../../components/EmptyState';
import { Icon } from '../../components/Icon';
import { Loading } from '../../components/LoadState';
import { ErrorNotice } from '../../components/Notice';
import { PageHeader, Section } from '../../components/PageHeader';
import { isApiError } from '../../lib/api';
import { useDocumentTitle } from '../../lib/document-title';
import { formatDate, formatDateTime } from '../../lib/format';
import { useCan } from '../../lib/session';
import { NotFoundPage } from '../errors/NotFoundPage';
import { blockRunsQuery, isFinished } from '../runs/queries';
import { RunProgressBar, RunStateBadge, SeverityCounts } from '../runs/RunState';
import { blockQuery } from './queries';
import { SubmitRunForm } from './SubmitRunForm';

const PAGE_SIZE = 20;

function runColumns(compare: string[], toggle: (run: RunView) => void): ColumnDef<RunView, any>[] {
  return [
    {
      id: 'compare',
      header: () => <span className="sr-only">Choose for comparison</span>,
      cell: ({ row }) =>
        row.original.state === 'succeeded' ? (
          <input
            type="checkbox"
            className="mt-1 size-4 accent-well-700"
            aria-label={`Compare the run of ${formatDateTime(row.original.createdAt)}`}
            checked={compare.includes(row.original.id)}
            disabled={!compare.includes(row.original.id) && compare.length >= 2}
            onChange={() => toggle(row.original)}
          />
        ) : null,
    },
    {
      accessorKey: 'createdAt',
      header: 'Submitted',
      cell: ({ row }) => (
        <Link to={`/runs/${row.original.id}`} className="whitespace-nowrap font-medium tabular-nums text-well-800 hover:underline">
          {formatDateTime(row.original.createdAt)}
        </Link>
      ),
    },
    {
      accessorKey: 'state',
      header: 'State',
      cell: ({ row }) => (
        <div className="space-y-1.5">
          <RunStateBadge state={row.original.state} />
          {!isFinished(row.original.state) && <RunProgressBar run={row.original} compact />}
          {row.original.state === 'failed' && row.original.error && <p className="line-clamp-2 max-w-[16rem] text-xs text-ink-600">{row.original.error}</p>}
        </div>
      ),
    },
    { id: 'deck', header: 'Deck', cell: ({ row }) => <span className="whitespace-nowrap">{`${row.original.deck.name} v${row.original.deck.version}`}</span> },
    { id: 'submitter', header: 'By', cell: ({ row }) => <span className="whitespace-nowrap">{row.original.submitter?.name ?? '—'}</span> },
    { id: 'findings', header: 'Findings', cell: ({ row }) => <SeverityCounts summary={row.original.summary} /> },
    { accessorKey: 'note', header: 'Note', cell: ({ row }) => <span className="line-clamp-2 max-w-[18rem] text-ink-600">{row.original.note || '—'}</span> },
  ];
}

function BlockRuns({ blockId, blockName, canSubmit }: { blockId: string; blockName: string; canSubmit: boolean }) {
  const [page, setPage] = useState(1);
  const [compare, setCompare] = useState<string[]>([]);
  const runs = useQuery(blockRunsQuery(blockId, page, PAGE_SIZE));
  const navigate = useNavigate();

  if (runs.isPending) return <Loading label="Loading the runs…" />;
  if (runs.isError) return <ErrorNotice error={runs.error} title="Could not load the runs" />;
  const { items, total } = runs.data;
  if (total === 0)
    return (
      <EmptyState
        title="No runs of this block yet"
        illustration="well"
        steps={
          canSubmit
            ? [
                'Submit the block’s netlist files (SPICE or CDL, with their includes) and choose the rule deck version to check against.',
                'The run is queued, then checked; its findings appear here and on the run’s own page, beside the netlist lines they point at.',
              ]
            : ['A designer submits the block’s netlist for checking.', 'The run, its progress and its findings then appear here for you to review.']
        }
      >
        Runs of <span className="font-mono">{blockName}</span> will be listed here with their state, the deck version used and their count of errors, warnings and notes.
      </EmptyState>
    );

  const byId = new Map(items.map((r) => [r.id, r]));
  function startCompare() {
    const chosen = compare.map((id) => byId.get(id)).filter((r): r is RunView => Boolean(r));
    if (chosen.length !== 2) return;
    const [head, base] = chosen.sort((a, b) => b.createdAt.localeCompare(a.createdAt));
    navigate(`/runs/${head.id}?tab=compare&base=${base.id}`);
  }

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-center justify-between gap-3 text-sm text-ink-600">
        <p>Tick two finished runs to see what is new, fixed and persisting between them.</p>
        <Button size="sm" disabled={compare.length !== 2} onClick={startCompare}>
          Compare the two runs
        </Button>
      </div>
      <DataTable
        caption={`Runs of ${blockName}, newest first`}
        data={items}
        columns={runColumns(compare, (r) => setCompare((c) => (c.includes(r.id) ? c.filter((x) => x !== r.id) : [...c, r.id])))}
        rowKey={(r) => r.id}
        manualSorting
      />
      {total > PAGE_SIZE && (
        <nav aria-label="Pages of runs" className="flex items-center justify-end gap-2 text-sm text-ink-600">
          <span className="tabular-nums">
            Page {page} of {Math.ceil(total / PAGE_SIZE)} · {total} runs
          </span>
          <Button size="sm" disabled={page <= 1} onClick={() => setPage(page - 1)}>
            Previous page
          </Button>
          <Button size="sm" disabled={page * PAGE_SIZE >= total} onClick={() => setPage(page + 1)}>
            Next page
          </Button>
        </nav>
      )}
    </div>
  );
}

export function BlockPage() {
  const { blockId = '' } = useParams();
  const block = useQuery(blockQuery(blockId));
  const canSubmit = useCan('run.submit');
  const [submitting, setSubmitting] = useState(false);
  const navigate = useNavigate();
  useDocumentTitle(block.data?.name ?? 'Block');

  if (block.isPending) return <Loading label="Loading the block…" />;
  if (block.isError) {
    if (isApiError(block.error) && (block.error.status === 404 || block.error.code === 'validation')) return <NotFoundPage what="block" />;
    return <ErrorNotice error={block.error} title="Could not load the block" />;
  }

  const b = block.data;
  return (
    <>
      <PageHeader
        crumbs={[{ label: 'Blocks', to: '/blocks' }, { label: b.name }]}
        title={<span className="font-mono">{b.name}</span>}
        description={b.description || undefined}
        meta={<span>Created {formatDate(b.createdAt)}</span>}
        actions={
          canSubmit &&
          !submitting && (
            <Button variant="primary" onClick={() => setSubmitting(true)}>
              <Icon name="plus" /> Submit a netlist
            </Button>
          )
        }
      />
      {submitting && <SubmitRunForm blockId={b.id} onCancel={() => setSubmitting(false)} onSubmitted={(run) => navigate(`/runs/${run.id}`)} />}
      <Section title="Runs" description="Each run checks one uploaded netlist of this block against one version of a rule deck.">
        <BlockRuns blockId={b.id} blockName={b.name} canSubmit={canSubmit} />
      </Section>
    </>
  );
}
