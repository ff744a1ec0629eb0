// Waivers in the client: the request form under a finding (scope, justification, expiry,
// bound), the reviewer's direct waiver and one-click decision, the waiver page with its
// standing, dates and history, and the team's list. Every body the client sends is read
// back through the API's own schemas (shared/api/waivers.ts, the contract with the
// server); unit prefixes are the SI ones (BIPM, The International System of Units, 9th
// ed., Table 7: m = 10⁻³).

import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import { createWaiverBodySchema, decideWaiverBodySchema, rejectWaiverBodySchema, revokeWaiverBodySchema, type WaiverView } from '../../shared/api/waivers';
import type { User } from '../../shared/api/auth';
import type { NetlistEditorProps } from '../../src/features/editor';
import { users } from './fixtures';
import { FINDINGS, RUN_ID, runRoutes } from './runs-fixtures';
import { fakeApi, json, renderApp, sessionRoutes, type Handler } from './support';
import { WAIVER_ID, waiver } from './waivers-fixtures';

vi.mock('../../src/features/editor', () => ({
  NetlistEditor: (props: NetlistEditorProps) => <div data-testid="netlist-editor">{props.value.split('\n').length} lines</div>,
}));

function runPage(user: User, finding: number, extra: Record<string, Handler> = {}) {
  const api = fakeApi({
    ...sessionRoutes(user),
    ...runRoutes(),
    'GET /api/waivers/for-finding': ({ url }) => json(200, { items: Number(url.searchParams.get('findingId')) === 103 ? [waiver()] : [] }),
    ...extra,
  });
  renderApp(`/runs/${RUN_ID}?finding=${finding}`);
  return api;
}

async function waiverSlot() {
  const detail = await screen.findByRole('complementary', { name: 'Selected finding' });
  return within(detail).findByRole('region', { name: 'Waiver' });
}

describe('waiver request form', () => {
  it('a designer asks to waive an open finding with a scope, a justification, an expiry and a bound', async () => {
    const user = userEvent.setup();
    const created: WaiverView = { ...waiver(), history: undefined } as unknown as WaiverView;
    const api = runPage(users.designer, 101, { 'POST /api/waivers': () => json(201, created) });
    const slot = await waiverSlot();
    expect(within(slot).queryByRole('button', { name: 'Waive' })).not.toBeInTheDocument();
    await user.click(within(slot).getByRole('button', { name: 'Ask to waive' }));
    const form = within(slot).getByRole('form', { name: 'Ask to waive this finding' });

    // Too short a justification never reaches the server.
    await user.type(within(form).getByLabelText('Justification'), 'ok');
    await user.click(within(form).getByRole('button', { name: 'Ask a reviewer' }));
    expect(within(form).getByRole('alert')).toHaveTextContent('Say why the finding is acceptable');
    expect(api.callsTo('POST /api/waivers')).toHaveLength(0);

    await user.click(within(form).getByRole('radio', { name: /Every instance of the cell/ }));
    await user.clear(within(form).getByLabelText('Justification'));
    await user.type(within(form).getByLabelText('Justification'), 'The foot device is off whenever mid can share; checked at the slow corner.');
    await user.type(within(form).getByLabelText(/Holds through/), '2027-03-31');
    await user.click(within(form).getByRole('checkbox', { name: /Lapse when the measured value/ }));
    const bound = within(form).getByLabelText(/Bound \(V, SI\)/);
    // Prefilled with the measurement, 620 mV against a limit of 360 mV: a bigger drop is worse.
    expect(bound).toHaveValue('0.62');
    await user.clear(bound);
    await user.type(bound, '0.7');
    expect(within(form).getByText(/lapses when a later run measures more than 700 mV/)).toBeInTheDocument();
    await user.click(within(form).getByRole('button', { name: 'Ask a reviewer' }));

    await waitFor(() => expect(api.callsTo('POST /api/waivers')).toHaveLength(1));
    const body = createWaiverBodySchema.parse(api.callsTo('POST /api/waivers')[0].body);
    expect(body).toEqual({
      runId: RUN_ID,
      findingId: 101,
      scope: 'cell',
      justification: 'The foot device is off whenever mid can share; checked at the slow corner.',
      expiresAt: '2027-03-31',
      boundValue: 0.7,
    });
    await waitFor(() => expect(within(slot).queryByRole('form')).not.toBeInTheDocument());
  });

  it('a reviewer waives directly, without a bound, and the finding list is read again', async () => {
    const user = userEvent.setup();
    const api = runPage(users.reviewer, 102, { 'POST /api/waivers/direct': () => json(201, { ...waiver(), state: 'approved', standing: 'active' }) });
    const slot = await waiverSlot();
    expect(within(slot).queryByRole('button', { name: 'Ask to waive' })).not.toBeInTheDocument();
    await user.click(within(slot).getByRole('button', { name: 'Waive' }));
    const form = within(slot).getByRole('form', { name: 'Waive this finding' });
    await user.type(within(form).getByLabelText('Justification'), 'Wire delay measured on silicon; within the cycle.');
    const before = api.callsTo(`GET /api/runs/${RUN_ID}/findings`).length;
    await user.click(within(form).getByRole('button', { name: 'Waive' }));
    await waitFor(() => expect(api.callsTo('POST /api/waivers/direct')).toHaveLength(1));
    expect(createWaiverBodySchema.parse(api.callsTo('POST /api/waivers/direct')[0].body)).toEqual({
      runId: RUN_ID,
      findingId: 102,
      scope: 'finding',
      justification: 'Wire delay measured on silicon; within the cycle.',
      expiresAt: null,
      boundValue: null,
    });
    await waitFor(() => expect(api.callsTo(`GET /api/runs/${RUN_ID}/findings`).length).toBeGreaterThan(before));
  });
});

describe('waiver decision form', () => {
  it('a reviewer approves a pending request in one click, and a rejection needs a reason', async () => {
    const user = userEvent.setup();
    const api = runPage(users.reviewer, 103, {
      [`POST /api/waivers/${WAIVER_ID}/approve`]: () => json(200, { ...waiver(), state: 'approved', standing: 'active' }),
      [`POST /api/waivers/${WAIVER_ID}/reject`]: () => json(200, { ...waiver(), state: 'rejected', standing: 'rejected' }),
    });
    const slot = await waiverSlot();
    const form = await within(slot).findByRole('form', { name: 'Decide on the request' });
    // The request's justification is read beside the decision (and in the finding's waiver list).
    expect(within(slot).getAllByText(/The keeper is sized for the slow corner only/)).toHaveLength(2);

    await user.click(within(form).getByRole('button', { name: 'Reject' }));
    expect(within(form).getByRole('alert')).toHaveTextContent('Say why the request is rejected');
    expect(api.callsTo(`POST /api/waivers/${WAIVER_ID}/reject`)).toHaveLength(0);

    await user.click(within(form).getByRole('button', { name: 'Approve' }));
    await waitFor(() => expect(api.callsTo(`POST /api/waivers/${WAIVER_ID}/approve`)).toHaveLength(1));
    expect(decideWaiverBodySchema.parse(api.callsTo(`POST /api/waivers/${WAIVER_ID}/approve`)[0].body)).toEqual({ comment: '' });

    await user.type(within(form).getByLabelText('Comment'), 'Needs a simulation at the fast corner.');
    await user.click(within(form).getByRole('button', { name: 'Reject' }));
    await waitFor(() => expect(api.callsTo(`POST /api/waivers/${WAIVER_ID}/reject`)).toHaveLength(1));
    expect(rejectWaiverBodySchema.parse(api.callsTo(`POST /api/waivers/${WAIVER_ID}/reject`)[0].body)).toEqual({ comment: 'Needs a simulation at the fast corner.' });
  });

  it('a designer sees the pending request but no decision, and cannot ask again', async () => {
    runPage(users.designer, 103);
    const slot = await waiverSlot();
    const list = await within(slot).findByRole('list', { name: 'Waivers of this finding' });
    expect(within(list).getByText('Awaiting decision')).toBeInTheDocument();
    expect(within(slot).queryByRole('form', { name: 'Decide on the request' })).not.toBeInTheDocument();
    expect(within(slot).queryByRole('button', { name: 'Ask to waive' })).not.toBeInTheDocument();
    expect(within(slot).getByRole('link', { name: 'Open the waiver' })).toHaveAttribute('href', `/waivers/${WAIVER_ID}`);
  });
});

describe('waiver state display', () => {
  it('the waiver page shows standing, people, the last day it holds, the bound and the history', async () => {
    const approved = waiver({
      state: 'approved',
      standing: 'active',
      decider: { id: users.reviewer.id, name: users.reviewer.name, email: users.reviewer.email },
      decidedAt: '2026-11-21T10:00:00.000Z',
      decisionComment: 'Agreed for this tape-in.',
      // Expiry is the midnight after the last day: this waiver holds through 2027-02-28.
      expiresAt: '2027-03-01T00:00:00.000Z',
      bound: { value: 0.05, unit: 'ratio', sense: 'min' },
      history: [
        ...waiver().history,
        { action: 'waiver.approve', actor: { id: users.reviewer.id, name: users.reviewer.name, email: users.reviewer.email }, at: '2026-11-21T10:00:00.000Z', detail: {} },
      ],
    });
    fakeApi({ ...sessionRoutes(users.designer), [`GET /api/waivers/${WAIVER_ID}`]: () => json(200, approved) });
    renderApp(`/waivers/${WAIVER_ID}`);
    expect(await screen.findByRole('heading', { name: 'dynamic.keeper-ratio in lk_dom_and2' })).toBeInTheDocument();
    expect(screen.getAllByText('Approved').length).toBeGreaterThan(0);
    expect(screen.getByText('2027-02-28')).toBeInTheDocument();
    expect(screen.getByText('the measured value is below 0.05')).toBeInTheDocument();
    expect(screen.getByText('Agreed for this tape-in.')).toBeInTheDocument();
    const history = within(screen.getByRole('list', { name: 'History' })).getAllByRole('listitem');
    expect(history.map((li) => li.textContent)).toEqual([expect.stringMatching(/^Asked for by Tomas Lindqvist, 2026-11-20/), expect.stringMatching(/^Approved by Hal Moreno, 2026-11-21/)]);
    // A designer may neither decide nor revoke.
    expect(screen.queryByRole('button', { name: 'Approve' })).not.toBeInTheDocument();
    expect(screen.queryByRole('button', { name: 'Revoke' })).not.toBeInTheDocument();
  });

  it('a reviewer opening a mailed link approves the request in one click', async () => {
    const user = userEvent.setup();
    const api = fakeApi({
      ...sessionRoutes(users.reviewer),
      [`GET /api/waivers/${WAIVER_ID}`]: () => json(200, waiver()),
      [`POST /api/waivers/${WAIVER_ID}/approve`]: () => json(200, { ...waiver(), state: 'approved', standing: 'active' }),
    });
    renderApp(`/waivers/${WAIVER_ID}`);
    await user.click(await screen.findByRole('button', { name: 'Approve' }));
    await waitFor(() => expect(api.callsTo(`POST /api/waivers/${WAIVER_ID}/approve`)).toHaveLength(1));
  });

  it('a pending request offers a reviewer the decision, not a withdrawal; an admin may withdraw it', async () => {
    const routes = { [`GET /api/waivers/${WAIVER_ID}`]: () => json(200, waiver()) };
    fakeApi({ ...sessionRoutes(users.reviewer), ...routes });
    const { unmount } = renderApp(`/waivers/${WAIVER_ID}`);
    expect(await screen.findByRole('button', { name: 'Reject' })).toBeInTheDocument();
    expect(screen.queryByRole('button', { name: 'Withdraw the request' })).not.toBeInTheDocument();
    unmount();

    fakeApi({ ...sessionRoutes(users.admin), ...routes });
    renderApp(`/waivers/${WAIVER_ID}`);
    expect(await screen.findByRole('button', { name: 'Withdraw the request' })).toBeInTheDocument();
    expect(screen.queryByRole('button', { name: 'Approve' })).not.toBeInTheDocument();
  });

  it('a designer withdraws their own pending request with a reason; another designer cannot', async () => {
    const user = userEvent.setup();
    const api = fakeApi({
      ...sessionRoutes(users.designer),
      [`GET /api/waivers/${WAIVER_ID}`]: () => json(200, waiver()),
      [`POST /api/waivers/${WAIVER_ID}/withdraw`]: () => json(200, { ...waiver(), state: 'revoked', standing: 'revoked' }),
    });
    const { unmount } = renderApp(`/waivers/${WAIVER_ID}`);
    await user.click(await screen.findByRole('button', { name: 'Withdraw the request' }));
    const form = screen.getByRole('form', { name: 'Withdraw the request' });
    await user.type(within(form).getByLabelText(/Why the request is withdrawn/), 'Resized the keeper instead.');
    await user.click(within(form).getByRole('button', { name: 'Withdraw' }));
    await waitFor(() => expect(api.callsTo(`POST /api/waivers/${WAIVER_ID}/withdraw`)).toHaveLength(1));
    expect(revokeWaiverBodySchema.parse(api.callsTo(`POST /api/waivers/${WAIVER_ID}/withdraw`)[0].body)).toEqual({ reason: 'Resized the keeper instead.' });
    expect(api.callsTo(`POST /api/waivers/${WAIVER_ID}/revoke`)).toHaveLength(0);
    unmount();

    fakeApi({ ...sessionRoutes(users.designer), [`GET /api/waivers/${WAIVER_ID}`]: () => json(200, waiver({ requester: { id: '9f000000-0000-4000-8000-000000000009', name: 'Tomas Lindqvist', email: 'tomas.lindqvist@larkspur.example' } })) });
    renderApp(`/waivers/${WAIVER_ID}`);
    await screen.findByRole('heading', { name: 'History' });
    expect(screen.queryByRole('button', { name: 'Withdraw the request' })).not.toBeInTheDocument();
  });

  it('the list shows each waiver with its standing and filters by standing in the address', async () => {
    const user = userEvent.setup();
    const items = [waiver(), waiver({ id: 'e1000000-0000-4000-8000-000000000009', state: 'revoked', standing: 'revoked', cell: 'lk_inv' })];
    const api = fakeApi({
      ...sessionRoutes(users.reviewer),
      'GET /api/waivers': ({ url }) => {
        const wanted = url.searchParams.get('standing');
        const shown = wanted ? items.filter((w) => wanted.split(',').includes(w.standing)) : items;
        return json(200, { items: shown, total: shown.length, page: 1, pageSize: 50 });
      },
    });
    const { router } = renderApp('/waivers');
    const table = await screen.findByRole('table', { name: 'Waivers' });
    expect(within(table).getAllByRole('row')).toHaveLength(3);
    expect(within(table).getByText('Revoked')).toBeInTheDocument();
    await user.selectOptions(screen.getByLabelText('Standing'), 'pending');
    await waitFor(() => expect(within(screen.getByRole('table', { name: 'Waivers' })).getAllByRole('row')).toHaveLength(2));
    expect(router.state.location.search).toBe('?standing=pending');
    expect(api.calls.some((c) => c.path === '/api/waivers' && c.search.includes('standing=pending'))).toBe(true);
  });
});

// The finding fixtures this file leans on, so a change to them shows here first.
describe('fixtures', () => {
  it('has an open finding with a measured value above its limit and a pending request', () => {
    const f101 = FINDINGS.find((f) => f.id === 101)!;
    expect(f101.status).toBe('open');
    expect(f101.measured!.value).toBeGreaterThan(f101.limit!.value);
    expect(FINDINGS.find((f) => f.id === 103)!.waiver?.id).toBe(WAIVER_ID);
  });
});
