import { ToneBadge } from '../../design/severity';

export function MailStatus({ status }: { status: 'queued' | 'sent' | 'failed' }) {
  if (status === 'sent') return <ToneBadge tone="ok" label="Sent" />;
  if (status === 'failed') return <ToneBadge tone="error" label="Failed" />;
  return <ToneBadge tone="info" label="Queued" />;
}
