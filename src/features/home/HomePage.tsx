import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router';
import { ButtonLink } from '../../components/Button';
import { EmptyState } from '../../components/EmptyState';
import { Loading } from '../../components/LoadState';
import { ErrorNotice } from '../../components/Notice';
import { PageHeader, Panel, Section } from '../../components/PageHeader';
import { useDocumentTitle } from '../../lib/document-title';
import { formatDate } from '../../lib/format';
import { useCan, useCurrentUser } from '../../lib/session';
import { blocksQuery } from '../blocks/queries';

const RECENT_BLOCKS = 6;

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
          <EmptyState
            compact
            title="No runs yet"
            illustration="well"
            steps={['Open a block and submit its netlist for a check.', 'Queued, running and finished runs then appear here, newest first, with their error and warning counts.']}
          >
            Runs of your team’s blocks will be listed here as soon as they are submitted, so you can follow them from queue to findings.
          </EmptyState>
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
