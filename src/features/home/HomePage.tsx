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
import { waiverListQuery } from '../waivers/queries';

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

const PENDING_SHOWN = 5;

/**
 * Waiver requests waiting for a decision: every pending one for a reviewer, the user's own for a designer. Shown only
 * while there are some, so that the overview says what needs a look.
 */
function PendingWaivers({ mine }: { mine: boolean }) {
  const pending = useQuery(waiverListQuery({ standing: ['pending'], mine, page: 1 }));
  if (!pending.data || pending.data.total === 0) return null;
  const { items, total } = pending.data;
  const href = `/waivers?standing=pending${mine ? '&mine=true' : ''}`;
  return (
    <Section
      title={mine ? 'Your waiver requests' : 'Waiver requests to decide'}
      description={mine ? 'Asked for and still waiting for a reviewer.' : 'Designers are waiting for a reviewer’s decision on these.'}
      actions={
        <Link to={href} className="whitespace-nowrap text-sm font-medium text-well-700 hover:underline">
          All pending ({total})
        </Link>
      }
    >
      <Panel>
        <ul className="divide-y divide-ink-100" aria-label={mine ? 'Your pending waiver requests' : 'Waiver requests to decide'}>
          {items.slice(0, PENDING_SHOWN).map((w) => (
            <li key={w.id}>
              <Link to={`/waivers/${w.id}`} className="block px-4 py-3 hover:bg-ink-50">
                <span className="block truncate text-sm">
                  <span className="font-mono font-medium text-well-800">{w.ruleId}</span>
                  {w.cell && (
                    <>
                      {' in '}
                      <span className="font-mono">{w.cell}</span>
                    </>
                  )}
                </span>
                <span className="block truncate text-xs text-ink-500">
                  {w.block ? `${w.block.name} · ` : ''}
                  {!mine && w.requester ? `asked by ${w.requester.name}, ` : ''}
                  {formatDate(w.createdAt)}
                </span>
              </Link>
            </li>
          ))}
        </ul>
      </Panel>
    </Section>
  );
}

export function HomePage() {
  useDocumentTitle('Overview');
  const user = useCurrentUser();
  const blocks = useQuery(blocksQuery);
  const canCreate = useCan('block.create');
  const canDecide = useCan('waiver.decide');
  const canRequest = useCan('waiver.request');
  const recent = blocks.data ? [...blocks.data].sort((a, b) => b.createdAt.localeCompare(a.createdAt)).slice(0, RECENT_BLOCKS) : [];

  return (
    <>
      <PageHeader title="Overview" description={user.teamName ? `What ${user.teamName} is checking, and what needs a look.` : 'What your team is checking, and what needs a look.'} />
      <div className="grid gap-8 xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <Section title="Recent runs" description="The latest check runs of every block of your team.">
          <RecentRuns />
        </Section>
        <div>
          {(canDecide || canRequest) && <PendingWaivers mine={!canDecide} />}
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
      </div>
    </>
  );
}
