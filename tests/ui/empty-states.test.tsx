import { screen, within } from '@testing-library/react';
import { describe, expect, it } from 'vitest';
import { users } from './fixtures';
import { fakeApi, json, renderApp, sessionRoutes } from './support';

describe('empty states', () => {
  it('the blocks page with no blocks says what will appear and how to get there', async () => {
    fakeApi({ ...sessionRoutes(users.designer), 'GET /api/blocks': () => json(200, { items: [] }) });
    renderApp('/blocks');
    const empty = await screen.findByRole('region', { name: 'No blocks yet' });
    expect(empty).toHaveTextContent('Your team’s blocks will be listed here');
    const steps = within(empty).getAllByRole('listitem');
    expect(steps).toHaveLength(2);
    expect(steps[0]).toHaveTextContent('Create a block with “New block”');
    expect(screen.queryByRole('table')).not.toBeInTheDocument();
  });

  it('a reviewer, who cannot create blocks, is told who can', async () => {
    fakeApi({ ...sessionRoutes(users.reviewer), 'GET /api/blocks': () => json(200, { items: [] }) });
    renderApp('/blocks');
    const empty = await screen.findByRole('region', { name: 'No blocks yet' });
    expect(empty).toHaveTextContent('A designer or methodology owner creates the block.');
  });

  it('pages not yet filled show what they will hold', async () => {
    fakeApi({ ...sessionRoutes(users.reviewer), 'GET /api/waivers': () => json(200, { items: [], total: 0, page: 1, pageSize: 50 }) });
    renderApp('/waivers');
    const empty = await screen.findByRole('region', { name: 'No waivers yet' });
    expect(empty).toHaveTextContent('You approve or reject each request');
  });

  it('an unknown address inside the app is a not-found page with a way back', async () => {
    fakeApi(sessionRoutes(users.designer));
    renderApp('/no/such/page');
    expect(await screen.findByRole('heading', { name: 'No such page' })).toBeInTheDocument();
    expect(screen.getByRole('link', { name: 'Go to the overview' })).toHaveAttribute('href', '/');
  });
});
