import { useParams } from 'react-router';
import { EmptyState } from '../../components/EmptyState';
import { PageHeader } from '../../components/PageHeader';
import { useDocumentTitle } from '../../lib/document-title';

export function ReviewReportPage() {
  const { runId = '' } = useParams();
  useDocumentTitle('Review report');
  return (
    <>
      <PageHeader crumbs={[{ label: 'Blocks', to: '/blocks' }, { label: 'Run', to: `/runs/${encodeURIComponent(runId)}` }, { label: 'Review report' }]} title="Review report" />
      <EmptyState
        title="No report for this run yet"
        illustration="list"
        steps={['Wait for the run to finish.', 'Open the report from the run’s page to read, print or download it for the review meeting.']}
      >
        The review report will gather one finished run’s findings, the waivers that apply to them with their justifications, and the deck version used, in a form to
        print or share.
      </EmptyState>
    </>
  );
}
