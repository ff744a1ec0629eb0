// Block and run pages against a fake API: the runs of a block with their state and progress
// (followed while running), submitting a netlist as multipart/form-data (RFC 7578; the text
// fields read back through the API's own schema, shared/api/runs.ts createRunFieldsSchema),
// a run's summary by rule and by cell, the comparison of two runs, and a failed run.
// Progress is announced with the WAI-ARIA 1.2 progressbar role and aria-valuenow.

import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it, vi } from 'vitest';
import type { DeckDetail } from '../../shared/api/decks';
import { createRunFieldsSchema } from '../../shared/api/runs';
import { blocks, users } from './fixtures';
import { EARLIER_RUN, EARLIER_RUN_ID, FINDINGS, RUN, RUN_ID, RUNNING_RUN as running, runRoutes } from './runs-fixtures';
import { apiError, fakeApi, json, renderApp, sessionRoutes } from './support';

vi.mock('../../src/features/editor', () => ({ NetlistEditor: () => <div data-testid="netlist-editor" /> }));

const block = blocks[1];
const DECK: DeckDetail = {
  id: 'd0000000-0000-4000-8000-000000000001',
  name: 'Larkspur datapath deck',
  description: '',
  teamDefault: true,
  defaultVersion: { id: 'd1000000-0000-4000-8000-000000000003', version: 3 },
  latestPublished: { id: 'd1000000-0000-4000-8000-000000000003', version: 3 },
  draft: { id: 'd1000000-0000-4000-8000-000000000004', version: 4, updatedAt: '2025-12-01T10:00:00Z' },
  versionCount: 4,
  createdAt: '2025-09-01T10:00:00Z',
  updatedAt: '2025-12-01T10:00:00Z',
  versions: [3, 4].map((v) => ({
    id: `d1000000-0000-4000-8000-00000000000${v}`,
    deckId: 'd0000000-0000-4000-8000-000000000001',
    version: v,
    state: v === 4 ? ('draft' as const) : ('published' as const),
    changeNote: v === 4 ? '' : 'Keeper ratio limit raised to 0.1.',
    lockVersion: 0,
    parentVersionId: null,
    parentVersion: null,
    createdBy: null,
    createdAt: '2025-11-01T10:00:00Z',
    updatedAt: '2025-11-01T10:00:00Z',
    publishedBy: null,
    publishedAt: v === 4 ? null : '2025-11-02T10:00:00Z',
    isDeckDefault: v === 3,
  })),
};

describe('block page', () => {
  it('lists the runs with state, deck version, submitter and counts, and follows a running run until it finishes', async () => {
    let finished = false;
    const api = fakeApi({
      ...sessionRoutes(users.reviewer),
      [`GET /api/blocks/${block.id}`]: () => json(200, block),
      'GET /api/runs': ({ url }) => {
        expect(url.searchParams.get('blockId')).toBe(block.id);
        const first = !finished ? running : { ...running, state: 'succeeded' as const, progress: null, summary: { ...RUN.summary!, errors: 2 }, finishedAt: '2025-12-02T10:00:06Z' };
        return json(200, { items: [first, RUN, EARLIER_RUN], total: 3, page: 1, pageSize: 20 });
      },
    });
    renderApp(`/blocks/${block.id}`);
    const table = await screen.findByRole('table', { name: /Runs of lk_tagcmp_dom8/ });
    const rows = within(table).getAllByRole('row').slice(1);
    expect(rows).toHaveLength(3);
    expect(rows[0]).toHaveTextContent('Running');
    // 3 of 8 cells checked: 37.5 %, announced rounded.
    const bar = within(rows[0]).getByRole('progressbar');
    expect(bar).toHaveAttribute('aria-valuenow', '38');
    expect(rows[1]).toHaveTextContent('Larkspur datapath deck v3');
    expect(rows[1]).toHaveTextContent(users.designer.name);
    expect(rows[1]).toHaveTextContent('1Error');
    expect(rows[1]).toHaveTextContent('3Warnings');
    // A reviewer may read runs but not submit them.
    expect(screen.queryByRole('button', { name: /Submit a netlist/ })).not.toBeInTheDocument();

    // Polled every two seconds while a run is unfinished; polling stops once all are finished.
    finished = true;
    await waitFor(() => expect(within(table).getAllByRole('row')[1]).toHaveTextContent('Finished'), { timeout: 6000 });
    expect(within(within(table).getAllByRole('row')[1]).queryByRole('progressbar')).not.toBeInTheDocument();
    expect(within(table).getAllByRole('row')[1]).toHaveTextContent('2Errors');
    const calls = api.callsTo('GET /api/runs').length;
    await new Promise((r) => setTimeout(r, 2500));
    expect(api.callsTo('GET /api/runs').length).toBe(calls);
  }, 15_000);

  it('a designer submits files with a deck version, top cell and note as one multipart request', async () => {
    let sent: FormData | null = null;
    fakeApi({
      ...sessionRoutes(users.designer),
      [`GET /api/blocks/${block.id}`]: () => json(200, block),
      'GET /api/runs': () => json(200, { items: [], total: 0, page: 1, pageSize: 20 }),
      'GET /api/decks': () => json(200, { items: [{ ...DECK, versions: undefined }] }),
      [`GET /api/decks/${DECK.id}`]: () => json(200, DECK),
      'POST /api/runs': () => json(201, { run: { ...RUN, state: 'queued' } }),
      ...runRoutes(),
    });
    const fakeFetch = globalThis.fetch;
    vi.stubGlobal('fetch', (input: RequestInfo | URL, init?: RequestInit) => {
      if (init?.body instanceof FormData) sent = init.body;
      return fakeFetch(input, init);
    });
    const { router } = renderApp(`/blocks/${block.id}`);
    const user = userEvent.setup();
    await user.click(await screen.findByRole('button', { name: /Submit a netlist/ }));
    const form = screen.getByRole('form', { name: 'Submit a netlist for checking' });

    await user.click(within(form).getByRole('button', { name: 'Start the check' }));
    expect(within(form).getByRole('alert')).toHaveTextContent('Choose the netlist files');
    expect(sent).toBeNull();

    const input = within(form).getByLabelText('Netlist files or a bundle');
    await user.upload(input, [new File(['* top\n'], 'lk_dom_and2.sp'), new File(['* lib\n'], 'lk_lib.cdl')]);
    expect(within(within(form).getByRole('list', { name: 'Files to submit' })).getAllByRole('listitem')).toHaveLength(2);
    // The team default (v3, published) is preselected; the draft v4 may be chosen instead.
    const deck = within(form).getByRole('combobox', { name: 'Rule deck version' });
    await waitFor(() => expect(deck).toHaveValue(DECK.defaultVersion!.id));
    await user.selectOptions(deck, DECK.versions[1].id);
    await user.type(within(form).getByRole('textbox', { name: 'Top cell' }), 'lk_dom_and2');
    await user.type(within(form).getByRole('textbox', { name: 'Note' }), 'Keeper doubled');
    await user.click(within(form).getByRole('button', { name: 'Start the check' }));

    await waitFor(() => expect(router.state.location.pathname).toBe(`/runs/${RUN_ID}`));
    const body = sent as unknown as FormData;
    const fields = createRunFieldsSchema.parse(Object.fromEntries([...body.entries()].filter(([, v]) => typeof v === 'string')));
    expect(fields).toEqual({ blockId: block.id, deckVersionId: DECK.versions[1].id, note: 'Keeper doubled', top: 'lk_dom_and2' });
    expect(body.getAll('files').map((f) => (f as File).name)).toEqual(['lk_dom_and2.sp', 'lk_lib.cdl']);
  });

  it('refuses files that are neither netlists nor bundles, naming them', async () => {
    fakeApi({
      ...sessionRoutes(users.designer),
      [`GET /api/blocks/${block.id}`]: () => json(200, block),
      'GET /api/runs': () => json(200, { items: [], total: 0, page: 1, pageSize: 20 }),
      'GET /api/decks': () => json(200, { items: [] }),
    });
    renderApp(`/blocks/${block.id}`);
    const user = userEvent.setup({ applyAccept: false });
    await user.click(await screen.findByRole('button', { name: /Submit a netlist/ }));
    const form = screen.getByRole('form', { name: 'Submit a netlist for checking' });
    await user.upload(within(form).getByLabelText('Netlist files or a bundle'), [new File(['x'], 'notes.txt'), new File(['* ok\n'], 'bank.sp')]);
    expect(within(form).getByRole('alert')).toHaveTextContent('Not a netlist or bundle: notes.txt');
    expect(within(within(form).getByRole('list', { name: 'Files to submit' })).getAllByRole('listitem')).toHaveLength(1);
  });
});

describe('run page', () => {
  it('summarises findings by rule and by cell with instance counts, each linking to those findings', async () => {
    fakeApi({ ...sessionRoutes(users.reviewer), ...runRoutes() });
    const { router } = renderApp(`/runs/${RUN_ID}?tab=summary`);
    const byRule = await screen.findByRole('table', { name: 'Findings by rule' });
    const byCell = screen.getByRole('table', { name: 'Findings by cell' });
    const keeper = await within(byRule).findByRole('row', { name: /Weak keeper/ });
    expect(keeper).toHaveTextContent('164');
    const cell = within(byCell).getByRole('row', { name: /lk_inv/ });
    expect(within(cell).getAllByRole('cell').map((c) => c.textContent)).toEqual(['lk_inv', '12', '1', '0', '1', '0']);
    await userEvent.setup().click(within(byRule).getByRole('link', { name: /Weak keeper/ }));
    await waitFor(() => expect(router.state.location.search).toBe('?tab=findings&rule=dynamic.keeper'));
    expect(await screen.findByRole('tab', { name: 'Findings', selected: true })).toBeInTheDocument();
  });

  it('compares with an earlier run of the block: new, fixed and persisting, matched by fingerprint', async () => {
    const api = fakeApi({
      ...sessionRoutes(users.reviewer),
      ...runRoutes(),
      'GET /api/runs': () => json(200, { items: [RUN, EARLIER_RUN], total: 2, page: 1, pageSize: 100 }),
      [`GET /api/runs/${RUN_ID}/compare/:baseId`]: ({ url, params }) => {
        const kind = url.searchParams.get('kind');
        const items = kind === 'fixed' ? [{ ...FINDINGS[0], id: 9001 }] : kind === 'new' ? [FINDINGS[2]] : FINDINGS.slice(3);
        return json(200, { head: RUN_ID, base: params.baseId, kind, counts: { new: 1, fixed: 1, persisting: 3 }, items, total: items.length, page: 1, pageSize: 50 });
      },
    });
    renderApp(`/runs/${RUN_ID}?tab=compare`);
    const user = userEvent.setup();
    expect(await screen.findByRole('tab', { name: /New 1/, selected: true })).toBeInTheDocument();
    // The default base is the newest earlier finished run of the same block.
    const asked = api.callsTo(`GET /api/runs/${RUN_ID}/compare/${EARLIER_RUN_ID}`);
    expect(asked.length).toBeGreaterThan(0);
    expect(new URLSearchParams(asked[0].search).get('kind')).toBe('new');
    expect(await screen.findByRole('link', { name: /Keeper of dyn is weak/ })).toHaveAttribute('href', `/runs/${RUN_ID}?tab=findings&finding=103`);

    await user.click(screen.getByRole('tab', { name: /Fixed 1/ }));
    // A fixed finding exists only in the base run: its link goes there.
    expect(await screen.findByRole('link', { name: /Charge sharing from mid and foot/ })).toHaveAttribute('href', `/runs/${EARLIER_RUN_ID}?tab=findings&finding=9001`);
    expect(screen.getByRole('columnheader', { name: 'Was at' })).toBeInTheDocument();
  });

  it('follows a queued run through its progress to its findings, and lets its submitter cancel it meanwhile', async () => {
    let state: 'queued' | 'running' | 'succeeded' = 'queued';
    const api = fakeApi({
      ...sessionRoutes(users.designer),
      ...runRoutes(),
      [`GET /api/runs/${RUN_ID}`]: () =>
        json(
          200,
          state === 'succeeded'
            ? RUN
            : {
                ...RUN,
                state,
                summary: null,
                breakdown: null,
                finishedAt: null,
                progress: state === 'queued' ? null : { stage: 'checking', done: 1, total: 4, label: 'Checking cells', updatedAt: RUN.createdAt },
              },
        ),
      [`POST /api/runs/${RUN_ID}/cancel`]: () => json(200, { ...EARLIER_RUN, id: RUN_ID, state: 'cancelled' }),
    });
    renderApp(`/runs/${RUN_ID}`);
    const bar = await screen.findByRole('progressbar');
    // Queued: no count yet, so no value — an indeterminate bar, announced by its text.
    expect(bar).not.toHaveAttribute('aria-valuenow');
    expect(bar).toHaveAttribute('aria-valuetext', 'Waiting for a worker');
    expect(screen.queryByRole('grid')).not.toBeInTheDocument();
    await userEvent.setup().click(screen.getByRole('button', { name: 'Cancel run' }));
    await waitFor(() => expect(api.callsTo(`POST /api/runs/${RUN_ID}/cancel`)).toHaveLength(1));

    state = 'running';
    await waitFor(() => expect(screen.getByRole('progressbar')).toHaveAttribute('aria-valuenow', '25'), { timeout: 5000 });
    state = 'succeeded';
    await waitFor(() => expect(screen.getByRole('grid')).toBeInTheDocument(), { timeout: 5000 });
    expect(screen.queryByRole('progressbar')).not.toBeInTheDocument();
    expect(screen.queryByRole('button', { name: 'Cancel run' })).not.toBeInTheDocument();
  }, 15_000);

  it('a failed run says why and lists what the reader found in the netlist', async () => {
    fakeApi({
      ...sessionRoutes(users.designer),
      [`GET /api/runs/${RUN_ID}`]: () =>
        json(200, {
          ...RUN,
          state: 'failed',
          summary: null,
          breakdown: null,
          error: 'The netlist could not be read: 1 error.',
          diagnostics: [{ severity: 'error', code: 'unclosed-subckt', message: '.subckt lk_dom_and2 has no .ends', file: 'lk_dom_and2.sp', line: 4, column: 1 }],
        }),
    });
    renderApp(`/runs/${RUN_ID}`);
    expect(await screen.findByRole('alert')).toHaveTextContent('The netlist could not be read: 1 error.');
    expect(screen.getByText('lk_dom_and2.sp:4:1')).toBeInTheDocument();
    expect(screen.getByText('.subckt lk_dom_and2 has no .ends')).toBeVisible();
    expect(screen.queryByRole('grid')).not.toBeInTheDocument();
  });

  it('an unknown run is a not-found page', async () => {
    fakeApi({ ...sessionRoutes(users.designer), [`GET /api/runs/${RUN_ID}`]: () => apiError(404, 'not-found', 'No such run.') });
    renderApp(`/runs/${RUN_ID}`);
    expect(await screen.findByRole('heading', { name: 'No such run' })).toBeInTheDocument();
  });
});
