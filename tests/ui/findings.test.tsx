// The findings table and the finding beside it, against a fake API that filters, sorts and
// pages like the server. Every request the table sends is read back through the API's own
// query schema (shared/api/runs.ts findingsQuerySchema, the contract with the server); unit
// prefixes are the SI ones (BIPM, The International System of Units, 9th ed., Table 7:
// m = 10⁻³, µ = 10⁻⁶, p = 10⁻¹², f = 10⁻¹⁵); row selection and sort order are announced with
// the WAI-ARIA 1.2 attributes aria-selected and aria-sort.

import { screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { afterEach, describe, expect, it, vi } from 'vitest';
import { findingsQuerySchema } from '../../shared/api/runs';
import type { NetlistEditorProps } from '../../src/features/editor';
import { users } from './fixtures';
import { FINDINGS, RUN_ID, runRoutes } from './runs-fixtures';
import { fakeApi, renderApp, sessionRoutes, type FakeApi } from './support';

// Monaco does not run in jsdom; the editor is replaced by a record of what the page asks of it.
vi.mock('../../src/features/editor', () => ({
  NetlistEditor: (props: NetlistEditorProps) => (
    <div
      data-testid="netlist-editor"
      data-file={props.fileName}
      data-reveal={props.revealLine ?? ''}
      data-focus={props.highlights?.filter((h) => h.tone === 'focus').map((h) => h.startLine).join(',')}
      data-tinted={props.highlights?.filter((h) => h.tone !== 'focus').map((h) => `${h.startLine}:${h.tone}`).join(',')}
      data-marks={props.marks?.map((m) => `${m.line}:${m.tone}`).join(',')}
    >
      {props.value.split('\n').length} lines
    </div>
  ),
}));

const findingsPath = `/api/runs/${RUN_ID}/findings`;

afterEach(() => window.localStorage.clear());

/** The table's own requests (not the editor's per-file ones), as the server would read them. */
function tableQueries(api: FakeApi) {
  return api
    .callsTo(`GET ${findingsPath}`)
    .map((c) => new URLSearchParams(c.search))
    .filter((p) => !p.has('file'))
    .map((p) => findingsQuerySchema.parse(Object.fromEntries(p)));
}

function tableRows() {
  const grid = screen.getByRole('grid');
  return within(grid)
    .getAllByRole('row')
    .filter((r) => r.hasAttribute('data-finding-id'));
}

async function openRun(path = `/runs/${RUN_ID}`, rows = FINDINGS.length) {
  const api = fakeApi({ ...sessionRoutes(users.designer), ...runRoutes() });
  const view = renderApp(path);
  await waitFor(() => expect(tableRows()).toHaveLength(rows));
  return { api, ...view };
}

describe('findings table', () => {
  it('sends a severity filter to the server and shows the rows it returns', async () => {
    const { api, router } = await openRun();
    const user = userEvent.setup();
    const filters = screen.getByRole('search', { name: 'Filter findings' });
    await user.click(within(filters).getByRole('checkbox', { name: 'Error' }));
    await waitFor(() => expect(tableRows()).toHaveLength(1));
    const last = tableQueries(api).at(-1)!;
    expect(last.severity).toEqual(['error']);
    expect(last.page).toBe(1);
    expect(tableRows()[0]).toHaveTextContent('Charge sharing from mid and foot');
    expect(router.state.location.search).toContain('severity=error');
  });

  it('combines rule, cell, status and text filters in one query, and says when nothing matches', async () => {
    const { api } = await openRun();
    const user = userEvent.setup();
    const filters = screen.getByRole('search', { name: 'Filter findings' });
    // One option per rule, counting its findings of every severity (the breakdown has a warning and an info row).
    const options = within(within(filters).getByRole('combobox', { name: 'Rule' })).getAllByRole('option');
    expect(options.filter((o) => (o as HTMLOptionElement).value === 'stage.noise-margin').map((o) => o.textContent)).toEqual(['Noise margin too small (2)']);
    await user.selectOptions(within(filters).getByRole('combobox', { name: 'Rule' }), 'stage.noise-margin');
    await waitFor(() => expect(tableRows()).toHaveLength(2));
    expect(tableQueries(api).at(-1)!.rule).toEqual(['stage.noise-margin']);

    await user.selectOptions(within(filters).getByRole('combobox', { name: 'Cell' }), 'lk_inv');
    await waitFor(() => expect(tableRows()).toHaveLength(1));
    expect(tableQueries(api).at(-1)).toMatchObject({ rule: ['stage.noise-margin'], cell: ['lk_inv'] });

    await user.selectOptions(within(filters).getByRole('combobox', { name: 'Status' }), 'open');
    await waitFor(() => expect(screen.getByText('No finding matches these filters.')).toBeInTheDocument());
    expect(tableQueries(api).at(-1)!.status).toBe('open');

    await user.selectOptions(within(filters).getByRole('combobox', { name: 'Cell' }), '');
    await user.selectOptions(within(filters).getByRole('combobox', { name: 'Status' }), 'waiver-lapsed');
    await waitFor(() => expect(tableRows()).toHaveLength(1));
    expect(tableQueries(api).at(-1)).toMatchObject({ rule: ['stage.noise-margin'], status: 'waiver-lapsed' });
    expect(tableRows()[0]).toHaveTextContent('Waiver lapsed');
    await user.selectOptions(within(filters).getByRole('combobox', { name: 'Status' }), '');
    await user.selectOptions(within(filters).getByRole('combobox', { name: 'Rule' }), '');
    await user.type(within(filters).getByRole('searchbox', { name: 'Text in message, net or device' }), 'mkeep');
    await waitFor(() => expect(tableRows()).toHaveLength(1), { timeout: 3000 });
    const last = tableQueries(api).at(-1)!;
    expect(last.q).toBe('mkeep');
    expect([last.rule, last.cell, last.status]).toEqual([undefined, undefined, undefined]);
    expect(tableRows()[0]).toHaveTextContent('Keeper of dyn is weak');
  });

  it('sorts on the server when a header is chosen, and announces the order', async () => {
    const { api } = await openRun();
    const user = userEvent.setup();
    await user.click(screen.getByRole('button', { name: /^Cell/ }));
    await waitFor(() => expect(tableQueries(api).at(-1)).toMatchObject({ sort: 'cell', order: 'asc' }));
    const header = screen.getByRole('columnheader', { name: /Cell/ });
    await waitFor(() => expect(header).toHaveAttribute('aria-sort', 'ascending'));
    await user.click(screen.getByRole('button', { name: /^Cell/ }));
    await waitFor(() => expect(tableQueries(api).at(-1)).toMatchObject({ sort: 'cell', order: 'desc' }));
    // lk_inv sorts after lk_dom_and2, so it comes first in descending order.
    await waitFor(() => expect(tableRows()[0]).toHaveTextContent('lk_inv'));
    expect(screen.getByRole('columnheader', { name: /Cell/ })).toHaveAttribute('aria-sort', 'descending');
  });

  it('moves with j and k, opens with Enter, and puts the finding’s id in the address', async () => {
    const { router } = await openRun();
    const user = userEvent.setup();
    const rows = tableRows();
    rows[0].focus();
    await user.keyboard('j');
    expect(tableRows()[1]).toHaveFocus();
    await user.keyboard('jk');
    expect(tableRows()[1]).toHaveFocus();
    await user.keyboard('{Enter}');
    const id = tableRows()[1].getAttribute('data-finding-id');
    await waitFor(() => expect(new URLSearchParams(router.state.location.search).get('finding')).toBe(id));
    expect(tableRows()[1]).toHaveAttribute('aria-selected', 'true');
    const detail = screen.getByRole('complementary', { name: 'Selected finding' });
    expect(within(detail).getByText(FINDINGS.find((f) => String(f.id) === id)!.message)).toBeInTheDocument();
  });

  it('shows and hides columns by choice', async () => {
    await openRun();
    const user = userEvent.setup();
    expect(screen.queryByRole('columnheader', { name: 'Nets' })).not.toBeInTheDocument();
    await user.click(screen.getByRole('button', { name: 'Columns' }));
    await user.click(screen.getByRole('checkbox', { name: 'Nets' }));
    expect(screen.getByRole('columnheader', { name: 'Nets' })).toBeInTheDocument();
    expect(screen.getAllByText('dyn, mid, foot').length).toBeGreaterThan(0);
    expect(screen.getByRole('columnheader', { name: /Location/ })).toBeInTheDocument();
    await user.click(screen.getByRole('checkbox', { name: 'Location' }));
    expect(screen.queryByRole('columnheader', { name: /Location/ })).not.toBeInTheDocument();
    // The choice is kept in this browser for the next run opened.
    expect(JSON.parse(window.localStorage.getItem('keepwell.findings.columns')!)).toMatchObject({ nets: true, location: false });
  });
});

describe('finding detail', () => {
  it('shows measured against limit with engineering prefixes, the rule’s rationale and fix, and the waiver state', async () => {
    await openRun(`/runs/${RUN_ID}?finding=101`);
    const detail = screen.getByRole('complementary', { name: 'Selected finding' });
    await waitFor(() => expect(within(detail).getByRole('heading', { name: 'Charge sharing on a dynamic node' })).toBeInTheDocument());
    // 0.62 V = 620 × 10⁻³ V; 0.36 V = 360 × 10⁻³ V.
    expect(within(detail).getByText('620 mV')).toHaveAttribute('data-quantity', 'measured');
    expect(within(detail).getByText('360 mV')).toHaveAttribute('data-quantity', 'limit');
    expect(within(detail).getByText('ss_hot')).toBeInTheDocument();
    expect(within(detail).getByText('lk_dom_and2')).toBeInTheDocument();
    expect(within(detail).getByText('×64')).toBeInTheDocument();
    expect(within(within(detail).getByRole('list', { name: 'Devices' })).getAllByRole('listitem').map((li) => li.textContent)).toEqual(['Ma', 'Mb']);
    expect(within(detail).getByText(/A dynamic node is not regenerative/)).toBeInTheDocument();
    expect(within(detail).getByText(/Precharge the internal nodes/)).toBeInTheDocument();
    expect(within(detail).getByText('Not waived.')).toBeInTheDocument();
    expect(within(detail).getByRole('img', { name: /Charge-sharing drop: 620 mV against a limit of 360 mV, over the limit/ })).toBeInTheDocument();
    expect(detail).toHaveTextContent('never replace the foundry’s design rules');
  });

  it('reads seconds, farads and plain ratios with their own prefixes', async () => {
    const { router } = await openRun(`/runs/${RUN_ID}?finding=102`);
    const detail = screen.getByRole('complementary', { name: 'Selected finding' });
    // 41 × 10⁻¹² s and 30 × 10⁻¹² s.
    await waitFor(() => expect(within(detail).getByText('41 ps')).toBeInTheDocument());
    expect(within(detail).getByText('30 ps')).toBeInTheDocument();
    await router.navigate(`/runs/${RUN_ID}?finding=106`);
    // 2.5 × 10⁻¹⁵ F; no limit.
    await waitFor(() => expect(within(detail).getByText('2.5 fF')).toBeInTheDocument());
    expect(within(detail).getByText('—')).toHaveAttribute('data-quantity', 'limit');
    await router.navigate(`/runs/${RUN_ID}?finding=103`);
    await waitFor(() => expect(within(detail).getByText('0.08')).toHaveAttribute('data-quantity', 'measured'));
    await router.navigate(`/runs/${RUN_ID}?finding=105`);
    await waitFor(() => expect(within(detail).getByText(/Waived: an approved waiver/)).toBeInTheDocument());
  });

  it('says whether a waiver is requested or has lapsed, and why', async () => {
    const { router } = await openRun(`/runs/${RUN_ID}?finding=103`);
    const detail = screen.getByRole('complementary', { name: 'Selected finding' });
    await waitFor(() => expect(within(detail).getByText(/a waiver has been requested and awaits a reviewer/)).toBeInTheDocument());
    await router.navigate(`/runs/${RUN_ID}?finding=104`);
    await waitFor(() => expect(within(detail).getByText(/the waiver that covered this finding has lapsed/)).toBeInTheDocument());
    expect(within(detail).getByText('the cell’s devices changed since the waiver was approved')).toBeInTheDocument();
    expect(within(detail).getByText('Every instance of the cell')).toBeInTheDocument();
  });

  it('opens a shared link to a finding not on the page shown, by its id', async () => {
    const { api } = await openRun(`/runs/${RUN_ID}?size=25&severity=error&finding=105`, 1);
    const detail = screen.getByRole('complementary', { name: 'Selected finding' });
    await waitFor(() => expect(within(detail).getByText(/NMH = 150 mV/)).toBeInTheDocument());
    expect(api.callsTo(`GET ${findingsPath}/105`)).toHaveLength(1);
  });
});

describe('netlist beside the finding', () => {
  it('shows the finding’s file with its line revealed and focused, its devices tinted and every finding of the file marked', async () => {
    await openRun(`/runs/${RUN_ID}?finding=102`);
    const editor = await screen.findByTestId('netlist-editor');
    // Line 9 holds an error and an info: one mark, in the more severe tone.
    await waitFor(() => expect(editor).toHaveAttribute('data-marks', '6:warning,9:error,12:warning,15:info,17:info'));
    expect(editor).toHaveAttribute('data-file', 'lk_dom_and2.sp');
    // DOMINO_AND2 line 6 is `Mpre dyn clk vdd vdd …`, the device the finding names.
    expect(editor).toHaveAttribute('data-reveal', '6');
    expect(editor).toHaveAttribute('data-focus', '6');
  });

  it('steps to the next and previous finding of the file in line order', async () => {
    const { router } = await openRun(`/runs/${RUN_ID}?finding=102`);
    const user = userEvent.setup();
    const editor = await screen.findByTestId('netlist-editor');
    await waitFor(() => expect(screen.getByText('Finding 1 of 6 in this file')).toBeInTheDocument());
    await user.click(screen.getByRole('button', { name: '↓ Next' }));
    await waitFor(() => expect(new URLSearchParams(router.state.location.search).get('finding')).toBe('101'));
    // Charge sharing is anchored at Ma (DOMINO_AND2 line 9, focused) and also names Mb (line 10, tinted in its severity).
    expect(editor).toHaveAttribute('data-focus', '9');
    expect(editor).toHaveAttribute('data-tinted', '10:error');
    expect(screen.getByText('Finding 2 of 6 in this file')).toBeInTheDocument();
    await user.click(screen.getByRole('button', { name: '↑ Previous' }));
    await waitFor(() => expect(new URLSearchParams(router.state.location.search).get('finding')).toBe('102'));
  });

  it('switches file for a finding in another file of the run', async () => {
    const { router } = await openRun(`/runs/${RUN_ID}?finding=101`);
    const editor = await screen.findByTestId('netlist-editor');
    await waitFor(() => expect(editor).toHaveAttribute('data-file', 'lk_dom_and2.sp'));
    await router.navigate(`/runs/${RUN_ID}?finding=105`);
    await waitFor(() => expect(screen.getByTestId('netlist-editor')).toHaveAttribute('data-file', 'lk_lib.sp'));
    await waitFor(() => expect(screen.getByTestId('netlist-editor')).toHaveAttribute('data-marks', '3:waived'));
    expect(screen.getByTestId('netlist-editor')).toHaveAttribute('data-reveal', '3');
  });
});
