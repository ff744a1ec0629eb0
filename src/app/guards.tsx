import type { ReactNode } from 'react';
import { Navigate, Outlet, useLocation } from 'react-router';
import { can, type Permission } from '../../shared/roles';
import { Button } from '../components/Button';
import { EmptyState } from '../components/EmptyState';
import { ErrorNotice } from '../components/Notice';
import { CurrentUserContext, useSession } from '../lib/session';
import { Splash } from './Splash';

/** Everything under this route needs a signed-in user; others are sent to sign-in and brought back after. */
export function RequireSession() {
  const session = useSession();
  const location = useLocation();
  if (session.isPending) return <Splash />;
  if (session.isError)
    return (
      <Splash>
        <div className="w-full max-w-md space-y-4">
          <ErrorNotice error={session.error} title="Keepwell could not check your session" />
          <Button variant="primary" busy={session.isFetching} onClick={() => session.refetch()}>
            Try again
          </Button>
        </div>
      </Splash>
    );
  if (!session.data) {
    const next = location.pathname + location.search;
    return <Navigate to={next === '/' ? '/sign-in' : `/sign-in?next=${encodeURIComponent(next)}`} replace />;
  }
  return (
    <CurrentUserContext value={session.data}>
      <Outlet />
    </CurrentUserContext>
  );
}

/** Pages for some roles only. The server refuses the data anyway; this explains why instead of failing. */
export function RequirePermission({ permission, children }: { permission: Permission; children: ReactNode }) {
  const { data: user } = useSession();
  if (can(user?.roles, permission)) return <>{children}</>;
  return (
    <EmptyState title="Not available with your roles" illustration="lost">
      This page belongs to roles you do not hold. An administrator of your team can change your roles on the Users page.
    </EmptyState>
  );
}
