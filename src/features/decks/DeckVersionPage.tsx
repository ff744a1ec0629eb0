// /decks/:deckId/versions/:versionId: one version of a deck. A draft is edited here by
// methodology owners (rules, corners, naming, settings), previewed against the team's
// newest netlist and published; a published version reads the same, without editing.

import { useQuery } from '@tanstack/react-query';
import { useState, type ReactNode } from 'react';
import { useNavigate, useParams, useSearchParams } from 'react-router';
import type { DeckVersion } from '../../../shared/api/decks';
import { Button, ButtonLink } from '../../components/Button';
import { Loading } from '../../components/LoadState';
import { ErrorNotice, Notice } from '../../components/Notice';
import { PageHeader, Panel } from '../../components/PageHeader';
import { isApiError } from '../../lib/api';
import { useDocumentTitle } from '../../lib/document-title';
import { formatDateTime } from '../../lib/format';
import { useCan } from '../../lib/session';
import { NotFoundPage } from '../errors/NotFoundPage';
import { CornersEditor } from './CornersEditor';
import { DiffView } from './DiffView';
import { SaveError } from './fields';
import { ImportButton } from './ImportButton';
import { PreviewPanel } from './PreviewPanel';
import { PublishDialog } from './PublishDialog';
import { deckQuery, diffQuery, exportUrl, useCreateDraft, useDiscardDraft, useReplaceContent, versionQuery } from './queries';
import { RulesTable } from './RulesTable';
import { DeviceMapEditor, GeneralEditor, NamingEditor } from './SettingsEditors';
import { VersionState } from './VersionState';

type TabId = 'rules' | 'corners' | 'naming' | 'devices' | 'settings' | 'changes' | 'preview';

function Changes({ version }: { version: DeckVersion }) {
  const diff = useQuery({ ...diffQuery(version.parentVersionId ?? version.id, version.id), enabled: version.parentVersionId !== null });
  if (version.parentVersionId === null) return <p className="text-sm text-ink-600">This is the deck’s first version; it started from {version.state === 'draft' ? 'a new deck' : 'nothing earlier'}.</p>;
  return (
    <Panel className="p-4">
      {diff.isPending ? <Loading label="Comparing…" /> : diff.isError ? <ErrorNotice error={diff.error} title="Could not compare" /> : <DiffView diff={diff.data} />}
    </Panel>
  );
}

function Tabs({ tabs, current, onChange }: { tabs: { id: TabId; label: string }[]; current: TabId; onChange: (id: TabId) => void }) {
  return (
    <div role="tablist" aria-label="Parts of the deck" className="mb-5 flex flex-wrap gap-1 border-b border-ink-200">
      {tabs.map((t) => (
        <button
          key={t.id}
          type="button"
          role="tab"
          id={`tab-${t.id}`}
          aria-selected={current === t.id}
          aria-controls={`panel-${t.id}`}
          tabIndex={current === t.id ? 0 : -1}
          onClick={() => onChange(t.id)}
          onKeyDown={(e) => {
            const i = tabs.findIndex((x) => x.id === current);
            if (e.key === 'ArrowRight') onChange(tabs[(i + 1) % tabs.length].id);
            if (e.key === 'ArrowLeft') onChange(tabs[(i - 1 + tabs.length) % tabs.length].id);
          }}
          className={`-mb-px border-b-2 px-3 py-2 text-sm font-medium ${current === t.id ? 'border-well-700 text-well-800' : 'border-transparent text-ink-600 hover:text-ink-900'}`}
        >
          {t.label}
        </button>
      ))}
    </div>
  );
}

function DraftActions({ version, canPublish, onPublish }: { version: DeckVersion; canPublish: boolean; onPublish: () => void }) {
  const navigate = useNavigate();
  const replace = useReplaceContent(version);
  const discard = useDiscardDraft(version);
  const [confirming, setConfirming] = useState(false);
  return (
    <div className="flex flex-wrap items-center justify-end gap-2">
      <ImportButton label="Replace with a deck file" busy={replace.isPending} onContent={(content) => replace.mutate(content)} />
      {confirming ? (
        <>
          <Button variant="danger" busy={discard.isPending} onClick={() => discard.mutate(undefined, { onSuccess: () => navigate(`/decks/${version.deckId}`) })}>
            Discard version {version.version}
          </Button>
          <Button variant="ghost" onClick={() => setConfirming(false)}>
            Keep it
          </Button>
        </>
      ) : (
        <Button onClick={() => setConfirming(true)}>Discard draft…</Button>
      )}
      {canPublish && (
        <Button variant="primary" onClick={onPublish}>
          Publish…
        </Button>
      )}
      {(replace.isError || discard.isError) && (
        <div className="basis-full">
          {replace.isError && <SaveError error={replace.error} title="The file was not imported" version={version} />}
          {discard.isError && <ErrorNotice error={discard.error} title="The draft was not discarded" />}
        </div>
      )}
    </div>
  );
}

function PublishedActions({ version, openDraft }: { version: DeckVersion; openDraft: { id: string; version: number } | null }) {
  const navigate = useNavigate();
  const create = useCreateDraft(version.deckId);
  if (openDraft)
    return (
      <ButtonLink variant="primary" to={`/decks/${version.deckId}/versions/${openDraft.id}`}>
        Open the draft (version {openDraft.version})
      </ButtonLink>
    );
  return (
    <>
      <Button variant="primary" busy={create.isPending} onClick={() => create.mutate(version.id, { onSuccess: (v) => navigate(`/decks/${v.deckId}/versions/${v.id}`) })}>
        Start a draft from version {version.version}
      </Button>
      {create.isError && <ErrorNotice error={create.error} title="No draft started" className="basis-full" />}
    </>
  );
}

export function DeckVersionPage() {
  const { deckId = '', versionId = '' } = useParams();
  const version = useQuery(versionQuery(deckId, versionId));
  const deck = useQuery(deckQuery(deckId));
  const canEdit = useCan('deck.edit');
  const canPublish = useCan('deck.publish');
  const [params, setParams] = useSearchParams();
  const [publishing, setPublishing] = useState(false);
  useDocumentTitle(version.data ? `${version.data.deckName} · version ${version.data.version}` : 'Deck version');

  if (version.isPending) return <Loading label="Loading the deck version…" />;
  if (version.isError) {
    if (isApiError(version.error) && (version.error.status === 404 || version.error.code === 'validation')) return <NotFoundPage what="deck version" />;
    return <ErrorNotice error={version.error} title="Could not load the deck version" />;
  }
  const v = version.data;
  const editable = canEdit && v.state === 'draft';
  const tabs: { id: TabId; label: string }[] = [
    { id: 'rules', label: 'Rules' },
    { id: 'corners', label: 'Corners' },
    { id: 'naming', label: 'Clocks & supplies' },
    { id: 'devices', label: 'Device map' },
    { id: 'settings', label: 'Settings' },
    { id: 'changes', label: v.parentVersion ? `Changes since version ${v.parentVersion}` : 'Changes' },
    ...(canEdit ? [{ id: 'preview' as const, label: 'What would change' }] : []),
  ];
  const requested = params.get('tab') as TabId | null;
  const tab = tabs.some((t) => t.id === requested) ? requested! : 'rules';
  const panels: Record<TabId, ReactNode> = {
    rules: <RulesTable version={v} editable={editable} />,
    corners: <CornersEditor version={v} editable={editable} />,
    naming: <NamingEditor version={v} editable={editable} />,
    devices: <DeviceMapEditor version={v} editable={editable} />,
    settings: <GeneralEditor version={v} editable={editable} />,
    changes: <Changes version={v} />,
    preview: <PreviewPanel version={v} />,
  };

  return (
    <>
      <PageHeader
        crumbs={[{ label: 'Rule decks', to: '/decks' }, { label: v.deckName, to: `/decks/${v.deckId}` }, { label: `Version ${v.version}` }]}
        title={
          <span className="inline-flex flex-wrap items-center gap-3">
            {v.deckName} · version {v.version} <VersionState version={v} />
          </span>
        }
        meta={
          <>
            {v.state === 'published' ? (
              <span>
                Published {formatDateTime(v.publishedAt)}
                {v.publishedBy ? ` by ${v.publishedBy.name}` : ''}
              </span>
            ) : (
              <span>
                Draft{v.parentVersion ? ` started from version ${v.parentVersion}` : ''}
                {v.createdBy ? ` by ${v.createdBy.name}` : ''}, last saved {formatDateTime(v.updatedAt)}
              </span>
            )}
            <a className="text-well-800 hover:underline" href={exportUrl(v.deckId, v.id)} download>
              Export as JSON
            </a>
          </>
        }
        actions={
          canEdit &&
          (v.state === 'draft' ? <DraftActions version={v} canPublish={canPublish} onPublish={() => setPublishing(true)} /> : <PublishedActions version={v} openDraft={deck.data?.draft ?? null} />)
        }
      />
      {v.state === 'published' && v.changeNote && (
        <Notice tone="info" title="Change note" className="mb-4">
          <p className="whitespace-pre-line">{v.changeNote}</p>
        </Notice>
      )}
      {v.state === 'published' && canEdit && <p className="mb-4 text-sm text-ink-600">Published versions never change, so runs checked against them can be reproduced. Edit a draft instead.</p>}
      {v.state === 'draft' && !canEdit && <p className="mb-4 text-sm text-ink-600">This draft is being prepared by your methodology owners; runs cannot use it until it is published.</p>}
      <Tabs tabs={tabs} current={tab} onChange={(id) => setParams((p) => (p.set('tab', id), p), { replace: true })} />
      <div role="tabpanel" id={`panel-${tab}`} aria-labelledby={`tab-${tab}`}>
        {panels[tab]}
      </div>
      {publishing && <PublishDialog version={v} onClose={() => setPublishing(false)} onPublished={() => setPublishing(false)} />}
    </>
  );
}
