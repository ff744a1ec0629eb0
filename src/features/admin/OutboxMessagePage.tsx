import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { useParams } from 'react-router';
import { Loading } from '../../components/LoadState';
import { ErrorNotice, Notice } from '../../components/Notice';
import { PageHeader, Panel } from '../../components/PageHeader';
import { isApiError } from '../../lib/api';
import { useDocumentTitle } from '../../lib/document-title';
import { formatDateTime } from '../../lib/format';
import { NotFoundPage } from '../errors/NotFoundPage';
import { MailStatus } from './MailStatus';
import { outboxMessageQuery } from './queries';

type View = 'text' | 'html';

const MAIL_CSP = `<meta http-equiv="Content-Security-Policy" content="default-src 'none'; style-src 'unsafe-inline'; img-src data:">`;

export function OutboxMessagePage() {
  const { messageId = '' } = useParams();
  const message = useQuery(outboxMessageQuery(messageId));
  const [view, setView] = useState<View>('text');
  useDocumentTitle(message.data?.subject ?? 'Message');

  if (message.isPending) return <Loading label="Loading the message…" />;
  if (message.isError) {
    if (isApiError(message.error) && (message.error.status === 404 || message.error.code === 'validation')) return <NotFoundPage what="message" />;
    return <ErrorNotice error={message.error} title="Could not load the message" />;
  }
  const m = message.data;
  const views: { id: View; label: string; available: boolean }[] = [
    { id: 'text', label: 'Plain text', available: true },
    { id: 'html', label: 'Formatted', available: !!m.html },
  ];

  return (
    <>
      <PageHeader crumbs={[{ label: 'Outbox', to: '/admin/outbox' }, { label: 'Message' }]} title={m.subject || '(no subject)'} />
      {m.status === 'failed' && m.error && (
        <Notice tone="error" title={`Delivery failed after ${m.attempts} attempt${m.attempts === 1 ? '' : 's'}`} className="mb-5">
          <code className="text-xs">{m.error}</code>
        </Notice>
      )}
      <Panel>
        <dl className="grid grid-cols-[auto_1fr] gap-x-6 gap-y-2 border-b border-ink-200 px-5 py-4 text-sm">
          <dt className="text-ink-500">To</dt>
          <dd className="text-ink-900">{m.to}</dd>
          <dt className="text-ink-500">Status</dt>
          <dd>
            <MailStatus status={m.status} />
          </dd>
          <dt className="text-ink-500">Written</dt>
          <dd className="tabular-nums text-ink-800">{formatDateTime(m.createdAt)}</dd>
          <dt className="text-ink-500">Delivered</dt>
          <dd className="tabular-nums text-ink-800">{formatDateTime(m.sentAt)}</dd>
        </dl>
        <div role="tablist" aria-label="Message body" className="flex gap-1 border-b border-ink-200 px-3 pt-2">
          {views
            .filter((v) => v.available)
            .map((v) => (
              <button
                key={v.id}
                id={`tab-${v.id}`}
                type="button"
                role="tab"
                aria-selected={view === v.id}
                aria-controls={`panel-${v.id}`}
                onClick={() => setView(v.id)}
                className={`-mb-px rounded-t-md border-b-2 px-3 py-2 text-sm font-medium ${view === v.id ? 'border-well-600 text-well-800' : 'border-transparent text-ink-600 hover:text-ink-900'}`}
              >
                {v.label}
              </button>
            ))}
        </div>
        <div role="tabpanel" id={`panel-${view}`} aria-labelledby={`tab-${view}`} className="p-5">
          {view === 'text' || !m.html ? (
            <pre className="whitespace-pre-wrap break-words font-mono text-sm leading-6 text-ink-800">{m.text}</pre>
          ) : (
            // No scripts, no navigation, no same-origin access, nothing fetched: the HTML is shown, never run.
            <iframe title="Formatted message" sandbox="" srcDoc={MAIL_CSP + m.html} className="h-[32rem] w-full rounded border border-ink-200 bg-white" />
          )}
        </div>
      </Panel>
    </>
  );
}
