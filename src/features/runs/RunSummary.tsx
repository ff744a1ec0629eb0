// A finished run at a glance: its findings counted by rule and by cell, each count with the
// instances it stands for in the flattened design, each row a link to those findings.

import { useQuery } from '@tanstack/react-query';
import { Link } from 'react-router';
import type { RunBreakdown } from '../../../shared/api/runs';
import { DataTable, type ColumnDef } from '../../components/DataTable';
import { ToneBadge } from '../../design/severity';
import { ruleCatalogueQuery } from '../findings/queries';

type RuleRow = RunBreakdown['byRule'][number];
type CellRow = RunBreakdown['byCell'][number];

const count = (n: number) => <span className="tabular-nums">{n}</span>;

export function RunSummary({ runId, breakdown }: { runId: string; breakdown: RunBreakdown }) {
  const rules = useQuery(ruleCatalogueQuery);
  const findingsLink = (filter: string, value: string) => `/runs/${encodeURIComponent(runId)}?tab=findings&${filter}=${encodeURIComponent(value)}`;

  const ruleColumns: ColumnDef<RuleRow, any>[] = [
    {
      accessorKey: 'ruleId',
      header: 'Rule',
      cell: ({ row }) => (
        <Link to={findingsLink('rule', row.original.ruleId)} className="block hover:underline">
          <span className="block text-ink-900">{rules.data?.get(row.original.ruleId)?.title ?? row.original.ruleId}</span>
          <span className="font-mono text-xs text-ink-600">{row.original.ruleId}</span>
        </Link>
      ),
    },
    { accessorKey: 'severity', header: 'Severity', cell: ({ row }) => <ToneBadge tone={row.original.severity} /> },
    { accessorKey: 'findings', header: 'Findings', cell: ({ row }) => count(row.original.findings) },
    { accessorKey: 'instances', header: 'Instances', cell: ({ row }) => count(row.original.instances) },
  ];
  const cellColumns: ColumnDef<CellRow, any>[] = [
    {
      accessorKey: 'cell',
      header: 'Cell',
      cell: ({ row }) => (
        <Link to={findingsLink('cell', row.original.cell)} className="font-mono text-well-800 hover:underline">
          {row.original.cell}
        </Link>
      ),
    },
    { accessorKey: 'cellInstances', header: 'Instances', cell: ({ row }) => count(row.original.cellInstances) },
    { accessorKey: 'findings', header: 'Findings', cell: ({ row }) => count(row.original.findings) },
    { accessorKey: 'errors', header: 'Errors', cell: ({ row }) => count(row.original.errors) },
    { accessorKey: 'warnings', header: 'Warnings', cell: ({ row }) => count(row.original.warnings) },
    { accessorKey: 'infos', header: 'Infos', cell: ({ row }) => count(row.original.infos) },
  ];

  return (
    <div className="grid gap-6 2xl:grid-cols-2">
      <section aria-labelledby="by-rule">
        <h2 id="by-rule" className="mb-2 text-base font-semibold text-ink-900">
          By rule
        </h2>
        <DataTable
          caption="Findings by rule"
          data={breakdown.byRule}
          columns={ruleColumns}
          rowKey={(r) => `${r.ruleId}:${r.severity}`}
          initialSorting={[{ id: 'findings', desc: true }]}
          emptyMessage="No rule raised a finding."
        />
      </section>
      <section aria-labelledby="by-cell">
        <h2 id="by-cell" className="mb-2 text-base font-semibold text-ink-900">
          By cell
        </h2>
        <DataTable
          caption="Findings by cell"
          data={breakdown.byCell}
          columns={cellColumns}
          rowKey={(c) => c.cell}
          initialSorting={[{ id: 'findings', desc: true }]}
          emptyMessage="No cell has a finding."
        />
      </section>
    </div>
  );
}
