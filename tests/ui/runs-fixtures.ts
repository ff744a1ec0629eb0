// An invented finished run of the Larkspur team's domino tag compare, for the run, findings and
// editor-view tests: its detail, its files, its findings (shaped as shared/api/runs.ts), a rule
// catalogue, and a fake findings endpoint that filters, sorts and pages like the server.

import type { RuleCatalogueEntry } from '../../shared/api/decks';
import { findingsQuerySchema, type RunDetail, type RunView, type StoredFinding } from '../../shared/api/runs';
import { REVIEW_CAUTION } from '../../shared/findings';
import { blocks, DOMINO_AND2, users } from './fixtures';
import { json, type Handler } from './support';

export const RUN_ID = '7f000000-0000-4000-8000-000000000001';
export const EARLIER_RUN_ID = '7f000000-0000-4000-8000-000000000000';
const block = blocks[1];

export const LIBRARY = `* Larkspur shared cells (invented example)
.subckt lk_inv a y vdd vss
Mn y a vss vss nch w=0.4u l=0.15u
Mp y a vdd vdd pch w=0.8u l=0.15u
.ends lk_inv
`;

export const FILES = [
  { path: 'lk_dom_and2.sp', text: DOMINO_AND2 },
  { path: 'lk_lib.sp', text: LIBRARY },
];

const SEVERITY_RANK = { error: 0, warning: 1, info: 2 } as const;

function finding(id: number, f: Omit<StoredFinding, 'id' | 'fingerprint' | 'column' | 'status' | 'corner' | 'plot'> & Partial<StoredFinding>): StoredFinding {
  return { id, column: 1, status: 'open', corner: null, plot: null, fingerprint: `fp-${f.ruleId}-${f.cell}-${f.devices.join('.')}`, ...f };
}

/** Line numbers below are those of DOMINO_AND2 and LIBRARY. */
export const FINDINGS: StoredFinding[] = [
  finding(101, {
    ruleId: 'dynamic.charge-sharing',
    severity: 'error',
    message: 'Charge sharing from mid and foot can pull dyn down by 620 mV when a rises with b low; the limit is 360 mV.',
    file: 'lk_dom_and2.sp',
    line: 9,
    cell: 'lk_dom_and2',
    nets: ['dyn', 'mid', 'foot'],
    devices: ['Ma', 'Mb'],
    instances: 64,
    measured: { value: 0.62, unit: 'V' },
    limit: { value: 0.36, unit: 'V' },
    corner: 'ss_hot',
    plot: {
      kind: 'budget',
      bars: [{ label: 'Charge-sharing drop', measured: { value: 0.62, unit: 'V' }, limit: { value: 0.36, unit: 'V' }, sense: 'max' }],
    },
  }),
  finding(102, {
    ruleId: 'dynamic.precharge',
    severity: 'warning',
    message: 'The precharge device of dyn restores 2.5 fF through 0.6 µm in 41 ps; the limit is 30 ps.',
    file: 'lk_dom_and2.sp',
    line: 6,
    cell: 'lk_dom_and2',
    nets: ['dyn', 'clk'],
    devices: ['Mpre'],
    instances: 64,
    measured: { value: 41e-12, unit: 's' },
    limit: { value: 30e-12, unit: 's' },
  }),
  finding(103, {
    ruleId: 'dynamic.keeper',
    severity: 'warning',
    message: 'Keeper of dyn is weak: keeper ratio 0.08 against a minimum of 0.1.',
    file: 'lk_dom_and2.sp',
    line: 12,
    cell: 'lk_dom_and2',
    nets: ['dyn', 'y'],
    devices: ['Mkeep'],
    instances: 64,
    measured: { value: 0.08, unit: 'ratio' },
    limit: { value: 0.1, unit: 'ratio' },
    status: 'waiver-requested',
    waiver: { id: 'e1000000-0000-4000-8000-000000000001', state: 'requested', scope: 'finding', lapse: null, reason: null, expiresAt: null },
  }),
  finding(104, {
    ruleId: 'stage.noise-margin',
    severity: 'info',
    message: 'static gate driving y: NML = 412 mV, 22.9 % of VDD.',
    file: 'lk_dom_and2.sp',
    line: 15,
    cell: 'lk_dom_and2',
    nets: ['y', 'dyn'],
    devices: ['Minvp', 'Minvn'],
    instances: 64,
    measured: { value: 0.412, unit: 'V' },
    limit: { value: 0.18, unit: 'V' },
    status: 'waiver-lapsed',
    waiver: { id: 'e1000000-0000-4000-8000-000000000002', state: 'approved', scope: 'cell', lapse: 'changed', reason: 'the cell’s devices changed since the waiver was approved', expiresAt: '2026-06-30' },
  }),
  finding(105, {
    ruleId: 'stage.noise-margin',
    severity: 'warning',
    message: 'static gate driving y: NMH = 150 mV, 8.3 % of VDD, below 10.0 %.',
    file: 'lk_lib.sp',
    line: 3,
    cell: 'lk_inv',
    nets: ['y', 'a'],
    devices: ['Mn', 'Mp'],
    instances: 12,
    measured: { value: 0.15, unit: 'V' },
    limit: { value: 0.18, unit: 'V' },
    status: 'waived',
  }),
  finding(106, {
    ruleId: 'device.implausible-size',
    severity: 'info',
    message: 'Cdyn is 2.5 fF on a node named dyn: checked, plausible for a modelled wire.',
    file: 'lk_dom_and2.sp',
    line: 17,
    cell: 'lk_dom_and2',
    nets: ['dyn'],
    devices: ['Cdyn'],
    instances: 64,
    measured: { value: 2.5e-15, unit: 'F' },
    limit: null,
  }),
  finding(107, {
    ruleId: 'device.implausible-size',
    severity: 'info',
    message: 'Ma is 0.8 µm wide in a stack of 0.8 µm devices: plausible.',
    file: 'lk_dom_and2.sp',
    line: 9,
    column: 2,
    cell: 'lk_dom_and2',
    nets: ['dyn', 'mid'],
    devices: ['Ma'],
    instances: 64,
    measured: { value: 0.8e-6, unit: 'm' },
    limit: null,
  }),
];

export const RULES: RuleCatalogueEntry[] = [
  { id: 'dynamic.charge-sharing', title: 'Charge sharing on a dynamic node', area: 'dynamic', rationale: 'A dynamic node is not regenerative: charge it loses to internal nodes of its stack never comes back until the next precharge.', fix: 'Precharge the internal nodes, reorder the stack to put the late input at the top, or raise the node’s capacitance.', defaultSeverity: 'error', params: {} },
  { id: 'dynamic.precharge', title: 'Slow precharge', area: 'dynamic', rationale: 'A dynamic node that is not fully precharged starts evaluation below its rail.', fix: 'Widen the precharge device or shorten its wire.', defaultSeverity: 'warning', params: {} },
  { id: 'dynamic.keeper', title: 'Weak keeper', area: 'dynamic', rationale: 'The keeper holds a dynamic node against leakage and noise.', fix: 'Widen or shorten the keeper.', defaultSeverity: 'warning', params: {} },
  { id: 'stage.noise-margin', title: 'Noise margin too small', area: 'stage', rationale: 'The noise margins are how much noise a level can pick up between two stages and still be read correctly.', fix: 'Resize the pull-up against the pull-down.', defaultSeverity: 'warning', params: {} },
  { id: 'device.implausible-size', title: 'Implausible device size', area: 'device', rationale: 'A size off by a unit prefix changes every analysis.', fix: 'Check the scale and units.', defaultSeverity: 'info', params: {} },
];

function runView(id: string, createdAt: string, summary: RunView['summary']): RunView {
  return {
    id,
    block: { id: block.id, name: block.name },
    netlistId: 'c1000000-0000-4000-8000-000000000001',
    deck: { versionId: 'd1000000-0000-4000-8000-000000000003', name: 'Larkspur datapath deck', version: 3 },
    state: 'succeeded',
    progress: { stage: 'done', done: 0, total: 0, label: 'Done', updatedAt: createdAt },
    attempt: 1,
    error: null,
    summary,
    note: 'Keeper resized after the last review.',
    topCell: null,
    parts: null,
    submitter: { id: users.designer.id, name: users.designer.name, email: users.designer.email },
    createdAt,
    startedAt: createdAt,
    finishedAt: createdAt.replace(':00Z', ':04Z'),
  };
}

export const RUN: RunDetail = {
  ...runView(RUN_ID, '2025-12-02T09:40:00Z', { cells: 2, devices: 704, instances: 76, parseErrors: 0, errors: 1, warnings: 3, infos: 3, elapsedMs: 3900 }),
  diagnostics: [],
  breakdown: {
    byRule: [
      { ruleId: 'dynamic.charge-sharing', severity: 'error', findings: 1, instances: 64 },
      { ruleId: 'dynamic.keeper', severity: 'warning', findings: 1, instances: 64 },
      { ruleId: 'dynamic.precharge', severity: 'warning', findings: 1, instances: 64 },
      { ruleId: 'stage.noise-margin', severity: 'warning', findings: 1, instances: 12 },
      { ruleId: 'stage.noise-margin', severity: 'info', findings: 1, instances: 64 },
      { ruleId: 'device.implausible-size', severity: 'info', findings: 2, instances: 128 },
    ],
    byCell: [
      { cell: 'lk_dom_and2', cellInstances: 64, findings: 6, errors: 1, warnings: 2, infos: 3 },
      { cell: 'lk_inv', cellInstances: 12, findings: 1, errors: 0, warnings: 1, infos: 0 },
    ],
  },
  files: FILES.map((f) => ({ path: f.path, size: f.text.length, sha256: '0'.repeat(64) })),
  caution: REVIEW_CAUTION,
};

export const EARLIER_RUN: RunView = runView(EARLIER_RUN_ID, '2025-12-01T16:10:00Z', { cells: 2, devices: 704, instances: 76, parseErrors: 0, errors: 2, warnings: 3, infos: 2, elapsedMs: 4100 });

/** A run still being checked, three cells of eight done. */
export const RUNNING_RUN: RunView = {
  ...EARLIER_RUN,
  id: '7f000000-0000-4000-8000-000000000002',
  state: 'running',
  summary: null,
  finishedAt: null,
  progress: { stage: 'checking', done: 3, total: 8, label: 'Checking cells', updatedAt: '2025-12-02T10:00:01Z' },
  createdAt: '2025-12-02T10:00:00Z',
};

/** Answers a findings query as the server does (shared/api/runs.ts findingsQuerySchema), over `all`. */
export function findingsEndpoint(all: StoredFinding[] = FINDINGS): Handler {
  return ({ url }) => {
    const q = findingsQuerySchema.parse(Object.fromEntries(url.searchParams));
    let items = all.filter(
      (f) =>
        (!q.rule || q.rule.includes(f.ruleId)) &&
        (!q.severity || q.severity.includes(f.severity)) &&
        (!q.cell || q.cell.includes(f.cell)) &&
        (!q.status || q.status === f.status) &&
        (!q.q || [f.message, ...f.nets, ...f.devices].some((t) => t.toLowerCase().includes(q.q!.toLowerCase()))) &&
        (!url.searchParams.get('file') || url.searchParams.get('file') === f.file),
    );
    const key = (f: StoredFinding): (string | number)[] =>
      q.sort === 'severity' ? [SEVERITY_RANK[f.severity]] : q.sort === 'rule' ? [f.ruleId] : q.sort === 'cell' ? [f.cell] : q.sort === 'location' ? [f.file, f.line, f.column] : [f.instances];
    items = items.sort((a, b) => {
      const ka = [...key(a), a.id];
      const kb = [...key(b), b.id];
      for (let i = 0; i < ka.length; i++) if (ka[i] !== kb[i]) return (ka[i] < kb[i] ? -1 : 1) * (q.order === 'desc' ? -1 : 1);
      return 0;
    });
    const start = (q.page - 1) * q.pageSize;
    return json(200, { items: items.slice(start, start + q.pageSize), total: items.length, page: q.page, pageSize: q.pageSize });
  };
}

/** Routes of the fake API for one finished run. */
export function runRoutes(): Record<string, Handler> {
  return {
    [`GET /api/runs/${RUN_ID}`]: () => json(200, RUN),
    [`GET /api/runs/${RUN_ID}/findings`]: findingsEndpoint(),
    [`GET /api/runs/${RUN_ID}/findings/:findingId`]: ({ params }) => {
      const f = FINDINGS.find((x) => x.id === Number(params.findingId));
      return f ? json(200, f) : json(404, { error: { code: 'not-found', message: 'No such finding.' } });
    },
    [`GET /api/runs/${RUN_ID}/file`]: ({ url }) => {
      const f = FILES.find((x) => x.path === url.searchParams.get('path'));
      return f ? json(200, { path: f.path, size: f.text.length, sha256: '0'.repeat(64), text: f.text, diagnostics: [] }) : json(404, { error: { code: 'not-found', message: 'No such file.' } });
    },
    'GET /api/rules': () => json(200, { items: RULES }),
  };
}
