// Personal API tokens: create one (shown once, to copy), see when each was last used,
// revoke. A CI job sends it as `Authorization: Bearer …` or to `keepwell submit --token`.

import { useQuery } from '@tanstack/react-query';
import { useState, type FormEvent } from 'react';
import { TOKEN_SCOPE_LABELS, TOKEN_SCOPES, type TokenCreated, type TokenScope, type TokenView } from '../../../shared/api/tokens';
import { Button } from '../../components/Button';
import { DataTable, type ColumnDef } from '../../components/DataTable';
import { EmptyState } from '../../components/EmptyState';
import { TextField } from '../../components/Field';
import { Loading } from '../../components/LoadState';
import { ErrorNotice, Notice } from '../../components/Notice';
import { PageHeader, Panel } from '../../components/PageHeader';
import { ToneBadge } from '../../design/severity';
import { useDocumentTitle } from '../../lib/document-title';
import { formatDateTime } from '../../lib/format';
import { tokensQuery, useCreateToken, useRevokeToken } from './queries';

function NewToken({ created, onDismiss }: { created: TokenCreated; onDismiss: () => void }) {
  const [copied, setCopied] = useState(false);
  return (
    <Notice tone="ok" title={`Token “${created.name}” created`} className="mb-4">
      <p>Copy it now: Keepwell keeps only a hash and cannot show it again.</p>
      <div className="mt-2 flex flex-wrap items-center gap-2">
        <code aria-label="New token" className="select-all rounded border border-ink-300 bg-white px-2 py-1 font-mono text-xs text-ink-900">
          {created.token}
        </code>
        <Button
          size="sm"
          onClick={() =>
            navigator.clipboard?.writeText(created.token).then(
              () => setCopied(true),
              () => setCopied(false),
            )
          }
        >
          {copied ? 'Copied' : 'Copy'}
        </Button>
        <Button size="sm" variant="ghost" onClick={onDismiss}>
          Done
        </Button>
      </div>
      <p className="mt-2 text-xs text-ink-600">
        In CI: <code className="font-mono">keepwell submit top.sp --server {window.location.origin} --token $KEEPWELL_TOKEN --block BLOCK</code>
      </p>
    </Notice>
  );
}

export function TokensPage() {
  useDocumentTitle('API tokens');
  const tokens = useQuery(tokensQuery);
  const create = useCreateToken();
  const revoke = useRevokeToken();
  const [name, setName] = useState('');
  const [scope, setScope] = useState<TokenScope>('read');
  const [created, setCreated] = useState<TokenCreated | null>(null);

  const submit = (e: FormEvent) => {
    e.preventDefault();
    if (!name.trim()) return;
    create.mutate({ name: name.trim(), scope }, { onSuccess: (t) => (setCreated(t), setName('')) });
  };

  const columns: ColumnDef<TokenView, any>[] = [
    { id: 'name', header: 'Name', cell: ({ row }) => <span className="font-medium text-ink-900">{row.original.name}</span> },
    { id: 'hint', header: 'Starts with', cell: ({ row }) => <code className="font-mono text-xs">{row.original.hint}…</code> },
    { id: 'scope', header: 'May', cell: ({ row }) => TOKEN_SCOPE_LABELS[row.original.scope].label },
    { id: 'created', header: 'Created', cell: ({ row }) => <span className="whitespace-nowrap tabular-nums">{formatDateTime(row.original.createdAt)}</span> },
    { id: 'used', header: 'Last used', cell: ({ row }) => <span className="whitespace-nowrap tabular-nums">{row.original.lastUsedAt ? formatDateTime(row.original.lastUsedAt) : 'never'}</span> },
    {
      id: 'state',
      header: '',
      cell: ({ row }) =>
        row.original.revokedAt ? (
          <ToneBadge tone="waived" label={`Revoked ${formatDateTime(row.original.revokedAt)}`} />
        ) : (
          <Button size="sm" variant="danger" busy={revoke.isPending && revoke.variables === row.original.id} onClick={() => revoke.mutate(row.original.id)}>
            Revoke
          </Button>
        ),
    },
  ];

  return (
    <>
      <PageHeader
        crumbs={[{ label: 'Settings' }, { label: 'API tokens' }]}
        title="Personal API tokens"
        description="A token lets scripts and continuous-integration jobs use Keepwell as you, without your password: read results, or also submit runs."
      />
      {created && <NewToken created={created} onDismiss={() => setCreated(null)} />}
      <Panel className="mb-6 p-4">
        <form noValidate onSubmit={submit} aria-label="Create a token" className="flex flex-wrap items-end gap-3">
          <TextField label="Name" value={name} onChange={(e) => setName(e.target.value)} placeholder="e.g. nightly CI of the register file" wrapperClassName="min-w-[16rem] flex-1" maxLength={100} />
          <fieldset className="text-sm">
            <legend className="mb-1.5 font-medium text-ink-800">It may</legend>
            <div className="flex gap-4">
              {TOKEN_SCOPES.map((s) => (
                <label key={s} className="flex items-center gap-1.5" title={TOKEN_SCOPE_LABELS[s].description}>
                  <input type="radio" name="token-scope" value={s} checked={scope === s} onChange={() => setScope(s)} />
                  {TOKEN_SCOPE_LABELS[s].label}
                </label>
              ))}
            </div>
          </fieldset>
          <Button type="submit" variant="primary" busy={create.isPending} disabled={!name.trim()}>
            Create token
          </Button>
        </form>
        {create.isError && <ErrorNotice error={create.error} title="The token was not created" className="mt-3" />}
      </Panel>
      {tokens.isPending && <Loading label="Loading your tokens…" />}
      {tokens.isError && <ErrorNotice error={tokens.error} title="Could not load your tokens" />}
      {revoke.isError && <ErrorNotice error={revoke.error} title="The token was not revoked" />}
      {tokens.data &&
        (tokens.data.items.length === 0 ? (
          <EmptyState
            title="No tokens yet"
            illustration="key"
            steps={['Create a token with a name that says where it will be used, and choose whether it may only read or also submit runs.', 'Copy it when it is shown: Keepwell stores only a hash and cannot show it again.', 'Revoke it here when the job or machine no longer needs it.']}
          >
            Your tokens will be listed here with their scope, when each was created and when it was last used.
          </EmptyState>
        ) : (
          <DataTable data={tokens.data.items} columns={columns} caption="Your API tokens" rowKey={(t) => t.id} />
        ))}
    </>
  );
}
