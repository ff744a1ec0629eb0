// /decks: the team's rule decks, and starting a new one from Keepwell's built-in deck
// or from an exported deck file.

import { useQuery } from '@tanstack/react-query';
import { useState } from 'react';
import { useForm } from 'react-hook-form';
import { Link, useNavigate } from 'react-router';
import { createDeckBodySchema, type DeckSummary } from '../../../shared/api/decks';
import { Button } from '../../components/Button';
import { DataTable, type ColumnDef } from '../../components/DataTable';
import { EmptyState } from '../../components/EmptyState';
import { TextAreaField, TextField } from '../../components/Field';
import { Icon } from '../../components/Icon';
import { Loading } from '../../components/LoadState';
import { ErrorNotice, Notice } from '../../components/Notice';
import { PageHeader, Panel } from '../../components/PageHeader';
import { isApiError } from '../../lib/api';
import { useDocumentTitle } from '../../lib/document-title';
import { formatDate } from '../../lib/format';
import { formResolver } from '../../lib/form';
import { useCan } from '../../lib/session';
import { ImportButton } from './ImportButton';
import { decksQuery, useCreateDeck } from './queries';

export { DeckPage } from './DeckPage';
export { DeckVersionPage } from './DeckVersionPage';

const newDeckSchema = createDeckBodySchema.pick({ name: true, description: true });

function NewDeckForm({ imported, onCancel }: { imported: { content: unknown; fileName: string } | null; onCancel: () => void }) {
  const navigate = useNavigate();
  const create = useCreateDeck();
  const importedName = (imported?.content as { name?: unknown } | undefined)?.name;
  const form = useForm({
    resolver: formResolver(newDeckSchema),
    defaultValues: { name: typeof importedName === 'string' ? importedName : '', description: '' },
  });
  const { errors } = form.formState;
  return (
    <Panel className="mb-6 p-5">
      <form
        noValidate
        aria-labelledby="new-deck-title"
        className="space-y-4"
        onSubmit={form.handleSubmit((values) =>
          create.mutate(
            { ...values, ...(imported ? { content: imported.content } : {}) },
            {
              onSuccess: (deck) => navigate(`/decks/${deck.id}/versions/${deck.versions[0].id}`),
              onError: (error) => {
                if (isApiError(error, 'conflict')) form.setError('name', { message: 'Your team already has a deck with this name.' });
              },
            },
          ),
        )}
      >
        <h2 id="new-deck-title" className="text-base font-semibold text-ink-900">
          {imported ? `New deck from ${imported.fileName}` : 'New deck from Keepwell’s built-in rules'}
        </h2>
        <p className="text-sm text-ink-600">
          {imported
            ? 'The file’s rules, corners and naming become the deck’s first draft. Every field is checked; a problem is shown with the field it concerns.'
            : 'The first draft holds every rule with its default severity and thresholds, and three corners of a generic 0.25 µm process. Replace the corners with your foundry’s before relying on absolute figures.'}
        </p>
        {create.isError && !isApiError(create.error, 'conflict') && <ErrorNotice error={create.error} title="The deck was not created" />}
        <div className="grid gap-4 lg:grid-cols-[minmax(0,1fr)_minmax(0,2fr)]">
          <TextField label="Name" autoFocus error={errors.name?.message} {...form.register('name')} />
          <TextAreaField label="Description" rows={2} hint="Optional. Which blocks or process this deck is for." error={errors.description?.message} {...form.register('description')} />
        </div>
        <div className="flex justify-end gap-2">
          <Button onClick={onCancel}>Cancel</Button>
          <Button type="submit" variant="primary" busy={create.isPending}>
            Create the draft
          </Button>
        </div>
      </form>
    </Panel>
  );
}

const columns: ColumnDef<DeckSummary, any>[] = [
  {
    accessorKey: 'name',
    header: 'Deck',
    cell: ({ row }) => (
      <span>
        <Link to={`/decks/${row.original.id}`} className="font-medium text-well-800 hover:underline">
          {row.original.name}
        </Link>
        {row.original.teamDefault && <span className="ml-2 rounded border border-well-200 bg-well-50 px-1.5 py-0.5 text-xs font-medium text-well-800">Team default</span>}
        {row.original.description && <span className="block text-xs text-ink-500">{row.original.description}</span>}
      </span>
    ),
  },
  {
    id: 'default',
    header: 'Used by new runs',
    enableSorting: false,
    cell: ({ row }) => (row.original.defaultVersion ? <span className="tabular-nums">Version {row.original.defaultVersion.version}</span> : <span className="text-ink-500">None published</span>),
  },
  {
    id: 'draft',
    header: 'Draft',
    enableSorting: false,
    cell: ({ row }) =>
      row.original.draft ? (
        <Link to={`/decks/${row.original.id}/versions/${row.original.draft.id}`} className="text-well-800 hover:underline">
          Version {row.original.draft.version}, edited {formatDate(row.original.draft.updatedAt)}
        </Link>
      ) : (
        <span className="text-ink-500">—</span>
      ),
  },
  { accessorKey: 'versionCount', header: 'Versions', cell: ({ getValue }) => <span className="tabular-nums">{getValue() as number}</span> },
];

export function DecksPage() {
  useDocumentTitle('Rule decks');
  const decks = useQuery(decksQuery);
  const canEdit = useCan('deck.edit');
  const [creating, setCreating] = useState<{ content: unknown; fileName: string } | null | 'built-in'>(null);

  const actions = canEdit && creating === null && (
    <>
      <ImportButton label="Import a deck file" onContent={(content, fileName) => setCreating({ content, fileName })} />
      <Button variant="primary" onClick={() => setCreating('built-in')}>
        <Icon name="plus" /> New deck
      </Button>
    </>
  );

  return (
    <>
      <PageHeader
        title="Rule decks"
        description="A rule deck is the set of rules your team checks against, with their severities and thresholds, process corners and naming of clocks and supplies. Every run records the published version it used."
        actions={actions}
      />
      {creating !== null && <NewDeckForm key={creating === 'built-in' ? 'built-in' : creating.fileName} imported={creating === 'built-in' ? null : creating} onCancel={() => setCreating(null)} />}
      {decks.isPending && <Loading label="Loading rule decks…" />}
      {decks.isError && <ErrorNotice error={decks.error} title="Could not load the rule decks" />}
      {decks.data &&
        (decks.data.length === 0 ? (
          <EmptyState
            title="No rule decks listed yet"
            illustration="deck"
            steps={
              canEdit
                ? ['Start a deck from Keepwell’s default rules, or import an exported deck file.', 'Tune thresholds and corners in a draft, then publish it as a numbered version that runs can use.']
                : ['Your methodology owners create and publish the team’s decks.', 'Published versions appear here; every run records which version it was checked against.']
            }
          >
            Your team’s decks will be listed here with their published versions and the draft being prepared.
          </EmptyState>
        ) : (
          <>
            {!decks.data.some((d) => d.defaultVersion) && (
              <Notice tone="warning" className="mb-4" title="Nothing published yet">
                Runs are checked against published versions only. Open a deck’s draft and publish it so that designers can submit runs.
              </Notice>
            )}
            <DataTable caption="Rule decks of your team" data={decks.data} columns={columns} rowKey={(d) => d.id} initialSorting={[{ id: 'name', desc: false }]} />
          </>
        ))}
    </>
  );
}
