// The deck editor in the client, against a fake API. Value conversions follow the SI
// prefixes (BIPM, The International System of Units, 9th ed., Table 7: µ = 10⁻⁶,
// n = 10⁻⁹, m = 10⁻³); ranges are the rules' own zod schemas, which the server applies too;
// 409 and 422 meanings are RFC 9110 §15.5.10 and RFC 4918 §11.2.

import { render, screen, waitFor, within } from '@testing-library/react';
import userEvent from '@testing-library/user-event';
import { describe, expect, it } from 'vitest';
import type { DeckDetail, DeckDiff, DeckPreview, DeckVersion } from '../../shared/api/decks';
import { defaultDeck } from '../../rules/default-deck';
import { DiffView } from '../../src/features/decks/DiffView';
import { formatQuantity, parseQuantity } from '../../src/features/decks/quantity';
import { users } from './fixtures';
import { apiError, fakeApi, json, renderApp, sessionRoutes, type Handler } from './support';

const DECK_ID = 'd0000000-0000-4000-8000-0000000000d1';
const V1 = 'e0000000-0000-4000-8000-000000000001';
const V2 = 'e0000000-0000-4000-8000-000000000002';
const person = { id: users.methodology.id, name: users.methodology.name };

function version(overrides: Partial<DeckVersion> = {}): DeckVersion {
  return {
    id: V2,
    deckId: DECK_ID,
    deckName: 'Larkspur core deck',
    version: 2,
    state: 'draft',
    changeNote: '',
    lockVersion: 0,
    parentVersionId: V1,
    parentVersion: 1,
    createdBy: person,
    createdAt: '2025-12-01T09:00:00Z',
    updatedAt: '2025-12-01T09:00:00Z',
    publishedBy: null,
    publishedAt: null,
    isDeckDefault: false,
    content: { ...defaultDeck(), name: 'Larkspur core deck' },
    ...overrides,
  };
}

function deckDetail(draft: DeckVersion | null): DeckDetail {
  const v1 = {
    ...version({ id: V1, version: 1, state: 'published', parentVersionId: null, parentVersion: null, publishedAt: '2025-11-20T10:00:00Z', publishedBy: person, changeNote: 'First deck.', isDeckDefault: true }),
  };
  const { content: _c, deckName: _n, ...summary1 } = v1;
  const versions = [summary1];
  if (draft) {
    const { content: _d, deckName: _m, ...summary2 } = draft;
    versions.unshift(summary2);
  }
  return {
    id: DECK_ID,
    name: 'Larkspur core deck',
    description: 'Deck of the core datapath blocks.',
    teamDefault: true,
    defaultVersion: { id: V1, version: 1 },
    latestPublished: { id: V1, version: 1 },
    draft: draft ? { id: draft.id, version: draft.version, updatedAt: draft.updatedAt } : null,
    versionCount: versions.length,
    createdAt: '2025-11-20T10:00:00Z',
    updatedAt: '2025-12-01T09:00:00Z',
    versions,
  };
}

const emptyDiff = (from: number, to: number): DeckDiff => ({
  from: { id: V1, version: from, deckId: DECK_ID, deckName: 'Larkspur core deck' },
  to: { id: V2, version: to, deckId: DECK_ID, deckName: 'Larkspur core deck' },
  rules: { added: [], removed: [], enabled: [], regraded: [], params: [] },
  corners: { added: [], removed: [], changed: [] },
  clocks: { added: [], removed: [], changed: [], invertedSuffixesAdded: [], invertedSuffixesRemoved: [] },
  supplies: { powerAdded: [], powerRemoved: [], groundAdded: [], groundRemoved: [] },
  deviceMap: { added: [], removed: [], changed: [], reordered: false },
  settings: [],
  paths: [],
});

function deckRoutes(user: (typeof users)[keyof typeof users], v: DeckVersion, extra: Record<string, Handler> = {}) {
  return {
    ...sessionRoutes(user),
    [`GET /api/decks/${DECK_ID}`]: () => json(200, deckDetail(v.state === 'draft' ? v : null)),
    [`GET /api/decks/${DECK_ID}/versions/${v.id}`]: () => json(200, v),
    'GET /api/decks/diff': () => json(200, emptyDiff(1, 2)),
    ...extra,
  };
}

const sizeRule = () => screen.findByRole('region', { name: 'Transistor size outside physical sense' });

describe('engineering notation in deck fields', () => {
  it('reads and writes SI prefixes, keeping "m" the metre when it is the unit', () => {
    expect(parseQuantity('200u', 'm')).toBe(2e-4);
    expect(parseQuantity('200 µm', 'm')).toBe(2e-4);
    expect(parseQuantity('1 m', 'm')).toBe(1);
    expect(parseQuantity('1mm', 'm')).toBe(1e-3);
    expect(parseQuantity('430 mV', 'V')).toBe(0.43);
    expect(parseQuantity('1.5e-6', 'm')).toBe(1.5e-6);
    expect(parseQuantity('25 %', 'ratio')).toBe(0.25);
    expect(parseQuantity('-40', '°C')).toBe(-40);
    expect(parseQuantity('4k', '°C')).toBeNull(); // no prefixes on temperatures
    expect(parseQuantity('ten', 'm')).toBeNull();
    expect(parseQuantity('5 nV', 'm')).toBeNull(); // another unit
    expect(formatQuantity(1e-8, 'm')).toBe('10 nm');
    expect(formatQuantity(115e-6, 'A/V²')).toBe('115 µA/V²');
    expect(formatQuantity(100e-9, 's')).toBe('100 ns');
    // What is shown parses back to the same number.
    for (const [v, u] of [[1e-8, 'm'], [0.3e-6, 'm'], [2.75, 'V'], [1.5e-15, 'F/µm'], [0.06, '1/V']] as const) expect(parseQuantity(formatQuantity(v, u), u)).toBe(v);
  });
});

describe('rules table', () => {
  it('refuses a value outside the rule’s range with a message in its unit, then saves only the changed field', async () => {
    const draft = version();
    const api = fakeApi(
      deckRoutes(users.methodology, draft, {
        [`PATCH /api/decks/${DECK_ID}/versions/${V2}`]: ({ body }) => {
          const b = body as { changes: { path: string; value: number }[] };
          const next = structuredClone(draft);
          next.lockVersion = 1;
          next.content.rules['device.implausible-size'].params.maxWidth = b.changes[0].value;
          return json(200, next);
        },
      }),
    );
    renderApp(`/decks/${DECK_ID}/versions/${V2}`);
    const user = userEvent.setup();
    const rule = await sizeRule();
    // Areas group the rules; this one is a device rule with its rationale beside its fields.
    expect(screen.getByRole('region', { name: 'Devices' })).toContainElement(rule);
    expect(rule).toHaveTextContent('Why: A channel width or length far outside');

    const maxWidth = within(rule).getByLabelText(/Largest plausible width/);
    expect(maxWidth).toHaveValue('1 mm'); // the default 1e-3 m, in engineering notation
    expect(within(rule).getByText(/Range 1 µm … 1 m; default 1 mm/)).toBeInTheDocument();

    await user.clear(maxWidth);
    await user.type(maxWidth, '2 m');
    await user.click(within(rule).getByRole('button', { name: /^Save/ }));
    expect(await within(rule).findByText('At most 1 m.')).toBeInTheDocument();
    expect(maxWidth).toHaveAttribute('aria-invalid', 'true');

    const minWidth = within(rule).getByLabelText(/Smallest plausible width/);
    await user.clear(minWidth);
    await user.type(minWidth, '0.05n');
    await user.click(within(rule).getByRole('button', { name: /^Save/ }));
    expect(await within(rule).findByText('At least 100 pm.')).toBeInTheDocument(); // the schema's 1e-10 m
    await user.clear(minWidth);
    await user.type(minWidth, 'wide');
    await user.click(within(rule).getByRole('button', { name: /^Save/ }));
    expect(await within(rule).findByText(/Enter a number in m/)).toBeInTheDocument();
    expect(api.callsTo(`PATCH /api/decks/${DECK_ID}/versions/${V2}`)).toHaveLength(0);

    await user.click(within(rule).getByRole('button', { name: 'Undo changes' }));
    await user.clear(maxWidth);
    await user.type(maxWidth, '200u');
    await user.click(within(rule).getByRole('button', { name: /^Save/ }));
    await waitFor(() => expect(api.callsTo(`PATCH /api/decks/${DECK_ID}/versions/${V2}`)).toHaveLength(1));
    expect(api.callsTo(`PATCH /api/decks/${DECK_ID}/versions/${V2}`)[0].body).toEqual({
      lockVersion: 0,
      changes: [{ op: 'add', path: '/rules/device.implausible-size/params/maxWidth', value: 2e-4 }],
    });
    await waitFor(() => expect(within(rule).queryByRole('button', { name: /^Save/ })).not.toBeInTheDocument());
    expect(maxWidth).toHaveValue('200 µm');
  });

  it('a ratio accepts a percentage and refuses more than the schema’s 0.5; severity and switch are saved as their own changes', async () => {
    const draft = version();
    const api = fakeApi(deckRoutes(users.methodology, draft, { [`PATCH /api/decks/${DECK_ID}/versions/${V2}`]: () => json(200, { ...draft, lockVersion: 1 }) }));
    renderApp(`/decks/${DECK_ID}/versions/${V2}`);
    const user = userEvent.setup();
    const rule = await screen.findByRole('region', { name: 'Noise margin too small' });
    const fraction = within(rule).getByLabelText(/Smallest noise margin as a fraction of VDD/);
    await user.clear(fraction);
    await user.type(fraction, '60 %');
    await user.click(within(rule).getByRole('button', { name: /^Save/ }));
    expect(await within(rule).findByText('At most 0.5.')).toBeInTheDocument();
    await user.clear(fraction);
    await user.type(fraction, '15 %');
    await user.selectOptions(within(rule).getByLabelText('Severity'), 'error');
    await user.click(within(rule).getByRole('checkbox', { name: 'Runs in this deck' }));
    await user.click(within(rule).getByRole('button', { name: /^Save/ }));
    await waitFor(() => expect(api.callsTo(`PATCH /api/decks/${DECK_ID}/versions/${V2}`)).toHaveLength(1));
    expect(api.callsTo(`PATCH /api/decks/${DECK_ID}/versions/${V2}`)[0].body).toEqual({
      lockVersion: 0,
      changes: [
        { op: 'replace', path: '/rules/stage.noise-margin/enabled', value: false },
        { op: 'replace', path: '/rules/stage.noise-margin/severity', value: 'error' },
        { op: 'add', path: '/rules/stage.noise-margin/params/minFraction', value: 0.15 },
      ],
    });
  });

  it('someone else’s save first: says so, keeps the typed value, and loads the fresh draft on request', async () => {
    let current = version();
    const api = fakeApi(
      deckRoutes(users.methodology, current, {
        [`GET /api/decks/${DECK_ID}/versions/${V2}`]: () => json(200, current),
        [`PATCH /api/decks/${DECK_ID}/versions/${V2}`]: () => apiError(409, 'stale-version', 'Someone changed this draft since you loaded it.'),
      }),
    );
    renderApp(`/decks/${DECK_ID}/versions/${V2}`);
    const user = userEvent.setup();
    const rule = await sizeRule();
    const maxWidth = within(rule).getByLabelText(/Largest plausible width/);
    await user.clear(maxWidth);
    await user.type(maxWidth, '500u');
    // Meanwhile another owner saved an edit elsewhere in the draft.
    current = { ...current, lockVersion: 1, content: { ...current.content, slowestClockPeriod: 200e-9 } };
    await user.click(within(rule).getByRole('button', { name: /^Save/ }));
    expect(await within(rule).findByText('Someone else saved this draft first')).toBeInTheDocument();
    const reads = api.callsTo(`GET /api/decks/${DECK_ID}/versions/${V2}`).length;
    await user.click(within(rule).getByRole('button', { name: 'Load the latest draft' }));
    await waitFor(() => expect(api.callsTo(`GET /api/decks/${DECK_ID}/versions/${V2}`).length).toBe(reads + 1));
    expect(maxWidth).toHaveValue('500u');
  });

  it('is read-only for a designer: no fields to change, no save or publish', async () => {
    fakeApi(deckRoutes(users.designer, version()));
    renderApp(`/decks/${DECK_ID}/versions/${V2}`);
    const rule = await sizeRule();
    expect(within(rule).getByLabelText(/Largest plausible width/)).toBeDisabled();
    expect(within(rule).getByLabelText('Severity')).toBeDisabled();
    expect(screen.queryByRole('button', { name: /Publish/ })).not.toBeInTheDocument();
    expect(screen.queryByRole('tab', { name: 'What would change' })).not.toBeInTheDocument();
    expect(screen.getByText(/runs cannot use it until it is published/)).toBeInTheDocument();
  });

  it('a published version offers a new draft instead of editing', async () => {
    const published = version({ id: V1, version: 1, state: 'published', parentVersionId: null, parentVersion: null, publishedAt: '2025-11-20T10:00:00Z', publishedBy: person, changeNote: 'First deck.' });
    fakeApi(deckRoutes(users.methodology, published));
    renderApp(`/decks/${DECK_ID}/versions/${V1}`);
    const rule = await sizeRule();
    expect(within(rule).getByLabelText(/Largest plausible width/)).toBeDisabled();
    expect(screen.getByRole('button', { name: 'Start a draft from version 1' })).toBeInTheDocument();
    expect(screen.getByText('First deck.')).toBeInTheDocument();
  });
});

describe('corners', () => {
  it('edits a corner field in its unit and sends a replace at its pointer', async () => {
    const draft = version();
    const api = fakeApi(deckRoutes(users.methodology, draft, { [`PATCH /api/decks/${DECK_ID}/versions/${V2}`]: () => json(200, { ...draft, lockVersion: 1 }) }));
    renderApp(`/decks/${DECK_ID}/versions/${V2}?tab=corners`);
    const user = userEvent.setup();
    const vt0 = await screen.findByLabelText('ff-hot, n-channel devices: Zero-bias threshold |VT0|');
    const ffIndex = draft.content.corners.findIndex((c) => c.name === 'ff-hot');
    expect(vt0).toHaveValue(formatQuantity(draft.content.corners[ffIndex].nmos.vt0, 'V'));
    await user.clear(vt0);
    await user.type(vt0, '3');
    await user.click(screen.getByRole('button', { name: 'Save corners' }));
    expect(await screen.findByText(/At most 2 V\./)).toBeInTheDocument(); // deviceParamsSchema: |VT0| ≤ 2 V
    await user.clear(vt0);
    await user.type(vt0, '360 mV');
    await user.click(screen.getByRole('button', { name: 'Save corners' }));
    await waitFor(() => expect(api.callsTo(`PATCH /api/decks/${DECK_ID}/versions/${V2}`)).toHaveLength(1));
    expect(api.callsTo(`PATCH /api/decks/${DECK_ID}/versions/${V2}`)[0].body).toEqual({
      lockVersion: 0,
      changes: [{ op: 'replace', path: `/corners/${ffIndex}/nmos/vt0`, value: 0.36 }],
    });
  });
});

describe('naming and device map', () => {
  it('saves supply patterns as a list and a reordered device map as a whole', async () => {
    const draft = version();
    const api = fakeApi(deckRoutes(users.methodology, draft, { [`PATCH /api/decks/${DECK_ID}/versions/${V2}`]: () => json(200, { ...draft, lockVersion: 1 }) }));
    renderApp(`/decks/${DECK_ID}/versions/${V2}?tab=naming`);
    const user = userEvent.setup();
    const power = await screen.findByLabelText('Power nets');
    expect(power).toHaveValue('vdd*, vcc*, vpwr*, vccd*, vpb');
    await user.clear(power);
    await user.type(power, 'vdd*  vddio,vcc*');
    await user.click(screen.getByRole('button', { name: 'Save clocks and supplies' }));
    await waitFor(() => expect(api.callsTo(`PATCH /api/decks/${DECK_ID}/versions/${V2}`)).toHaveLength(1));
    expect(api.callsTo(`PATCH /api/decks/${DECK_ID}/versions/${V2}`)[0].body).toEqual({
      lockVersion: 0,
      changes: [{ op: 'replace', path: '/supplies/power', value: ['vdd*', 'vddio', 'vcc*'] }],
    });

    await user.click(screen.getByRole('tab', { name: 'Device map' }));
    await user.click(await screen.findByRole('button', { name: 'Move pattern 4 up' }));
    await user.click(screen.getByRole('button', { name: 'Save device map' }));
    await waitFor(() => expect(api.callsTo(`PATCH /api/decks/${DECK_ID}/versions/${V2}`)).toHaveLength(2));
    const map = draft.content.deviceMap;
    // The second save carries the lockVersion the first one returned.
    expect(api.callsTo(`PATCH /api/decks/${DECK_ID}/versions/${V2}`)[1].body).toEqual({
      lockVersion: 1,
      changes: [{ op: 'replace', path: '/deviceMap', value: [map[0], map[1], map[3], map[2], ...map.slice(4)] }],
    });
  });
});

describe('deck history', () => {
  it('lists versions with their state, and a publisher can choose the one new runs use', async () => {
    const draft = version();
    const detail = deckDetail(draft);
    detail.versions.push({ ...detail.versions[1], id: 'e0000000-0000-4000-8000-000000000000', version: 0, isDeckDefault: false, changeNote: 'Trial deck.' });
    const api = fakeApi({
      ...deckRoutes(users.methodology, draft),
      [`GET /api/decks/${DECK_ID}`]: () => json(200, detail),
      [`POST /api/decks/${DECK_ID}/versions/:id/default`]: () => json(200, detail),
    });
    renderApp(`/decks/${DECK_ID}`);
    const user = userEvent.setup();
    const table = await screen.findByRole('table', { name: 'Versions of Larkspur core deck' });
    const rows = within(table).getAllByRole('row').slice(1);
    expect(rows.map((r) => within(r).getAllByRole('cell')[0].textContent)).toEqual(['Version 2', 'Version 1', 'Version 0']);
    expect(rows[0]).toHaveTextContent('Draft started from version 1');
    expect(rows[1]).toHaveTextContent('Used by new runs');
    expect(within(rows[1]).queryByRole('button', { name: /Use for new runs/ })).not.toBeInTheDocument();
    expect(within(rows[0]).queryByRole('button', { name: /Use for new runs/ })).not.toBeInTheDocument(); // drafts cannot be used by runs
    await user.click(within(rows[2]).getByRole('button', { name: /Use for new runs/ }));
    await waitFor(() => expect(api.callsTo(`POST /api/decks/${DECK_ID}/versions/e0000000-0000-4000-8000-000000000000/default`)).toHaveLength(1));
    expect(screen.getByRole('link', { name: 'Open the draft (version 2)' })).toHaveAttribute('href', `/decks/${DECK_ID}/versions/${V2}`);
    // The comparison starts from the newest version and the one it started from.
    expect(screen.getByLabelText('From')).toHaveValue(V1);
    expect(screen.getByLabelText('To')).toHaveValue(V2);
    expect(await screen.findByText('The two versions have the same settings.')).toBeInTheDocument();
    expect(api.callsTo('GET /api/decks/diff')[0].search).toBe(`?from=${V1}&to=${V2}`);
  });

  it('a reviewer reads the history but cannot start drafts or change the default', async () => {
    fakeApi(deckRoutes(users.reviewer, version()));
    renderApp(`/decks/${DECK_ID}`);
    await screen.findByRole('table', { name: 'Versions of Larkspur core deck' });
    expect(screen.queryByRole('link', { name: /Open the draft/ })).not.toBeInTheDocument();
    expect(screen.queryByRole('button', { name: /Use for new runs/ })).not.toBeInTheDocument();
  });
});

describe('publishing', () => {
  it('asks for a change note and publishes with the draft’s lockVersion', async () => {
    const draft = version({ lockVersion: 4 });
    const api = fakeApi(
      deckRoutes(users.methodology, draft, {
        [`POST /api/decks/${DECK_ID}/versions/${V2}/publish`]: () => json(200, { ...draft, state: 'published', publishedAt: '2025-12-02T10:00:00Z', publishedBy: person, changeNote: 'x' }),
      }),
    );
    renderApp(`/decks/${DECK_ID}/versions/${V2}`);
    const user = userEvent.setup();
    await user.click(await screen.findByRole('button', { name: 'Publish…' }));
    const dialog = screen.getByRole('dialog', { name: 'Publish version 2' });
    await user.click(within(dialog).getByRole('button', { name: 'Publish version 2' }));
    expect(await within(dialog).findByText('Say what changed and why')).toBeInTheDocument();
    await user.type(within(dialog).getByLabelText('Change note'), 'Keeper ratio limit raised after the tag compare escape.');
    await user.click(within(dialog).getByRole('button', { name: 'Publish version 2' }));
    await waitFor(() => expect(api.callsTo(`POST /api/decks/${DECK_ID}/versions/${V2}/publish`)).toHaveLength(1));
    expect(api.callsTo(`POST /api/decks/${DECK_ID}/versions/${V2}/publish`)[0].body).toEqual({
      lockVersion: 4,
      changeNote: 'Keeper ratio limit raised after the tag compare escape.',
      makeDefault: true,
    });
  });
});

describe('diff view', () => {
  it('lists each change with its old and new value in its unit', () => {
    const diff: DeckDiff = {
      ...emptyDiff(3, 4),
      rules: {
        added: [],
        removed: [],
        enabled: [{ ruleId: 'stage.non-regenerative', from: true, to: false }],
        regraded: [{ ruleId: 'stage.noise-margin', from: 'warning', to: 'error' }],
        params: [{ ruleId: 'device.implausible-size', param: 'maxWidth', from: 1e-3, to: 2e-4, unit: 'm', label: 'Largest plausible width' }],
      },
      corners: { added: ['sf-cold'], removed: ['ss-hot'], changed: [{ corner: 'ff-hot', field: 'vdd', from: 2.75, to: 2.8, unit: 'V' }] },
      supplies: { powerAdded: [], powerRemoved: ['vpb'], groundAdded: ['agnd*'], groundRemoved: [] },
      settings: [{ field: 'slowestClockPeriod', from: 100e-9, to: 200e-9, unit: 's' }],
      paths: Array.from({ length: 9 }, (_, i) => `p${i}`),
    };
    render(<DiffView diff={diff} />);
    expect(screen.getByText(/9 changes from/)).toHaveTextContent('9 changes from version 3 to version 4.');
    const rules = within(screen.getByRole('region', { name: 'Rules' }));
    expect(rules.getByText(/turned off/).closest('li')).toHaveTextContent('Stage does not restore levels');
    const param = rules.getByText(/Largest plausible width/).closest('li')!;
    expect(param).toHaveTextContent('1 mm');
    expect(param).toHaveTextContent('200 µm');
    expect(within(param).getByRole('deletion')).toHaveTextContent('1 mm');
    expect(within(param).getByRole('insertion')).toHaveTextContent('200 µm');
    const regraded = rules.getByText(/re-graded/).closest('li')!;
    expect(within(regraded).getByText('Warning')).toBeInTheDocument();
    expect(within(regraded).getByText('Error')).toBeInTheDocument();
    const corners = within(screen.getByRole('region', { name: 'Corners' }));
    expect(corners.getByText(/Added corner/)).toHaveTextContent('Added corner sf-cold');
    expect(corners.getByText(/Removed corner/)).toHaveTextContent('Removed corner ss-hot');
    expect(corners.getByText(/ff-hot/).closest('li')).toHaveTextContent(/vdd\s*2\.75 V.*2\.8 V/);
    const supplies = within(screen.getByRole('region', { name: 'Supplies' }));
    expect(supplies.getByText(/Power patterns removed/)).toHaveTextContent('vpb');
    expect(supplies.getByText(/Ground patterns added/)).toHaveTextContent('agnd*');
    expect(screen.getByRole('region', { name: 'Deck settings' })).toHaveTextContent(/Slowest clock period\s*100 ns.*200 ns/);
    // Sections without changes are left out.
    expect(screen.queryByRole('region', { name: 'Clocks' })).not.toBeInTheDocument();
    expect(screen.queryByRole('region', { name: 'Device map' })).not.toBeInTheDocument();
  });

  it('says when two versions are the same', () => {
    render(<DiffView diff={emptyDiff(1, 1)} />);
    expect(screen.getByText('The two versions have the same settings.')).toBeInTheDocument();
  });
});

describe('deck list and import', () => {
  it('an imported file with an out-of-range value shows the server’s field path', async () => {
    fakeApi({
      ...sessionRoutes(users.methodology),
      'GET /api/decks': () => json(200, { items: [] }),
      'POST /api/decks': () =>
        apiError(422, 'invalid-deck', 'The deck is not valid.', [{ path: 'rules.stage.noise-margin.params.minFraction', message: 'Too big: expected number to be <=0.5' }]),
    });
    renderApp('/decks');
    const user = userEvent.setup();
    expect(await screen.findByRole('region', { name: 'No rule decks listed yet' })).toBeInTheDocument();
    const file = new File([JSON.stringify({ ...defaultDeck(), name: 'From the old flow' })], 'old-flow.json', { type: 'application/json' });
    await user.upload(screen.getByLabelText('Import a deck file: deck file'), file);
    const form = await screen.findByRole('form', { name: 'New deck from old-flow.json' });
    expect(within(form).getByLabelText('Name')).toHaveValue('From the old flow');
    await user.click(within(form).getByRole('button', { name: 'Create the draft' }));
    const alert = await within(form).findByRole('alert');
    expect(alert).toHaveTextContent('The deck is not valid.');
    expect(alert).toHaveTextContent('rules.stage.noise-margin.params.minFraction');
  });
});

describe('preview', () => {
  it('shows findings that appear and go away', async () => {
    const draft = version();
    const finding = {
      ruleId: 'device.implausible-size',
      severity: 'error' as const,
      message: 'Mw has width 2 µm, outside 10 nm…1.5 µm; is the netlist scale missing?',
      file: 'cells.sp',
      line: 7,
      column: 1,
      cell: 'wide',
      nets: [],
      devices: ['Mw'],
      instances: 1,
      measured: { value: 2e-6, unit: 'm' },
      limit: { value: 1.5e-6, unit: 'm' },
      fingerprint: '00000000000abc',
      corner: null,
      plot: null,
    };
    const result: DeckPreview = {
      netlist: { id: 'f0000000-0000-4000-8000-000000000001', blockId: 'a1000000-0000-4000-8000-000000000002', blockName: 'lk_tagcmp_dom8', createdAt: '2025-12-01T08:00:00Z', files: 2 },
      base: { versionId: V1, version: 1, label: 'version 1' },
      draft: { versionId: V2, version: 2, label: 'draft 2' },
      added: [],
      removed: [finding],
      changed: [],
      counts: { base: 3, draft: 2, added: 0, removed: 1, changed: 0 },
      listLimit: 200,
      parseErrors: 0,
      elapsedMs: 900,
    };
    fakeApi(deckRoutes(users.methodology, draft, { [`POST /api/decks/${DECK_ID}/versions/${V2}/preview`]: () => json(200, result) }));
    renderApp(`/decks/${DECK_ID}/versions/${V2}?tab=preview`);
    const user = userEvent.setup();
    await user.click(await screen.findByRole('button', { name: 'Run the preview' }));
    const gone = await screen.findByRole('region', { name: 'Findings that go away' });
    expect(gone).toHaveTextContent('(1)');
    expect(gone).toHaveTextContent('device.implausible-size · wide · cells.sp:7');
    expect(screen.getByRole('region', { name: 'New findings' })).toHaveTextContent('None.');
    expect(screen.getByText(/3 findings with version 1, 2 with draft 2/)).toBeInTheDocument();
    expect(within(screen.getByRole('tabpanel')).getByText(/never replace the foundry/)).toBeInTheDocument();
  });
});
