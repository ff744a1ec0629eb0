import { ButtonLink } from '../../components/Button';
import { EmptyState } from '../../components/EmptyState';
import { useDocumentTitle } from '../../lib/document-title';

export function NotFoundPage({ what = 'page' }: { what?: string }) {
  useDocumentTitle('Not found');
  return (
    <div className="pt-8">
      <EmptyState
        title={`No such ${what}`}
        illustration="lost"
        action={
          <ButtonLink to="/" variant="primary">
            Go to the overview
          </ButtonLink>
        }
      >
        The address may be mistyped, or the {what} was removed or belongs to another team. Links from findings and e-mails always point to the {what} as it was
        when they were made.
      </EmptyState>
    </div>
  );
}
