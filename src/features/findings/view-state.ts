// What the findings table shows — page, sort, filters, the selected finding — lives in the
// address's query string, so a view of a run (and the finding being read) can be shared as a link.

import { FINDING_SORTS, FINDING_STATUSES } from '../../../shared/api/runs';
import { severitySchema, type Severity } from '../../../shared/deck';
import type { Query } from '../../lib/api';

export type FindingSort = (typeof FINDING_SORTS)[number];
export type FindingStatus = (typeof FINDING_STATUSES)[number];

export const STATUS_LABELS: Record<FindingStatus, string> = {
  open: 'Open',
  waived: 'Waived',
  'waiver-requested': 'Waiver requested',
  'waiver-lapsed': 'Waiver lapsed',
};

export const PAGE_SIZES = [25, 50, 100, 200] as const;
export const DEFAULT_PAGE_SIZE = 50;

export interface FindingsView {
  page: number;
  pageSize: number;
  sort: FindingSort;
  order: 'asc' | 'desc';
  rule: string | null;
  severity: Severity[];
  cell: string | null;
  status: FindingStatus | null;
  q: string;
}

/** Query-string names of the view; `finding` is the selected finding's id. */
export const VIEW_KEYS = ['page', 'size', 'sort', 'order', 'rule', 'severity', 'cell', 'status', 'q'] as const;
export const FINDING_KEY = 'finding';

function oneOf<T extends string>(value: string | null, allowed: readonly T[], fallback: T): T {
  return value !== null && (allowed as readonly string[]).includes(value) ? (value as T) : fallback;
}

export function readView(params: URLSearchParams): FindingsView {
  const page = Number(params.get('page'));
  const size = Number(params.get('size'));
  return {
    page: Number.isInteger(page) && page >= 1 ? page : 1,
    pageSize: (PAGE_SIZES as readonly number[]).includes(size) ? size : DEFAULT_PAGE_SIZE,
    sort: oneOf(params.get('sort'), FINDING_SORTS, 'severity'),
    order: oneOf(params.get('order'), ['asc', 'desc'] as const, 'asc'),
    rule: params.get('rule') || null,
    severity: (params.get('severity') ?? '')
      .split(',')
      .filter((s): s is Severity => severitySchema.safeParse(s).success),
    cell: params.get('cell') || null,
    status: (FINDING_STATUSES as readonly string[]).includes(params.get('status') ?? '') ? (params.get('status') as FindingStatus) : null,
    q: params.get('q') ?? '',
  };
}

/** The view written back into the query string; other parameters (tab, finding, …) are kept. */
export function writeView(params: URLSearchParams, view: FindingsView): URLSearchParams {
  const next = new URLSearchParams(params);
  for (const key of VIEW_KEYS) next.delete(key);
  if (view.page > 1) next.set('page', String(view.page));
  if (view.pageSize !== DEFAULT_PAGE_SIZE) next.set('size', String(view.pageSize));
  if (view.sort !== 'severity') next.set('sort', view.sort);
  if (view.order !== 'asc') next.set('order', view.order);
  if (view.rule) next.set('rule', view.rule);
  if (view.severity.length) next.set('severity', view.severity.join(','));
  if (view.cell) next.set('cell', view.cell);
  if (view.status) next.set('status', view.status);
  if (view.q) next.set('q', view.q);
  return next;
}

/** The API query of a view (shared/api/runs.ts findingsQuerySchema). */
export function viewQuery(view: FindingsView): Query {
  return {
    page: view.page,
    pageSize: view.pageSize,
    sort: view.sort,
    order: view.order,
    rule: view.rule,
    severity: view.severity.length ? view.severity.join(',') : null,
    cell: view.cell,
    status: view.status,
    q: view.q.trim() || null,
  };
}

export function hasFilters(view: FindingsView): boolean {
  return Boolean(view.rule || view.severity.length || view.cell || view.status || view.q.trim());
}
