import { screen, waitFor } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import { users } from './fixtures';
import { apiError, fakeApi, json, renderApp, sessionRoutes } from './support';

const blocksRoute = { 'GET /api/blocks': () => json(200, { items: [] }) };

describe('sign-in form', () => {
  it('shows what is wrong with each field and sends nothing until it is right', async () => {
    const api = fakeApi({ ...sessionRoutes(null) });
    renderApp('/sign-in');
    const user = userEvent.setup();

    await user.click(await screen.findByRole('button', { name: 'Sign in' }));
    expect(await screen.findByText('Enter an e-mail address.')).toBeInTheDocument();
    expect(screen.getByText('This cannot be empty.')).toBeInTheDocument();
    expect(screen.getByLabelText('E-mail address')).toHaveAttribute('aria-invalid', 'true');

    // RFC 5321 §4.5.3.1.3 limits a path to 256 octets including the angle brackets, so an
    // address longer than 254 characters cannot be delivered and is refused here.
    const tooLong = `${'a'.repeat(64)}@${'b'.repeat(63)}.${'c'.repeat(63)}.${'d'.repeat(57)}.example`;
    expect(tooLong.length).toBeGreaterThan(254);
    await user.type(screen.getByLabelText('E-mail address'), tooLong);
    await user.type(screen.getByLabelText('Password'), 'correct horse');
    await user.click(screen.getByRole('button', { name: 'Sign in' }));
    expect(await screen.findByText('Use at most 254 characters.')).toBeInTheDocument();

    // An address without a domain part is not an address (RFC 5322 §3.4.1 addr-spec = local-part "@" domain).
    await user.clear(screen.getByLabelText('E-mail address'));
    await user.type(screen.getByLabelText('E-mail address'), 'tomas.lindqvist@');
    await user.click(screen.getByRole('button', { name: 'Sign in' }));
    expect(await screen.findByText('That does not look like an e-mail address.')).toBeInTheDocument();

    expect(api.callsTo('POST /api/auth/login')).toHaveLength(0);
  });

  it('says the credentials do not match when the server answers 401, and stays on the form', async () => {
    // RFC 9110 §15.5.2: 401 means the request lacks valid authentication credentials.
    const api = fakeApi({
      ...sessionRoutes(null),
      'POST /api/auth/login': () => apiError(401, 'invalid-credentials', 'E-mail or password is wrong.'),
    });
    const { router } = renderApp('/sign-in');
    const user = userEvent.setup();

    await user.type(await screen.findByLabelText('E-mail address'), users.designer.email);
    await user.type(screen.getByLabelText('Password'), 'not the password');
    await user.click(screen.getByRole('button', { name: 'Sign in' }));

    const alert = await screen.findByRole('alert');
    expect(alert).toHaveTextContent('That e-mail address and password do not match an active account.');
    expect(router.state.location.pathname).toBe('/sign-in');
    expect(api.callsTo('POST /api/auth/login')).toHaveLength(1);
    // The failed 401 of a sign-in attempt is an answer, not a lost session: no redirect loop.
    expect(api.calls.filter((c) => c.path === '/api/auth/me')).toHaveLength(1);
  });

  it('explains a 429 as too many attempts', async () => {
    // RFC 6585 §4: 429 Too Many Requests, the user has sent too many requests in a given time.
    fakeApi({ ...sessionRoutes(null), 'POST /api/auth/login': () => apiError(429, 'rate-limited', 'Too many sign-in attempts.') });
    renderApp('/sign-in');
    const user = userEvent.setup();
    await user.type(await screen.findByLabelText('E-mail address'), users.designer.email);
    await user.type(screen.getByLabelText('Password'), 'guess number six');
    await user.click(screen.getByRole('button', { name: 'Sign in' }));
    expect(await screen.findByText('Too many attempts')).toBeInTheDocument();
    expect(screen.getByText(/Too many sign-in attempts\. Wait a few minutes/)).toBeInTheDocument();
  });

  it('on success goes to the page the user asked for, signed in', async () => {
    let signedIn = false;
    const api = fakeApi({
      'GET /api/auth/me': () => (signedIn ? json(200, { user: users.designer }) : apiError(401, 'unauthenticated', 'Sign in first.')),
      'POST /api/auth/login': () => {
        signedIn = true;
        return json(200, { user: users.designer });
      },
      ...blocksRoute,
    });
    const { router } = renderApp('/sign-in?next=%2Fblocks');
    const user = userEvent.setup();

    await user.type(await screen.findByLabelText('E-mail address'), '  Tomas.Lindqvist@Larkspur.example ');
    await user.type(screen.getByLabelText('Password'), 'a long passphrase');
    await user.click(screen.getByRole('button', { name: 'Sign in' }));

    expect(await screen.findByRole('heading', { level: 1, name: 'Blocks' })).toBeInTheDocument();
    expect(router.state.location.pathname).toBe('/blocks');
    expect(screen.getByText(users.designer.name)).toBeInTheDocument();
    // The shared schema trims the address and lower-cases it before it is sent.
    expect(api.callsTo('POST /api/auth/login')[0].body).toEqual({ email: 'tomas.lindqvist@larkspur.example', password: 'a long passphrase' });
  });

  it('never follows a `next` that leaves the site', async () => {
    // OWASP Unvalidated Redirects and Forwards Cheat Sheet: only allow local, relative targets;
    // `//host/path` is a network-path reference to another host (RFC 3986 §4.2).
    fakeApi({ ...sessionRoutes(null), 'POST /api/auth/login': () => json(200, { user: users.designer }), ...blocksRoute });
    const { router } = renderApp('/sign-in?next=%2F%2Fevil.example%2Fsteal');
    const user = userEvent.setup();
    await user.type(await screen.findByLabelText('E-mail address'), users.designer.email);
    await user.type(screen.getByLabelText('Password'), 'a long passphrase');
    await user.click(screen.getByRole('button', { name: 'Sign in' }));
    await waitFor(() => expect(router.state.location.pathname).toBe('/'));
    expect(await screen.findByRole('heading', { level: 1, name: 'Overview' })).toBeInTheDocument();
  });
});
