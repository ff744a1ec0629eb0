// /decks/:deckId: a deck's history of versions, which one new runs use, and the
// comparison of any two versions.

import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { Link, useNavigate, useParams } from 'react-router';
import type { DeckDetail, DeckVersionSummary } from '../../../shared/api/decks';
import { Button, ButtonLink } from '../../components/Button';
import { DataTable, type ColumnDef } from '../../components/DataTable';
import { Loading } from '../../components/LoadState';
import { ErrorNotice } from '../../components/Notice';
import { PageHeader, Panel, Section } from '../../components/PageHeader';
import { isApiError } from '../../lib/api';
import { useDocumentTitle } from '../../lib/document-title';
import { formatDateTime } from '../../lib/format';
import { useCan } from '../../lib/session';
import { NotFoundPage } from '../errors/NotFoundPage';
import { DiffView } from './DiffView';
import { SelectField } from './fields';
import { deckQuery, diffQuery, exportUrl, useCreateDraft, useMakeDefault } from './queries';
import { VersionState } from './VersionState';

function Compare({ deck }: { deck: DeckDetail }) {
  const versions = deck.versions;
  const newest = versions[0];
  const [toId, setToId] = useState(newest.id);
  const to = versions.find((v) => v.id === toId) ?? newest;
  const [fromId, setFromId] = useState(to.parentVersionId ?? versions[1]?.id ?? newest.id);
  const diff = useQuery(diffQuery(fromId, toId));
  const options = versions.map((v) => ({ value: v.id, label: `Version ${v.version}${v.state === 'draft' ? ' (draft)' : ''}` }));
  return (
    <Panel className="p-4">
      <div className="mb-4 flex flex-wrap items-end gap-3">
        <SelectField label="From" className="w-48" options={options} value={fromId} onChange={(e) => setFromId(e.target.value)} />
        <SelectField label="To" className="w-48" options={options} value={toId} onChange={(e) => setToId(e.target.value)} />
      </div>
      {diff.isPending ? <Loading label="Comparing…" /> : diff.isError ? <ErrorNotice error={diff.error} title="Could not compare the versions" /> : <DiffView diff={diff.data} />}
    </Panel>
  );
}

export function DeckPage() {
  const { deckId = '' } = useParams();
  const deck = useQuery(deckQuery(deckId));
  const canEdit = useCan('deck.edit');
  const canPublish = useCan('deck.publish');
  const navigate = useNavigate();
  const createDraft = useCreateDraft(deckId);
  const makeDefault = useMakeDefault(deckId);
  useDocumentTitle(deck.data?.name ?? 'Rule deck');

  if (deck.isPending) return <Loading label="Loading the deck…" />;
  if (deck.isError) {
    if (isApiError(deck.error) && (deck.error.status === 404 || deck.error.code === 'validation')) return <NotFoundPage what="rule deck" />;
    return <ErrorNotice error={deck.error} title="Could not load the deck" />;
  }
  const d = deck.data;

  const columns: ColumnDef<DeckVersionSummary, any>[] = [
    {
      accessorKey: 'version',
      header: 'Version',
      cell: ({ row }) => (
        <Link to={`/decks/${d.id}/versions/${row.original.id}`} className="font-medium tabular-nums text-well-800 hover:underline">
          Version {row.original.version}
        </Link>
      ),
    },
    {
      accessorKey: 'state',
      header: 'State',
      enableSorting: false,
      cell: ({ row }) => <VersionState version={row.original} />,
    },
    {
      accessorKey: 'changeNote',
      header: 'Change note',
      enableSorting: false,
      cell: ({ row }) =>
        row.original.state === 'draft' ? (
          <span className="text-ink-500">
            Draft{row.original.parentVersion ? ` started from version ${row.original.parentVersion}` : ''}, {row.original.lockVersion} edit{row.original.lockVersion === 1 ? '' : 's'}
          </span>
        ) : (
          <span className="whitespace-pre-line">{row.original.changeNote}</span>
        ),
    },
    {
      id: 'published',
      header: 'Published',
      enableSorting: false,
      cell: ({ row }) =>
        row.original.publishedAt ? (
          <span className="whitespace-nowrap text-ink-600">
            {formatDateTime(row.original.publishedAt)}
            {row.original.publishedBy && <span className="block text-xs">{row.original.publishedBy.name}</span>}
          </span>
        ) : (
          '—'
        ),
    },
    {
      id: 'actions',
      header: () => <span className="sr-only">Actions</span>,
      enableSorting: false,
      cell: ({ row }) => {
        const v = row.original;
        return (
          <span className="flex flex-wrap justify-end gap-1.5">
            <a className="text-sm text-well-800 hover:underline" href={exportUrl(d.id, v.id)} download>
              Export JSON<span className="sr-only"> of version {v.version}</span>
            </a>
            {canPublish && v.state === 'published' && !(v.isDeckDefault && d.teamDefault) && (
              <Button size="sm" busy={makeDefault.isPending && makeDefault.variables === v.id} onClick={() => makeDefault.mutate(v.id)}>
                Use for new runs<span className="sr-only"> (version {v.version})</span>
              </Button>
            )}
          </span>
        );
      },
    },
  ];

  const startDraft =
    canEdit &&
    (d.draft ? (
      <ButtonLink variant="primary" to={`/decks/${d.id}/versions/${d.draft.id}`}>
        Open the draft (version {d.draft.version})
      </ButtonLink>
    ) : d.latestPublished ? (
      <Button variant="primary" busy={createDraft.isPending} onClick={() => createDraft.mutate(undefined, { onSuccess: (v) => navigate(`/decks/${d.id}/versions/${v.id}`) })}>
        Start a draft from version {d.latestPublished.version}
      </Button>
    ) : null);

  return (
    <>
      <PageHeader
        crumbs={[{ label: 'Rule decks', to: '/decks' }, { label: d.name }]}
        title={d.name}
        description={d.description || undefined}
        meta={
          <>
            <span>{d.defaultVersion ? `New runs use version ${d.defaultVersion.version}` : 'No version published yet'}</span>
            {d.teamDefault && <span className="font-medium text-well-800">The team’s default deck</span>}
          </>
        }
        actions={startDraft}
      />
      {createDraft.isError && <ErrorNotice error={createDraft.error} title="No draft started" className="mb-4" />}
      {makeDefault.isError && <ErrorNotice error={makeDefault.error} title="The default was not changed" className="mb-4" />}
      <Section title="Versions" description="Published versions never change; every run records the version it was checked against.">
        <DataTable caption={`Versions of ${d.name}`} data={d.versions} columns={columns} rowKey={(v) => v.id} initialSorting={[{ id: 'version', desc: true }]} />
      </Section>
      {d.versions.length > 1 && (
        <Section title="Compare versions" description="Rules switched, re-graded or re-tuned, corners, clocks, supplies and the device map, old → new.">
          <Compare deck={d} />
        </Section>
      )}
    </>
  );
}
