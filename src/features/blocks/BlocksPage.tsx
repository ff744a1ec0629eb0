import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Link, useNavigate } from 'react-router';
import type { Block } from '../../../shared/api/blocks';
import { Button } from '../../components/Button';
import { DataTable, type ColumnDef } from '../../components/DataTable';
import { EmptyState } from '../../components/EmptyState';
import { Icon } from '../../components/Icon';
import { Loading } from '../../components/LoadState';
import { ErrorNotice } from '../../components/Notice';
import { PageHeader } from '../../components/PageHeader';
import { useDocumentTitle } from '../../lib/document-title';
import { formatDate } from '../../lib/format';
import { useCan } from '../../lib/session';
import { NewBlockForm } from './NewBlockForm';
import { blocksQuery } from './queries';

const columns: ColumnDef<Block, any>[] = [
  {
    accessorKey: 'name',
    header: 'Block',
    cell: ({ row }) => (
      <Link to={`/blocks/${row.original.id}`} className="font-mono font-medium text-well-800 hover:underline">
        {row.original.name}
      </Link>
    ),
  },
  {
    accessorKey: 'description',
    header: 'Description',
    enableSorting: false,
    cell: ({ getValue }) => <span className="text-ink-600">{(getValue() as string) || '—'}</span>,
  },
  {
    accessorKey: 'createdAt',
    header: 'Created',
    cell: ({ getValue }) => <span className="whitespace-nowrap tabular-nums text-ink-600">{formatDate(getValue() as string)}</span>,
  },
];

export function BlocksPage() {
  useDocumentTitle('Blocks');
  const blocks = useQuery(blocksQuery);
  const canCreate = useCan('block.create');
  const [creating, setCreating] = useState(false);
  const navigate = useNavigate();

  const newButton = canCreate && !creating && (
    <Button variant="primary" onClick={() => setCreating(true)}>
      <Icon name="plus" /> New block
    </Button>
  );

  return (
    <>
      <PageHeader
        title="Blocks"
        description="A block is a piece of the design your team reviews as a unit: a register file, a domino adder, a latch bank. Each run checks one netlist of one block."
        actions={newButton}
      />
      {creating && <NewBlockForm onCancel={() => setCreating(false)} onCreated={(block) => navigate(`/blocks/${block.id}`)} />}
      {blocks.isPending && <Loading label="Loading blocks…" />}
      {blocks.isError && <ErrorNotice error={blocks.error} title="Could not load the blocks" />}
      {blocks.data &&
        (blocks.data.length === 0 ? (
          <EmptyState
            title="No blocks yet"
            illustration="list"
            steps={
              canCreate
                ? ['Create a block with “New block” and give it the name designers use for it.', 'Submit its netlist for a check run; the findings appear on the block’s page.']
                : ['A designer or methodology owner creates the block.', 'Its runs and findings then appear here for you to read.']
            }
          >
            Your team’s blocks will be listed here, newest first, each with its check runs.
          </EmptyState>
        ) : (
          <DataTable caption="Blocks of your team" data={blocks.data} columns={columns} rowKey={(b) => b.id} initialSorting={[{ id: 'createdAt', desc: true }]} />
        ))}
    </>
  );
}
