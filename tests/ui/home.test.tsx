// The overview page against a fake API: the team's newest runs across its blocks, each linking
// to its run page with its counts, a running one with its progress (WAI-ARIA 1.2 progressbar),
// and the empty state when nothing has been submitted yet.

import { screen, within } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import { blocks, users } from './fixtures';
import { EARLIER_RUN, RUN, RUNNING_RUN as running } from './runs-fixtures';
import { fakeApi, json, renderApp, sessionRoutes } from './support';

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
});
