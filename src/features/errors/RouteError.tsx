import { isRouteErrorResponse, useRouteError } from 'react-router';
import { ButtonLink } from '../../components/Button';
import { ErrorNotice } from '../../components/Notice';

/** A page that failed while rendering: say so plainly and offer a way out, never a stack trace. */
export function RouteError() {
  const error = useRouteError();
  const message = isRouteErrorResponse(error) ? new Error(`${error.status} ${error.statusText}`) : error;
  return (
    <div className="mx-auto max-w-xl px-6 py-16">
      <ErrorNotice error={message} title="This page could not be shown" />
      <p className="mt-4 text-sm text-ink-600">Reloading often helps. If it keeps happening, tell your administrator what you were doing and when.</p>
      <div className="mt-6 flex gap-2">
        <ButtonLink to="/" variant="primary" reloadDocument>
          Go to the overview
        </ButtonLink>
      </div>
    </div>
  );
}
