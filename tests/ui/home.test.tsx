// The overview page against a fake API: the team's newest runs across its blocks, each linking
// to its run page with its counts, a running one with its progress (WAI-ARIA 1.2 progressbar),
// the empty state when nothing has been submitted yet, and the waiver requests waiting for a
// decision (all of them for a reviewer, the user's own for a designer).

import { screen, waitFor, within } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import { blocks, users } from './fixtures';
import { EARLIER_RUN, RUN, RUNNING_RUN as running } from './runs-fixtures';
import { fakeApi, json, renderApp, sessionRoutes } from './support';
import { WAIVER_ID, waiver } from './waivers-fixtures';

describe('overview', () => {
  it('lists the newest runs of the team with their counts and progress, linking to each run', async () => {
    const api = fakeApi({
      ...sessionRoutes(users.designer),
      'GET /api/blocks': () => json(200, { items: blocks }),
      'GET /api/runs': () => json(200, { items: [running, RUN, EARLIER_RUN], total: 12, page: 1, pageSize: 8 }),
    });
    renderApp('/');
    const list = await screen.findByRole('list', { name: 'Recent runs' });
    const items = within(list).getAllByRole('listitem');
    expect(items).toHaveLength(3);
    // Newest first, as the server ordered them; the first is still running.
    expect(within(items[0]).getByRole('progressbar')).toHaveAttribute('aria-valuenow', String(Math.round((3 / 8) * 100)));
    expect(within(items[0]).getByRole('link')).toHaveAttribute('href', `/runs/${running.id}`);
    // A finished run shows its error, warning and info counts from its summary.
    const finished = within(items[1]);
    expect(finished.getByRole('link')).toHaveAttribute('href', `/runs/${RUN.id}`);
    expect(finished.getByText(RUN.block.name)).toBeInTheDocument();
    expect(items[1]).toHaveTextContent(`${RUN.summary!.errors}`);
    expect(screen.getByText('9 earlier runs on the blocks’ pages.')).toBeInTheDocument();
    // The team-wide list: no block filter on the request.
    const [call] = api.callsTo('GET /api/runs');
    expect(new URLSearchParams(call.search).get('blockId')).toBeNull();
  });

  it('says how to start when the team has no runs', async () => {
    fakeApi({
      ...sessionRoutes(users.designer),
      'GET /api/blocks': () => json(200, { items: blocks }),
      'GET /api/runs': () => json(200, { items: [], total: 0, page: 1, pageSize: 8 }),
    });
    renderApp('/');
    expect(await screen.findByText('No runs yet')).toBeInTheDocument();
  });

  const pendingRoutes = (items: ReturnType<typeof waiver>[]) => ({
    'GET /api/blocks': () => json(200, { items: blocks }),
    'GET /api/runs': () => json(200, { items: [RUN], total: 1, page: 1, pageSize: 8 }),
    'GET /api/waivers': () => json(200, { items, total: items.length, page: 1, pageSize: 50 }),
  });

  it('shows a reviewer the waiver requests waiting for a decision, each linking to its page', async () => {
    const api = fakeApi({ ...sessionRoutes(users.reviewer), ...pendingRoutes([waiver()]) });
    renderApp('/');
    const list = await screen.findByRole('list', { name: 'Waiver requests to decide' });
    const [item] = within(list).getAllByRole('listitem');
    expect(within(item).getByRole('link')).toHaveAttribute('href', `/waivers/${WAIVER_ID}`);
    expect(item).toHaveTextContent('dynamic.keeper-ratio in lk_dom_and2');
    expect(item).toHaveTextContent(`asked by ${users.designer.name}`);
    expect(screen.getByRole('link', { name: 'All pending (1)' })).toHaveAttribute('href', '/waivers?standing=pending');
    // Every pending request of the team, not only the reviewer's own.
    const query = new URLSearchParams(api.callsTo('GET /api/waivers')[0].search);
    expect(query.get('standing')).toBe('pending');
    expect(query.get('mine')).toBeNull();
  });

  it('shows a designer only their own pending requests, and nothing when none wait', async () => {
    const api = fakeApi({ ...sessionRoutes(users.designer), ...pendingRoutes([waiver()]) });
    const { unmount } = renderApp('/');
    const list = await screen.findByRole('list', { name: 'Your pending waiver requests' });
    expect(within(list).getAllByRole('listitem')).toHaveLength(1);
    expect(list).not.toHaveTextContent('asked by');
    expect(new URLSearchParams(api.callsTo('GET /api/waivers')[0].search).get('mine')).toBe('true');
    unmount();

    fakeApi({ ...sessionRoutes(users.designer), ...pendingRoutes([]) });
    const { queryClient } = renderApp('/');
    await screen.findByRole('list', { name: 'Recent runs' });
    // Judged once the empty answer has arrived, not before.
    await waitFor(() => expect(queryClient.getQueryState(['waivers', 'list', { standing: ['pending'], mine: true, page: 1 }])?.status).toBe('success'));
    expect(screen.queryByRole('heading', { name: 'Your waiver requests' })).not.toBeInTheDocument();
  });
});
