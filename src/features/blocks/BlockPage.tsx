import { useQuery } from '@tanstack/react-query';
import { useParams } from 'react-router';
import { EmptyState } from '../../components/EmptyState';
import { Loading } from '../../components/LoadState';
import { ErrorNotice } from '../../components/Notice';
import { PageHeader, Section } from '../../components/PageHeader';
import { isApiError } from '../../lib/api';
import { useDocumentTitle } from '../../lib/document-title';
import { formatDate } from '../../lib/format';
import { useCan } from '../../lib/session';
import { NotFoundPage } from '../errors/NotFoundPage';
import { blockQuery } from './queries';

export function BlockPage() {
  const { blockId = '' } = useParams();
  const block = useQuery(blockQuery(blockId));
  const canSubmit = useCan('run.submit');
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
      />
      <Section title="Runs" description="Each run checks one uploaded netlist of this block against one version of a rule deck.">
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
          Runs of <span className="font-mono">{b.name}</span> will be listed here with their state, the deck version used and their count of errors, warnings and
          notes.
        </EmptyState>
      </Section>
    </>
  );
}
