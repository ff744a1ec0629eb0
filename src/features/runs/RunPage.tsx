import { useParams } from 'react-router';
import { ButtonLink } from '../../components/Button';
import { EmptyState } from '../../components/EmptyState';
import { PageHeader, Section } from '../../components/PageHeader';
import { ToneBadge } from '../../design/severity';
import { useDocumentTitle } from '../../lib/document-title';

export function RunPage() {
  const { runId = '' } = useParams();
  useDocumentTitle('Run');
  return (
    <>
      <PageHeader
        crumbs={[{ label: 'Blocks', to: '/blocks' }, { label: 'Run' }]}
        title="Run"
        meta={<span className="font-mono text-xs">{runId}</span>}
        actions={<ButtonLink to={`/runs/${encodeURIComponent(runId)}/report`}>Review report</ButtonLink>}
      />
      <Section title="Findings">
        <EmptyState
          title="Run details are not available here yet"
          illustration="well"
          steps={[
            'A run is started from its block’s page, or from the command line with a personal API token.',
            'While it is queued or running, this page shows its progress; when it finishes, the summary and every finding appear here.',
            'Choose a finding to see the netlist beside it with the offending lines marked, and its curves or budget where the rule measures one.',
          ]}
        >
          This page will show the run’s summary (cells, devices, deck version, time taken), then its findings by severity:
          <span className="mt-3 flex flex-wrap justify-center gap-2">
            <ToneBadge tone="error" />
            <ToneBadge tone="warning" />
            <ToneBadge tone="info" />
            <ToneBadge tone="waived" />
          </span>
        </EmptyState>
      </Section>
    </>
  );
}
