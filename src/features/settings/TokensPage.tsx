import { EmptyState } from '../../components/EmptyState';
import { PageHeader } from '../../components/PageHeader';
import { useDocumentTitle } from '../../lib/document-title';

export function TokensPage() {
  useDocumentTitle('API tokens');
  return (
    <>
      <PageHeader
        crumbs={[{ label: 'Settings' }, { label: 'API tokens' }]}
        title="Personal API tokens"
        description="A token lets scripts and continuous-integration jobs use Keepwell as you, without your password: read results, or also submit runs."
      />
      <EmptyState
        title="No tokens yet"
        illustration="key"
        steps={['Create a token with a name that says where it will be used, and choose whether it may only read or also submit runs.', 'Copy it when it is shown: Keepwell stores only a hash and cannot show it again.', 'Revoke it here when the job or machine no longer needs it.']}
      >
        Your tokens will be listed here with their scope, when each was created and when it was last used.
      </EmptyState>
    </>
  );
}
