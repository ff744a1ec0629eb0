import { EmptyState } from '../../components/EmptyState';
import { PageHeader } from '../../components/PageHeader';
import { useDocumentTitle } from '../../lib/document-title';
import { useCan } from '../../lib/session';

export function WaiversPage() {
  useDocumentTitle('Waivers');
  const canRequest = useCan('waiver.request');
  const canDecide = useCan('waiver.decide');
  const steps = [
    canRequest
      ? 'On a run’s page, choose a finding you have reviewed and ask to waive it, with a justification a reviewer can check.'
      : 'A designer asks to waive a finding from a run’s page, with a justification.',
    canDecide ? 'You approve or reject each request; approved waivers then apply to later runs of the same block.' : 'A reviewer approves or rejects the request; approved waivers apply to later runs of the same block.',
  ];
  return (
    <>
      <PageHeader title="Waivers" description="A waiver records that a finding was reviewed and accepted, by whom and why. Findings it covers show as waived instead of open." />
      <EmptyState title="No waivers yet" illustration="list" steps={steps}>
        Requested, approved, rejected and revoked waivers of your team will be listed here with their justification, scope and expiry.
      </EmptyState>
    </>
  );
}
