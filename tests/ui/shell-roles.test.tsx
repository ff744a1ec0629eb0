import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import type { User } from '../../shared/api/auth';
import { adminUsers, blocks, users } from './fixtures';
import { apiError, fakeApi, json, renderApp, sessionRoutes } from './support';

// Expected visibility follows the agreed permission table in shared/roles.ts (the contract the
// server enforces): user.manage and outbox.read belong to administrators only, block.create to
// designers, methodology owners and administrators.

function pageRoutes(user: User) {
  return {
    ...sessionRoutes(user),
    'GET /api/blocks': () => json(200, { items: blocks }),
    'GET /api/admin/users': () => json(200, { items: adminUsers }),
  };
}

async function mainNav() {
  return within(await screen.findByRole('navigation', { name: 'Main' }));
}

describe('role-aware shell', () => {
  it('a designer sees the review pages but no Administration', async () => {
    fakeApi(pageRoutes(users.designer));
    renderApp('/');
    const nav = await mainNav();
    expect(nav.getByRole('link', { name: 'Blocks' })).toBeInTheDocument();
    expect(nav.getByRole('link', { name: 'Rule decks' })).toBeInTheDocument();
    expect(nav.queryByText('Administration')).not.toBeInTheDocument();
    expect(nav.queryByRole('link', { name: 'Users & invitations' })).not.toBeInTheDocument();
    expect(nav.queryByRole('link', { name: 'Outbox' })).not.toBeInTheDocument();
  });

  it('an administrator sees Administration with users and the outbox', async () => {
    fakeApi(pageRoutes(users.admin));
    renderApp('/');
    const nav = await mainNav();
    expect(nav.getByText('Administration')).toBeInTheDocument();
    expect(nav.getByRole('link', { name: 'Users & invitations' })).toHaveAttribute('href', '/admin/users');
    expect(nav.getByRole('link', { name: 'Outbox' })).toHaveAttribute('href', '/admin/outbox');
  });

  it('shows the signed-in user’s name, roles and team', async () => {
    fakeApi(pageRoutes(users.methodology));
    renderApp('/');
    expect(await screen.findByText('Priya Raman')).toBeInTheDocument();
    expect(screen.getByTestId('user-roles')).toHaveTextContent('Methodology owner');
    expect(screen.getAllByText('Larkspur Silicon · Core datapath').length).toBeGreaterThan(0);
  });

  it('offers “New block” only to roles that may create blocks', async () => {
    fakeApi(pageRoutes(users.designer));
    const designer = renderApp('/blocks');
    expect(await screen.findByRole('button', { name: /New block/ })).toBeInTheDocument();
    designer.unmount();

    fakeApi(pageRoutes(users.reviewer));
    renderApp('/blocks');
    expect(await screen.findByRole('link', { name: 'lk_rf_64x32' })).toBeInTheDocument();
    expect(screen.queryByRole('button', { name: /New block/ })).not.toBeInTheDocument();
  });

  it('a designer who opens an admin address gets an explanation, and no admin data is asked for', async () => {
    const api = fakeApi(pageRoutes(users.designer));
    renderApp('/admin/users');
    expect(await screen.findByRole('heading', { name: 'Not available with your roles' })).toBeInTheDocument();
    expect(api.callsTo('GET /api/admin/users')).toHaveLength(0);
  });

  it('the footer carries the review caution wherever results are read', async () => {
    fakeApi(pageRoutes(users.designer));
    renderApp('/runs/7f000000-0000-4000-8000-000000000001');
    const footer = await screen.findByRole('contentinfo');
    expect(footer).toHaveTextContent('never replace the foundry’s design rules or the team’s sign-off');
  });

  it('signing out ends the session and returns to sign-in', async () => {
    const api = fakeApi(pageRoutes(users.designer));
    const { router } = renderApp('/blocks');
    await userEvent.setup().click(await screen.findByRole('button', { name: 'Sign out' }));
    await waitFor(() => expect(router.state.location.pathname).toBe('/sign-in'));
    expect(api.callsTo('POST /api/auth/logout')).toHaveLength(1);
    expect(await screen.findByRole('heading', { name: 'Sign in to Keepwell' })).toBeInTheDocument();
  });

  it('a visitor without a session is sent to sign-in with the way back', async () => {
    fakeApi(sessionRoutes(null));
    const { router } = renderApp('/blocks/a1000000-0000-4000-8000-000000000002');
    await waitFor(() => expect(router.state.location.pathname).toBe('/sign-in'));
    expect(router.state.location.search).toBe(`?next=${encodeURIComponent('/blocks/a1000000-0000-4000-8000-000000000002')}`);
  });

  it('a 401 from any call (session expired meanwhile) sends the user to sign-in', async () => {
    // RFC 9110 §15.5.2: the credentials (here the session cookie) are no longer valid.
    fakeApi({ ...sessionRoutes(users.designer), 'GET /api/blocks': () => apiError(401, 'unauthenticated', 'Your session has ended.') });
    const { router } = renderApp('/blocks');
    await waitFor(() => expect(router.state.location.pathname).toBe('/sign-in'));
    expect(router.state.location.search).toBe('?next=%2Fblocks');
  });
});
