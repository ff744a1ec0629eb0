import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router';
import { ButtonLink } from '../../components/Button';
import { EmptyState } from '../../components/EmptyState';
import { Loading } from '../../components/LoadState';
import { ErrorNotice } from '../../components/Notice';
import { PageHeader, Panel, Section } from '../../components/PageHeader';
import { useDocumentTitle } from '../../lib/document-title';
import { formatDate, formatDateTime } from '../../lib/format';
import { useCan, useCurrentUser } from '../../lib/session';
import { blocksQuery } from '../blocks/queries';
import { isFinished, recentRunsQuery } from '../runs/queries';
import { RunProgressBar, RunStateBadge, SeverityCounts } from '../runs/RunState';

const RECENT_BLOCKS = 6;
const RECENT_RUNS = 8;

function RecentRuns() {
  const runs = useQuery(recentRunsQuery(RECENT_RUNS));
  if (runs.isPending) return <Loading label="Loading the runs…" />;
  if (runs.isError) return <ErrorNotice error={runs.error} title="Could not load the runs" />;
  if (runs.data.items.length === 0)
    return (
      <EmptyState
        compact
        title="No runs yet"
        illustration="well"
        steps={['Open a block and submit its netlist for a check.', 'Queued, running and finished runs then appear here, newest first, with their error and warning counts.']}
      >
        Runs of your team’s blocks will be listed here as soon as they are submitted, so you can follow them from queue to findings.
      </EmptyState>
    );
  return (
    <Panel>
      <ul className="divide-y divide-ink-100" aria-label="Recent runs">
        {runs.data.items.map((run) => (
          <li key={run.id}>
            <Link to={`/runs/${run.id}`} className="flex flex-wrap items-center justify-between gap-x-4 gap-y-2 px-4 py-3 hover:bg-ink-50">
              <span className="min-w-0">
                <span className="block truncate font-mono text-sm font-medium text-well-800">{run.block.name}</span>
                <span className="block text-xs tabular-nums text-ink-500">
                  {formatDateTime(run.createdAt)}
                  {run.submitter ? ` · ${run.submitter.name}` : ''} · {run.deck.name} v{run.deck.version}
                </span>
              </span>
              <span className="flex shrink-0 items-center gap-3">
                {run.state === 'succeeded' ? <SeverityCounts summary={run.summary} /> : <RunStateBadge state={run.state} />}
                {!isFinished(run.state) && <RunProgressBar run={run} compact />}
              </span>
            </Link>
          </li>
        ))}
      </ul>
      {runs.data.total > runs.data.items.length && (
        <p className="border-t border-ink-100 px-4 py-2 text-xs text-ink-500">
          {runs.data.total - runs.data.items.length} earlier run{runs.data.total - runs.data.items.length === 1 ? '' : 's'} on the blocks’ pages.
        </p>
      )}
    </Panel>
  );
}

export function HomePage() {
  useDocumentTitle('Overview');
  const user = useCurrentUser();
  const blocks = useQuery(blocksQuery);
  const canCreate = useCan('block.create');
  const recent = blocks.data ? [...blocks.data].sort((a, b) => b.createdAt.localeCompare(a.createdAt)).slice(0, RECENT_BLOCKS) : [];

  return (
    <>
      <PageHeader title="Overview" description={user.teamName ? `What ${user.teamName} is checking, and what needs a look.` : 'What your team is checking, and what needs a look.'} />
      <div className="grid gap-8 xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <Section title="Recent runs" description="The latest check runs of every block of your team.">
          <RecentRuns />
        </Section>
        <Section
          title="Blocks"
          actions={
            blocks.data && blocks.data.length > 0 ? (
              <Link to="/blocks" className="text-sm font-medium text-well-700 hover:underline">
                All blocks ({blocks.data.length})
              </Link>
            ) : undefined
          }
        >
          {blocks.isPending && <Loading label="Loading blocks…" />}
          {blocks.isError && <ErrorNotice error={blocks.error} title="Could not load the blocks" />}
          {blocks.data && recent.length === 0 && (
            <EmptyState
              compact
              title="No blocks yet"
              illustration="list"
              action={
                canCreate ? (
                  <ButtonLink to="/blocks" variant="primary">
                    Go to blocks
                  </ButtonLink>
                ) : undefined
              }
            >
              {canCreate ? 'Create your team’s first block on the Blocks page; its runs will then show up here.' : 'A designer or methodology owner creates blocks; they will be listed here.'}
            </EmptyState>
          )}
          {recent.length > 0 && (
            <Panel>
              <ul className="divide-y divide-ink-100">
                {recent.map((b) => (
                  <li key={b.id}>
                    <Link to={`/blocks/${b.id}`} className="flex items-baseline justify-between gap-4 px-4 py-3 hover:bg-ink-50">
                      <span className="min-w-0">
                        <span className="block truncate font-mono text-sm font-medium text-well-800">{b.name}</span>
                        {b.description && <span className="block truncate text-sm text-ink-500">{b.description}</span>}
                      </span>
                      <span className="shrink-0 text-xs tabular-nums text-ink-500">{formatDate(b.createdAt)}</span>
                    </Link>
                  </li>
                ))}
              </ul>
            </Panel>
          )}
        </Section>
      </div>
    </>
  );
}
