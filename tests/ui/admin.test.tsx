import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import { adminUsers, outbox, users } from './fixtures';
import { apiError, fakeApi, json, renderApp, sessionRoutes } from './support';

const summaries = outbox.map(({ text: _t, html: _h, ...s }) => s);

function adminRoutes() {
  return {
    ...sessionRoutes(users.admin),
    'GET /api/admin/users': () => json(200, { items: adminUsers }),
  };
}

describe('users and invitations', () => {
  it('lists the team with roles and status words', async () => {
    fakeApi(adminRoutes());
    renderApp('/admin/users');
    const table = await screen.findByRole('table', { name: 'Team members' });
    const juno = within(table).getByText('Juno Asante').closest('tr')!;
    expect(within(juno).getByText('Invited')).toBeInTheDocument();
    expect(within(juno).getByText('Never')).toBeInTheDocument();
    const ravi = within(table).getByText('Ravi Castellanos').closest('tr')!;
    expect(within(ravi).getByText('Disabled')).toBeInTheDocument();
    expect(within(ravi).getByRole('button', { name: 'Enable' })).toBeInTheDocument();
    // An administrator cannot lock themself out from this page.
    const me = within(table).getByText('Ines Okafor').closest('tr')!;
    expect(within(me).queryByRole('button', { name: /Disable/ })).not.toBeInTheDocument();
  });

  it('the invite form checks its fields with the shared schema before sending', async () => {
    const api = fakeApi({ ...adminRoutes(), 'POST /api/admin/invitations': () => json(201, {}) });
    renderApp('/admin/users');
    const user = userEvent.setup();
    await user.click(await screen.findByRole('button', { name: /Invite someone/ }));
    const form = screen.getByRole('form', { name: 'Invite someone' });

    await user.click(within(form).getByRole('checkbox', { name: 'Designer' })); // untick the default
    await user.click(within(form).getByRole('button', { name: 'Send invitation' }));
    expect(await within(form).findByText('Enter an e-mail address.')).toBeInTheDocument();
    expect(within(form).getByText('This cannot be empty.')).toBeInTheDocument();
    expect(within(form).getByText('Choose at least one.')).toBeInTheDocument();
    expect(api.callsTo('POST /api/admin/invitations')).toHaveLength(0);

    await user.type(within(form).getByLabelText('Name'), 'Mara Quist');
    await user.type(within(form).getByLabelText('E-mail address'), 'Mara.Quist@Larkspur.example');
    await user.click(within(form).getByRole('checkbox', { name: 'Reviewer' }));
    await user.click(within(form).getByRole('checkbox', { name: 'Methodology owner' }));
    await user.click(within(form).getByRole('button', { name: 'Send invitation' }));

    expect(await screen.findByText('Invitation sent')).toBeInTheDocument();
    // Roles are sent in the order shared/roles.ts lists them; the address trimmed and lower-cased.
    expect(api.callsTo('POST /api/admin/invitations')[0].body).toEqual({ name: 'Mara Quist', email: 'mara.quist@larkspur.example', roles: ['methodology', 'reviewer'] });
  });

  it('an invitation to someone already on the team is reported on the address field', async () => {
    // RFC 9110 §15.5.10: 409 Conflict, the request conflicts with the current state of the resource.
    fakeApi({ ...adminRoutes(), 'POST /api/admin/invitations': () => apiError(409, 'conflict', 'A user with this e-mail exists.') });
    renderApp('/admin/users');
    const user = userEvent.setup();
    await user.click(await screen.findByRole('button', { name: /Invite someone/ }));
    const form = screen.getByRole('form', { name: 'Invite someone' });
    await user.type(within(form).getByLabelText('Name'), 'Tomas again');
    await user.type(within(form).getByLabelText('E-mail address'), users.designer.email);
    await user.click(within(form).getByRole('button', { name: 'Send invitation' }));
    expect(await within(form).findByText('Someone with this e-mail address is already on the team or invited.')).toBeInTheDocument();
    expect(within(form).getByLabelText('E-mail address')).toHaveAttribute('aria-invalid', 'true');
  });

  it('edits roles and sends them with PATCH', async () => {
    const api = fakeApi({
      ...adminRoutes(),
      'PATCH /api/admin/users/:id': ({ params, body }) => json(200, { user: { ...adminUsers.find((u) => u.id === params.id)!, ...(body as object) } }),
    });
    renderApp('/admin/users');
    const user = userEvent.setup();
    await user.click(await screen.findByRole('button', { name: 'Edit roles of Tomas Lindqvist' }));
    const editor = screen.getByRole('form', { name: 'Roles of Tomas Lindqvist' });
    await user.click(within(editor).getByRole('checkbox', { name: 'Designer' }));
    expect(within(editor).getByRole('button', { name: 'Save roles' })).toBeDisabled();
    expect(within(editor).getByText(/Choose at least one role/)).toBeInTheDocument();
    await user.click(within(editor).getByRole('checkbox', { name: 'Reviewer' }));
    await user.click(within(editor).getByRole('button', { name: 'Save roles' }));
    await waitFor(() => expect(api.callsTo(`PATCH /api/admin/users/${users.designer.id}`)).toHaveLength(1));
    expect(api.callsTo(`PATCH /api/admin/users/${users.designer.id}`)[0].body).toEqual({ roles: ['reviewer'] });
  });
});

describe('outbox', () => {
  it('asks for one page at a time and moves between pages', async () => {
    const api = fakeApi({
      ...sessionRoutes(users.admin),
      'GET /api/admin/outbox': ({ url }) => {
        const page = Number(url.searchParams.get('page'));
        return json(200, { items: page === 1 ? summaries.slice(0, 2) : summaries.slice(2), total: 27, page, pageSize: 25 });
      },
    });
    renderApp('/admin/outbox');
    expect(await screen.findByText('27 messages · page 1 of 2')).toBeInTheDocument();
    expect(screen.getByRole('button', { name: '← Newer' })).toBeDisabled();
    await userEvent.setup().click(screen.getByRole('button', { name: 'Older →' }));
    expect(await screen.findByText('27 messages · page 2 of 2')).toBeInTheDocument();
    expect(screen.getByText('Failed')).toBeInTheDocument();
    // (React's StrictMode may ask for a page twice in development; what matters is which pages.)
    const searches = api.callsTo('GET /api/admin/outbox').map((c) => new URLSearchParams(c.search));
    expect([...new Set(searches.map((s) => s.get('page')))]).toEqual(['1', '2']);
    expect(new Set(searches.map((s) => s.get('pageSize')))).toEqual(new Set(['25']));
  });

  it('shows a message as text, and its HTML only in a sandbox that runs nothing', async () => {
    const message = outbox[0];
    fakeApi({ ...sessionRoutes(users.admin), 'GET /api/admin/outbox/:id': ({ params }) => json(200, outbox.find((m) => m.id === params.id)) });
    renderApp(`/admin/outbox/${message.id}`);
    expect(await screen.findByRole('heading', { level: 1, name: message.subject })).toBeInTheDocument();
    expect(screen.getByText(/accept-invite\?token=demo-token-not-real/)).toBeInTheDocument();
    await userEvent.setup().click(screen.getByRole('tab', { name: 'Formatted' }));
    const frame = screen.getByTitle('Formatted message');
    // HTML Living Standard, the iframe sandbox attribute: an empty value applies every
    // restriction (no scripts, no forms, no top navigation, a unique origin).
    expect(frame).toHaveAttribute('sandbox', '');
    // CSP Level 3: default-src 'none' forbids every fetch the mail's HTML could make.
    expect(frame.getAttribute('srcdoc')).toMatch(/^<meta http-equiv="Content-Security-Policy" content="default-src 'none';/);
  });
});
