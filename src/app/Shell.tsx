import { useEffect, useRef } from 'react';
import { NavLink, Outlet, useLocation, useNavigate } from 'react-router';
import { REVIEW_CAUTION } from '../../shared/findings';
import { can, ROLE_LABELS } from '../../shared/roles';
import { Icon } from '../components/Icon';
import { Logotype } from '../components/Logo';
import { ToneGlyph } from '../design/severity';
import { initials } from '../lib/format';
import { useCurrentUser, useSignOut } from '../lib/session';
import { ACCOUNT_NAVIGATION, NAVIGATION, type NavItem } from './navigation';

function NavEntry({ item }: { item: NavItem }) {
  return (
    <li>
      <NavLink
        to={item.to}
        end={item.end}
        className={({ isActive }) =>
          `group flex items-center gap-2.5 rounded-md px-2.5 py-1.5 text-sm font-medium ${
            isActive ? 'bg-well-50 text-well-800 shadow-[inset_2px_0_0] shadow-well-600' : 'text-ink-700 hover:bg-ink-100 hover:text-ink-900'
          }`
        }
      >
        {({ isActive }) => (
          <>
            <Icon name={item.icon} className={`size-4 ${isActive ? 'text-well-700' : 'text-ink-500 group-hover:text-ink-700'}`} />
            {item.label}
          </>
        )}
      </NavLink>
    </li>
  );
}

function Sidebar() {
  const user = useCurrentUser();
  const signOut = useSignOut();
  const navigate = useNavigate();
  const groups = NAVIGATION.map((g) => ({ ...g, items: g.items.filter((i) => can(user.roles, i.permission)) })).filter((g) => g.items.length > 0);
  const account = ACCOUNT_NAVIGATION.filter((i) => can(user.roles, i.permission));

  return (
    <div className="kw-no-print w-60 shrink-0 border-r border-ink-200 bg-white">
      <aside className="sticky top-0 flex h-screen flex-col">
        <div className="flex h-16 items-center px-5">
          <NavLink to="/" className="rounded-sm" aria-label="Keepwell overview">
            <Logotype size={26} />
          </NavLink>
        </div>
        {user.teamName && (
          <div className="mx-3 mb-2 rounded-md border border-ink-200 bg-ink-50 px-2.5 py-2">
            <p className="text-[11px] font-semibold uppercase tracking-wider text-ink-500">Team</p>
            <p className="text-sm font-medium leading-snug text-ink-900">{user.teamName}</p>
          </div>
        )}
        <nav aria-label="Main" className="flex-1 overflow-y-auto px-3 py-2">
          {groups.map((group) => (
            <div key={group.label} className="mb-4">
              <h2 className="mb-1 px-2.5 text-[11px] font-semibold uppercase tracking-wider text-ink-500">{group.label}</h2>
              <ul className="space-y-0.5">
                {group.items.map((item) => (
                  <NavEntry key={item.to} item={item} />
                ))}
              </ul>
            </div>
          ))}
        </nav>
        <div className="border-t border-ink-200 p-3">
          {account.length > 0 && (
            <nav aria-label="Account" className="mb-2">
              <ul className="space-y-0.5">
                {account.map((item) => (
                  <NavEntry key={item.to} item={item} />
                ))}
              </ul>
            </nav>
          )}
          <div className="flex items-center gap-2.5 rounded-md px-1.5 py-1.5">
            <span aria-hidden="true" className="flex size-8 shrink-0 items-center justify-center rounded-full bg-well-700 text-xs font-semibold text-white">
              {initials(user.name)}
            </span>
            <div className="min-w-0 flex-1" aria-label="Signed in as">
              <p className="truncate text-sm font-medium text-ink-900" title={user.email}>
                {user.name}
              </p>
              <p className="truncate text-xs text-ink-500" data-testid="user-roles">
                {user.roles.map((r) => ROLE_LABELS[r]).join(', ')}
              </p>
            </div>
          </div>
          <button
            type="button"
            onClick={() => signOut.mutate(undefined, { onSettled: () => navigate('/sign-in', { replace: true }) })}
            disabled={signOut.isPending}
            className="mt-1 flex w-full items-center gap-2.5 rounded-md px-2.5 py-1.5 text-sm font-medium text-ink-700 hover:bg-ink-100 hover:text-ink-900"
          >
            <Icon name="signOut" className="size-4 text-ink-500" />
            Sign out
          </button>
        </div>
      </aside>
    </div>
  );
}

export function Shell() {
  const location = useLocation();
  const mainRef = useRef<HTMLElement>(null);
  const firstRender = useRef(true);

  // After navigating, put keyboard focus at the start of the new page's content.
  useEffect(() => {
    if (firstRender.current) {
      firstRender.current = false;
      return;
    }
    mainRef.current?.focus({ preventScroll: true });
    window.scrollTo?.(0, 0);
  }, [location.pathname]);

  return (
    <div className="flex min-h-screen">
      <a
        href="#main"
        className="fixed left-3 top-3 z-50 -translate-y-24 rounded-md bg-well-800 px-3 py-2 text-sm font-medium text-white shadow-md focus:translate-y-0"
      >
        Skip to content
      </a>
      <Sidebar />
      <div className="flex min-w-0 flex-1 flex-col">
        <main id="main" ref={mainRef} tabIndex={-1} className="flex-1 px-8 py-8 focus:outline-none 2xl:px-12">
          <div className="mx-auto max-w-page">
            <Outlet />
          </div>
        </main>
        <footer className="border-t border-ink-200 bg-white px-8 py-3 2xl:px-12">
          <p className="mx-auto flex max-w-page items-center gap-2 text-xs text-ink-600">
            <ToneGlyph tone="info" size={12} />
            <span>{REVIEW_CAUTION}</span>
          </p>
        </footer>
      </div>
    </div>
  );
}
