// Tables of records (users, mail, blocks, later runs and findings) on @tanstack/react-table:
// sortable headers that announce their order, and one consistent look.

import {
  flexRender,
  getCoreRowModel,
  getSortedRowModel,
  useReactTable,
  type ColumnDef,
  type SortingState,
} from '@tanstack/react-table';
import { useState, type ReactNode } from 'react';

export type { ColumnDef };

export function DataTable<T>({
  data,
  columns,
  caption,
  initialSorting = [],
  rowKey,
  emptyMessage,
  manualSorting = false,
}: {
  data: T[];
  columns: ColumnDef<T, any>[];
  /** Read by screen readers; visually hidden. */
  caption: string;
  initialSorting?: SortingState;
  rowKey: (row: T) => string;
  emptyMessage?: ReactNode;
  /** For server-paged tables: headers do not re-sort the current page. */
  manualSorting?: boolean;
}) {
  const [sorting, setSorting] = useState<SortingState>(initialSorting);
  const table = useReactTable({
    data,
    columns,
    state: { sorting },
    onSortingChange: setSorting,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: manualSorting ? undefined : getSortedRowModel(),
    enableSorting: !manualSorting,
    getRowId: rowKey,
  });

  return (
    <div className="overflow-x-auto rounded-lg border border-ink-200 bg-white shadow-xs">
      <table className="w-full border-collapse text-left text-sm">
        <caption className="sr-only">{caption}</caption>
        <thead className="border-b border-ink-200 bg-ink-50 text-xs font-semibold uppercase tracking-wide text-ink-600">
          {table.getHeaderGroups().map((group) => (
            <tr key={group.id}>
              {group.headers.map((header) => {
                const sorted = header.column.getIsSorted();
                const canSort = header.column.getCanSort();
                const label = header.isPlaceholder ? null : flexRender(header.column.columnDef.header, header.getContext());
                return (
                  <th
                    key={header.id}
                    scope="col"
                    className="px-4 py-2.5 whitespace-nowrap"
                    aria-sort={sorted === 'asc' ? 'ascending' : sorted === 'desc' ? 'descending' : canSort ? 'none' : undefined}
                  >
                    {canSort ? (
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
        <tbody className="divide-y divide-ink-100">
          {table.getRowModel().rows.map((row) => (
            <tr key={row.id} className="hover:bg-ink-50/70">
              {row.getVisibleCells().map((cell) => (
                <td key={cell.id} className="px-4 py-3 align-top text-ink-800">
                  {flexRender(cell.column.columnDef.cell, cell.getContext())}
                </td>
              ))}
            </tr>
          ))}
          {data.length === 0 && emptyMessage && (
            <tr>
              <td colSpan={columns.length} className="px-4 py-8 text-center text-ink-500">
                {emptyMessage}
              </td>
            </tr>
          )}
        </tbody>
      </table>
    </div>
  );
}
