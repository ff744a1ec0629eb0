import { useQuery } from '@tanstack/react-query';
import { Link, useSearchParams } from 'react-router';
import { z } from 'zod';
import { outboxMessageSummarySchema } from '../../../shared/api/admin';
import { Button } from '../../components/Button';
import { DataTable, type ColumnDef } from '../../components/DataTable';
import { EmptyState } from '../../components/EmptyState';
import { Loading } from '../../components/LoadState';
import { ErrorNotice } from '../../components/Notice';
import { PageHeader } from '../../components/PageHeader';
import { useDocumentTitle } from '../../lib/document-title';
import { formatDateTime } from '../../lib/format';
import { MailStatus } from './MailStatus';
import { OUTBOX_PAGE_SIZE, outboxQuery } from './queries';

type Summary = z.infer<typeof outboxMessageSummarySchema>;

const columns: ColumnDef<Summary, any>[] = [
  {
    accessorKey: 'subject',
    header: 'Subject',
    cell: ({ row }) => (
      <Link to={`/admin/outbox/${row.original.id}`} className="font-medium text-well-800 hover:underline">
        {row.original.subject || '(no subject)'}
      </Link>
    ),
  },
  { accessorKey: 'to', header: 'To', cell: ({ getValue }) => <span className="text-ink-700">{getValue() as string}</span> },
  { accessorKey: 'status', header: 'Status', cell: ({ row }) => <MailStatus status={row.original.status} /> },
  { accessorKey: 'createdAt', header: 'Written', cell: ({ getValue }) => <span className="whitespace-nowrap tabular-nums text-ink-600">{formatDateTime(getValue() as string)}</span> },
  { accessorKey: 'sentAt', header: 'Delivered', cell: ({ getValue }) => <span className="whitespace-nowrap tabular-nums text-ink-600">{formatDateTime(getValue() as string | null)}</span> },
];

export function OutboxPage() {
  useDocumentTitle('Outbox');
  const [params, setParams] = useSearchParams();
  const page = Math.max(1, Number.parseInt(params.get('page') ?? '1', 10) || 1);
  const outbox = useQuery(outboxQuery(page));
  const pages = outbox.data ? Math.max(1, Math.ceil(outbox.data.total / outbox.data.pageSize)) : 1;
  const goTo = (p: number) => setParams(p === 1 ? {} : { page: String(p) });

  return (
    <>
      <PageHeader
        title="Outbox"
        description="Every e-mail Keepwell writes (invitations, password resets, notices) is kept here with its delivery status, newest first."
      />
      {outbox.isPending && <Loading label="Loading the outbox…" />}
      {outbox.isError && <ErrorNotice error={outbox.error} title="Could not load the outbox" />}
      {outbox.data &&
        (outbox.data.total === 0 ? (
          <EmptyState
            title="No e-mail written yet"
            illustration="mail"
            steps={['Invite someone from Users & invitations, or let someone ask for a password reset.', 'The message appears here at once, and its status changes to sent when the mail server accepts it.']}
          >
            Messages Keepwell sends to your team will be listed here, so you can check an invitation went out or read the link it contained.
          </EmptyState>
        ) : (
          <>
            <DataTable caption={`Outbox, page ${page} of ${pages}`} data={outbox.data.items} columns={columns} rowKey={(m) => m.id} manualSorting />
            <nav aria-label="Outbox pages" className="mt-4 flex items-center justify-between text-sm text-ink-600">
              <p className="tabular-nums">
                {outbox.data.total} message{outbox.data.total === 1 ? '' : 's'} · page {page} of {pages}
              </p>
              <div className="flex gap-2">
                <Button size="sm" disabled={page <= 1} onClick={() => goTo(page - 1)}>
                  ← Newer
                </Button>
                <Button size="sm" disabled={page >= pages} onClick={() => goTo(page + 1)}>
                  Older →
                </Button>
              </div>
            </nav>
          </>
        ))}
      <p className="sr-only">Pages hold {OUTBOX_PAGE_SIZE} messages.</p>
    </>
  );
}
