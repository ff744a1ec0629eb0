// The findings of a run, paged, sorted and filtered by the server (TanStack Table in manual
// mode: the table holds the state, the address holds the view, the API does the work).
// Keyboard: j / ↓ and k / ↑ move through the rows (on to the next or previous page at the
// ends), Enter opens the finding beside the table.

import {
  flexRender,
  getCoreRowModel,
  useReactTable,
  type ColumnDef,
  type ColumnFiltersState,
  type PaginationState,
  type SortingState,
  type Updater,
  type VisibilityState,
} from '@tanstack/react-table';
import { useEffect, useMemo, useRef, useState, type KeyboardEvent } from 'react';
import type { RuleCatalogueEntry } from '../../../shared/api/decks';
import type { StoredFinding } from '../../../shared/api/runs';
import type { Severity } from '../../../shared/deck';
import { Button } from '../../components/Button';
import { TONE_LABELS, ToneBadge, ToneGlyph } from '../../design/severity';
import { formatQuantity } from './quantity';
import { PAGE_SIZES, STATUS_LABELS, type FindingSort, type FindingStatus, type FindingsView } from './view-state';

export type FindingColumnId = 'severity' | 'rule' | 'message' | 'cell' | 'location' | 'instances' | 'measured' | 'limit' | 'nets' | 'devices' | 'corner' | 'status';

export const COLUMN_LABELS: Record<FindingColumnId, string> = {
  severity: 'Severity',
  rule: 'Rule',
  message: 'Message',
  cell: 'Cell',
  location: 'Location',
  instances: 'Instances',
  measured: 'Measured',
  limit: 'Limit',
  nets: 'Nets',
  devices: 'Devices',
  corner: 'Corner',
  status: 'Status',
};

/** Shown until the reader chooses otherwise: enough to tell findings apart at 1280 px beside the detail. */
export const DEFAULT_COLUMNS: VisibilityState = { instances: false, limit: false, nets: false, devices: false, corner: false, status: false };

const SORTABLE: ReadonlySet<string> = new Set<FindingSort>(['severity', 'rule', 'cell', 'location', 'instances']);

function names(list: string[]) {
  if (!list.length) return <span className="text-ink-400">—</span>;
  const shown = list.slice(0, 3).join(', ');
  return (
    <span className="font-mono text-xs" title={list.join(', ')}>
      {shown}
      {list.length > 3 && <span className="text-ink-500"> +{list.length - 3}</span>}
    </span>
  );
}

function buildColumns(rules: Map<string, RuleCatalogueEntry> | undefined): ColumnDef<StoredFinding, any>[] {
  const columns: ColumnDef<StoredFinding, any>[] = [
    {
      id: 'severity',
      header: COLUMN_LABELS.severity,
      accessorKey: 'severity',
      cell: ({ row }) => (
        <span className="flex flex-col items-start gap-1">
          <ToneBadge tone={row.original.severity} />
          {row.original.status === 'waived' && <ToneBadge tone="waived" />}
          {row.original.status !== 'waived' && row.original.status !== 'open' && <span className="text-xs text-ink-600">{STATUS_LABELS[row.original.status]}</span>}
        </span>
      ),
    },
    {
      id: 'rule',
      header: COLUMN_LABELS.rule,
      accessorKey: 'ruleId',
      cell: ({ row }) => {
        const title = rules?.get(row.original.ruleId)?.title;
        // The rule's title when the catalogue has it (its id is in the detail and on hover), else its id.
        return title ? (
          <span className="line-clamp-3 block min-w-[8rem] text-ink-900" title={row.original.ruleId}>
            {title}
          </span>
        ) : (
          <span className="font-mono text-xs text-ink-700">{row.original.ruleId}</span>
        );
      },
    },
    {
      id: 'message',
      header: COLUMN_LABELS.message,
      accessorKey: 'message',
      cell: ({ row }) => (
        <span className="line-clamp-2 min-w-[13rem] text-ink-800" title={row.original.message}>
          {row.original.message}
        </span>
      ),
    },
    { id: 'cell', header: COLUMN_LABELS.cell, accessorKey: 'cell', cell: ({ row }) => <span className="font-mono text-xs">{row.original.cell}</span> },
    {
      id: 'location',
      header: COLUMN_LABELS.location,
      accessorFn: (f) => `${f.file}:${f.line}`,
      cell: ({ row }) => (
        <span className="whitespace-nowrap font-mono text-xs">
          {row.original.file}:{row.original.line}
        </span>
      ),
    },
    { id: 'instances', header: COLUMN_LABELS.instances, accessorKey: 'instances', cell: ({ row }) => <span className="tabular-nums">×{row.original.instances}</span> },
    { id: 'measured', header: COLUMN_LABELS.measured, accessorFn: (f) => f.measured?.value, cell: ({ row }) => <span className="whitespace-nowrap tabular-nums">{formatQuantity(row.original.measured)}</span> },
    { id: 'limit', header: COLUMN_LABELS.limit, accessorFn: (f) => f.limit?.value, cell: ({ row }) => <span className="whitespace-nowrap tabular-nums">{formatQuantity(row.original.limit)}</span> },
    { id: 'nets', header: COLUMN_LABELS.nets, accessorFn: (f) => f.nets.join(' '), cell: ({ row }) => names(row.original.nets) },
    { id: 'devices', header: COLUMN_LABELS.devices, accessorFn: (f) => f.devices.join(' '), cell: ({ row }) => names(row.original.devices) },
    { id: 'corner', header: COLUMN_LABELS.corner, accessorFn: (f) => f.corner ?? '', cell: ({ row }) => <span className="font-mono text-xs">{row.original.corner ?? '—'}</span> },
    {
      id: 'status',
      header: COLUMN_LABELS.status,
      accessorKey: 'status',
      cell: ({ row }) =>
        row.original.status === 'waived' ? <ToneBadge tone="waived" /> : <span className="text-xs text-ink-600">{STATUS_LABELS[row.original.status]}</span>,
    },
  ];
  return columns.map((c) => ({ ...c, enableSorting: SORTABLE.has(c.id ?? '') }));
}

function resolve<T>(updater: Updater<T>, old: T): T {
  return typeof updater === 'function' ? (updater as (old: T) => T)(old) : updater;
}

export interface FindingsTableProps {
  rows: StoredFinding[];
  total: number;
  view: FindingsView;
  onViewChange: (view: FindingsView) => void;
  selectedId: number | null;
  onOpen: (finding: StoredFinding) => void;
  columnVisibility: VisibilityState;
  onColumnVisibilityChange: (visibility: VisibilityState) => void;
  rules?: Map<string, RuleCatalogueEntry>;
  /** Choices of the rule and cell filters (from the run's breakdown), with their counts of findings. */
  ruleOptions: { id: string; findings: number }[];
  cellOptions: { cell: string; findings: number }[];
  /** A new page is being fetched (the rows shown are the previous page's). */
  busy?: boolean;
  caption: string;
}

export function FindingsTable({
  rows,
  total,
  view,
  onViewChange,
  selectedId,
  onOpen,
  columnVisibility,
  onColumnVisibilityChange,
  rules,
  ruleOptions,
  cellOptions,
  busy,
  caption,
}: FindingsTableProps) {
  const columns = useMemo(() => buildColumns(rules), [rules]);
  const sorting: SortingState = [{ id: view.sort, desc: view.order === 'desc' }];
  const pagination: PaginationState = { pageIndex: view.page - 1, pageSize: view.pageSize };
  const columnFilters: ColumnFiltersState = [
    ...(view.rule ? [{ id: 'rule', value: view.rule }] : []),
    ...(view.severity.length ? [{ id: 'severity', value: view.severity }] : []),
    ...(view.cell ? [{ id: 'cell', value: view.cell }] : []),
    ...(view.status ? [{ id: 'status', value: view.status }] : []),
  ];

  const table = useReactTable({
    data: rows,
    columns,
    getRowId: (f) => String(f.id),
    getCoreRowModel: getCoreRowModel(),
    manualPagination: true,
    manualSorting: true,
    manualFiltering: true,
    rowCount: total,
    enableMultiSort: false,
    enableSortingRemoval: false,
    state: { sorting, pagination, columnFilters, globalFilter: view.q, columnVisibility },
    onSortingChange: (updater) => {
      const next = resolve(updater, sorting)[0];
      if (next) onViewChange({ ...view, sort: next.id as FindingSort, order: next.desc ? 'desc' : 'asc', page: 1 });
    },
    onPaginationChange: (updater) => {
      const next = resolve(updater, pagination);
      onViewChange({ ...view, page: next.pageIndex + 1, pageSize: next.pageSize });
    },
    onColumnFiltersChange: (updater) => {
      const next = resolve(updater, columnFilters);
      const value = (id: string) => next.find((f) => f.id === id)?.value;
      onViewChange({
        ...view,
        page: 1,
        rule: (value('rule') as string | undefined) || null,
        severity: (value('severity') as Severity[] | undefined) ?? [],
        cell: (value('cell') as string | undefined) || null,
        status: (value('status') as FindingStatus | undefined) ?? null,
      });
    },
    onGlobalFilterChange: (updater) => onViewChange({ ...view, page: 1, q: String(resolve(updater, view.q) ?? '') }),
    onColumnVisibilityChange: (updater) => onColumnVisibilityChange(resolve(updater, columnVisibility)),
  });

  const bodyRef = useRef<HTMLTableSectionElement>(null);
  const [cursor, setCursor] = useState(0);
  /** After a keyboard move onto another page: which row takes focus once it arrives. */
  const pendingFocus = useRef<'first' | 'last' | null>(null);
  const rowModel = table.getRowModel().rows;

  useEffect(() => {
    const selected = rows.findIndex((f) => f.id === selectedId);
    if (pendingFocus.current && !busy) {
      const index = pendingFocus.current === 'first' ? 0 : rows.length - 1;
      pendingFocus.current = null;
      setCursor(Math.max(0, index));
      focusRow(Math.max(0, index));
    } else if (selected >= 0) setCursor(selected);
    else setCursor((c) => Math.min(c, Math.max(0, rows.length - 1)));
  }, [rows, selectedId, busy]);

  function focusRow(index: number) {
    bodyRef.current?.querySelectorAll<HTMLTableRowElement>('tr[data-finding-id]')[index]?.focus();
  }

  function onKeyDown(event: KeyboardEvent<HTMLTableSectionElement>) {
    if (event.altKey || event.ctrlKey || event.metaKey) return;
    const key = event.key;
    if (key === 'j' || key === 'ArrowDown') {
      event.preventDefault();
      if (cursor < rows.length - 1) {
        setCursor(cursor + 1);
        focusRow(cursor + 1);
      } else if (table.getCanNextPage()) {
        pendingFocus.current = 'first';
        table.nextPage();
      }
    } else if (key === 'k' || key === 'ArrowUp') {
      event.preventDefault();
      if (cursor > 0) {
        setCursor(cursor - 1);
        focusRow(cursor - 1);
      } else if (table.getCanPreviousPage()) {
        pendingFocus.current = 'last';
        table.previousPage();
      }
    } else if (key === 'Enter' || key === ' ') {
      event.preventDefault();
      const finding = rows[cursor];
      if (finding) onOpen(finding);
    } else if (key === 'Home') {
      event.preventDefault();
      setCursor(0);
      focusRow(0);
    } else if (key === 'End') {
      event.preventDefault();
      setCursor(rows.length - 1);
      focusRow(rows.length - 1);
    }
  }

  const pageCount = Math.max(1, table.getPageCount());
  const first = total === 0 ? 0 : (view.page - 1) * view.pageSize + 1;
  const last = Math.min(total, view.page * view.pageSize);

  return (
    <div>
      <FilterBar table={table} view={view} rules={rules} ruleOptions={ruleOptions} cellOptions={cellOptions} />
      <div className="overflow-x-auto rounded-lg border border-ink-200 bg-white shadow-xs" aria-busy={busy || undefined}>
        <table role="grid" aria-rowcount={total + 1} className={`w-full border-collapse text-left text-sm ${busy ? 'opacity-70' : ''}`}>
          <caption className="sr-only">
            {caption}. Use j and k or the arrow keys to move through the findings, Enter to open one.
          </caption>
          <thead className="border-b border-ink-200 bg-ink-50 text-xs font-semibold uppercase tracking-wide text-ink-600">
            {table.getHeaderGroups().map((group) => (
              <tr key={group.id}>
                {group.headers.map((header) => {
                  const sorted = header.column.getIsSorted();
                  const label = flexRender(header.column.columnDef.header, header.getContext());
                  return (
                    <th
                      key={header.id}
                      scope="col"
                      className="whitespace-nowrap px-2.5 py-2.5"
                      aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : header.column.getCanSort() ? 'none' : undefined}
                    >
                      {header.column.getCanSort() ? (
                        <button type="button" onClick={header.column.getToggleSortingHandler()} className="inline-flex items-center gap-1 uppercase hover:text-ink-900">
                          {label}
                          <span aria-hidden="true" className="text-ink-400">
                            {sorted === 'asc' ? '↑' : sorted === 'desc' ? '↓' : '↕'}
                          </span>
                        </button>
                      ) : (
                        label
                      )}
                    </th>
                  );
                })}
              </tr>
            ))}
          </thead>
          <tbody ref={bodyRef} onKeyDown={onKeyDown} className="divide-y divide-ink-100">
            {rowModel.map((row, index) => {
              const selected = row.original.id === selectedId;
              return (
                <tr
                  key={row.id}
                  data-finding-id={row.original.id}
                  aria-rowindex={(view.page - 1) * view.pageSize + index + 2}
                  aria-selected={selected}
                  tabIndex={index === cursor ? 0 : -1}
                  onClick={() => {
                    setCursor(index);
                    onOpen(row.original);
                  }}
                  onFocus={() => setCursor(index)}
                  className={`cursor-pointer align-top outline-none focus-visible:bg-well-50 focus-visible:shadow-[inset_3px_0_0] focus-visible:shadow-well-600 ${
                    selected ? 'bg-copper-50 shadow-[inset_3px_0_0] shadow-copper-500' : 'hover:bg-ink-50/70'
                  }`}
                >
                  {row.getVisibleCells().map((cell) => (
                    <td key={cell.id} className="px-2.5 py-2.5 text-ink-800">
                      {flexRender(cell.column.columnDef.cell, cell.getContext())}
                    </td>
                  ))}
                </tr>
              );
            })}
            {rows.length === 0 && (
              <tr>
                <td colSpan={table.getVisibleLeafColumns().length} className="px-4 py-8 text-center text-ink-500">
                  {busy ? 'Loading findings…' : 'No finding matches these filters.'}
                </td>
              </tr>
            )}
          </tbody>
        </table>
      </div>
      <nav aria-label="Pages of findings" className="mt-3 flex flex-wrap items-center justify-between gap-3 text-sm text-ink-600">
        <p aria-live="polite" className="tabular-nums">
          {total === 0 ? 'No findings' : `${first}–${last} of ${total} finding${total === 1 ? '' : 's'}`} · page {view.page} of {pageCount}
        </p>
        <div className="flex items-center gap-2">
          <label className="flex items-center gap-1.5">
            <span>Rows per page</span>
            <select
              className="h-8 rounded-md border border-ink-300 bg-white px-2 text-sm"
              value={view.pageSize}
              onChange={(e) => onViewChange({ ...view, pageSize: Number(e.target.value), page: 1 })}
            >
              {PAGE_SIZES.map((n) => (
                <option key={n} value={n}>
                  {n}
                </option>
              ))}
            </select>
          </label>
          <Button size="sm" onClick={() => table.previousPage()} disabled={!table.getCanPreviousPage()}>
            Previous page
          </Button>
          <Button size="sm" onClick={() => table.nextPage()} disabled={!table.getCanNextPage()}>
            Next page
          </Button>
        </div>
      </nav>
    </div>
  );
}

type Table = ReturnType<typeof useReactTable<StoredFinding>>;

const SEVERITIES: Severity[] = ['error', 'warning', 'info'];

/** Filters over the table's column filters and global filter (the text search), sent to the server. */
function FilterBar({ table, view, rules, ruleOptions, cellOptions }: { table: Table; view: FindingsView; rules?: Map<string, RuleCatalogueEntry>; ruleOptions: FindingsTableProps['ruleOptions']; cellOptions: FindingsTableProps['cellOptions'] }) {
  const [text, setText] = useState(view.q);
  useEffect(() => setText(view.q), [view.q]);
  // The search is sent once typing pauses.
  useEffect(() => {
    if (text === view.q) return;
    const timer = setTimeout(() => table.setGlobalFilter(text), 350);
    return () => clearTimeout(timer);
  }, [text]);
  const severity = (table.getColumn('severity')?.getFilterValue() as Severity[] | undefined) ?? [];
  const select = 'h-9 w-full rounded-md border border-ink-300 bg-white px-2 text-sm text-ink-900 shadow-xs';

  return (
    <form
      role="search"
      aria-label="Filter findings"
      className="mb-3 flex flex-wrap items-end gap-3"
      onSubmit={(e) => {
        e.preventDefault();
        table.setGlobalFilter(text);
      }}
    >
      <fieldset className="flex items-center gap-2">
        <legend className="mb-1 text-xs font-medium text-ink-700">Severity</legend>
        {SEVERITIES.map((s) => (
          <label key={s} className="inline-flex h-9 items-center gap-1.5 rounded-md border border-ink-300 bg-white px-2 text-sm shadow-xs has-[:checked]:border-well-600 has-[:checked]:bg-well-50">
            <input
              type="checkbox"
              className="size-4 accent-well-700"
              checked={severity.includes(s)}
              onChange={(e) => table.getColumn('severity')?.setFilterValue(e.target.checked ? [...severity, s] : severity.filter((x) => x !== s))}
            />
            <ToneGlyph tone={s} size={11} />
            {TONE_LABELS[s]}
          </label>
        ))}
      </fieldset>
      <label className="w-56 text-xs font-medium text-ink-700">
        <span className="mb-1 block">Rule</span>
        <select className={select} value={view.rule ?? ''} onChange={(e) => table.getColumn('rule')?.setFilterValue(e.target.value || undefined)}>
          <option value="">All rules</option>
          {ruleOptions.map((r) => (
            <option key={r.id} value={r.id}>
              {rules?.get(r.id)?.title ?? r.id} ({r.findings})
            </option>
          ))}
          {view.rule && !ruleOptions.some((r) => r.id === view.rule) && <option value={view.rule}>{view.rule}</option>}
        </select>
      </label>
      <label className="w-48 text-xs font-medium text-ink-700">
        <span className="mb-1 block">Cell</span>
        <select className={`${select} font-mono`} value={view.cell ?? ''} onChange={(e) => table.getColumn('cell')?.setFilterValue(e.target.value || undefined)}>
          <option value="">All cells</option>
          {cellOptions.map((c) => (
            <option key={c.cell} value={c.cell}>
              {c.cell} ({c.findings})
            </option>
          ))}
          {view.cell && !cellOptions.some((c) => c.cell === view.cell) && <option value={view.cell}>{view.cell}</option>}
        </select>
      </label>
      <label className="w-40 text-xs font-medium text-ink-700">
        <span className="mb-1 block">Status</span>
        <select className={select} value={view.status ?? ''} onChange={(e) => table.getColumn('status')?.setFilterValue(e.target.value || undefined)}>
          <option value="">Any</option>
          {(Object.keys(STATUS_LABELS) as FindingStatus[]).map((st) => (
            <option key={st} value={st}>
              {STATUS_LABELS[st]}
            </option>
          ))}
        </select>
      </label>
      <label className="min-w-[12rem] flex-1 text-xs font-medium text-ink-700">
        <span className="mb-1 block">Text in message, net or device</span>
        <input type="search" className={`${select} px-3`} value={text} onChange={(e) => setText(e.target.value)} placeholder="e.g. dyn_ml or keeper" />
      </label>
      <ColumnChooser table={table} />
    </form>
  );
}

/** Which columns the table shows: the reader's choice, kept in this browser by the page. */
function ColumnChooser({ table }: { table: Table }) {
  const [open, setOpen] = useState(false);
  const ids = Object.keys(COLUMN_LABELS) as FindingColumnId[];
  const panelRef = useRef<HTMLDivElement>(null);
  useEffect(() => {
    if (!open) return;
    const close = (e: MouseEvent) => {
      if (!panelRef.current?.contains(e.target as Node)) setOpen(false);
    };
    document.addEventListener('mousedown', close);
    return () => document.removeEventListener('mousedown', close);
  }, [open]);
  return (
    <div className="relative" ref={panelRef}>
      <Button className="h-9" size="sm" aria-expanded={open} aria-controls="finding-columns" onClick={() => setOpen(!open)}>
        Columns
      </Button>
      {open && (
        <fieldset
          id="finding-columns"
          className="absolute right-0 z-20 mt-1 w-52 rounded-md border border-ink-200 bg-white p-3 shadow-md"
          onKeyDown={(e) => {
            if (e.key === 'Escape') setOpen(false);
          }}
        >
          <legend className="sr-only">Columns to show</legend>
          <ul className="space-y-1.5 text-sm">
            {ids.map((id) => (
              <li key={id}>
                <label className="flex items-center gap-2">
                  <input
                    type="checkbox"
                    className="size-4 accent-well-700"
                    checked={table.getColumn(id)?.getIsVisible() ?? false}
                    disabled={id === 'severity' || id === 'message'}
                    onChange={(e) => table.getColumn(id)?.toggleVisibility(e.target.checked)}
                  />
                  {COLUMN_LABELS[id]}
                </label>
              </li>
            ))}
          </ul>
        </fieldset>
      )}
    </div>
  );
}

