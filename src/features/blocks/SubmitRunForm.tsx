// Submitting a block's netlist for a check: loose netlist files or one bundle with its
// includes, the deck version to check against, an optional top cell and a note.

import { useQuery } from '@tanstack/react-query';
import { useId, useState, type DragEvent, type FormEvent } from 'react';
import { ARCHIVE_EXTENSIONS, NETLIST_EXTENSIONS, type RunView } from '../../../shared/api/runs';
import { Button } from '../../components/Button';
import { TextAreaField, TextField } from '../../components/Field';
import { ErrorNotice } from '../../components/Notice';
import { Panel } from '../../components/PageHeader';
import { formatDate } from '../../lib/format';
import { deckChoicesQuery, useSubmitRun } from '../runs/queries';

const ACCEPTED = [...NETLIST_EXTENSIONS, ...ARCHIVE_EXTENSIONS];

function accepted(name: string) {
  const lower = name.toLowerCase();
  return ACCEPTED.some((ext) => lower.endsWith(ext));
}

function size(bytes: number) {
  return bytes < 1024 ? `${bytes} B` : bytes < 1024 ** 2 ? `${(bytes / 1024).toFixed(1)} KiB` : `${(bytes / 1024 ** 2).toFixed(1)} MiB`;
}

export function SubmitRunForm({ blockId, onSubmitted, onCancel }: { blockId: string; onSubmitted: (run: RunView) => void; onCancel: () => void }) {
  const decks = useQuery(deckChoicesQuery);
  const submit = useSubmitRun();
  const [files, setFiles] = useState<File[]>([]);
  const [deckVersionId, setDeckVersionId] = useState<string>('');
  const [top, setTop] = useState('');
  const [note, setNote] = useState('');
  const [problem, setProblem] = useState<string | null>(null);
  const [dragging, setDragging] = useState(false);
  const fileInputId = useId();

  const teamDefault = decks.data?.find((d) => d.teamDefault)?.defaultVersion?.id ?? '';
  const chosenVersion = deckVersionId || teamDefault;

  function addFiles(list: FileList | null) {
    if (!list) return;
    const incoming = [...list];
    const refused = incoming.filter((f) => !accepted(f.name));
    setProblem(refused.length ? `Not a netlist or bundle: ${refused.map((f) => f.name).join(', ')}. Accepted: ${ACCEPTED.join(' ')}.` : null);
    setFiles((old) => [...old.filter((o) => !incoming.some((f) => f.name === o.name)), ...incoming.filter((f) => accepted(f.name))]);
  }

  function onDrop(e: DragEvent) {
    e.preventDefault();
    setDragging(false);
    addFiles(e.dataTransfer.files);
  }

  function onSubmit(e: FormEvent) {
    e.preventDefault();
    if (!files.length) {
      setProblem('Choose the netlist files, or one bundle (.zip, .tar.gz) holding them with their includes.');
      return;
    }
    submit.mutate({ blockId, files, deckVersionId: chosenVersion || undefined, note: note.trim(), top: top.trim() || undefined }, { onSuccess: (created) => onSubmitted(created.run) });
  }

  return (
    <Panel className="mb-6 p-5">
      <form noValidate aria-labelledby="submit-run-title" onSubmit={onSubmit} className="space-y-4">
        <h2 id="submit-run-title" className="text-base font-semibold text-ink-900">
          Submit a netlist for checking
        </h2>
        {submit.isError && <ErrorNotice error={submit.error} title="The run was not started" />}
        <div>
          <label htmlFor={fileInputId} className="mb-1.5 block text-sm font-medium text-ink-800">
            Netlist files or a bundle
          </label>
          <div
            onDragOver={(e) => {
              e.preventDefault();
              setDragging(true);
            }}
            onDragLeave={() => setDragging(false)}
            onDrop={onDrop}
            className={`rounded-md border-2 border-dashed px-4 py-4 text-sm ${dragging ? 'border-well-500 bg-well-50' : 'border-ink-300 bg-ink-50'}`}
          >
            <input
              id={fileInputId}
              type="file"
              multiple
              accept={ACCEPTED.join(',')}
              aria-describedby={`${fileInputId}-hint`}
              aria-invalid={problem ? true : undefined}
              onChange={(e) => {
                addFiles(e.target.files);
                e.target.value = '';
              }}
              className="block w-full text-sm file:mr-3 file:rounded-md file:border file:border-ink-300 file:bg-white file:px-3 file:py-1.5 file:text-sm file:font-medium"
            />
            <p id={`${fileInputId}-hint`} className="mt-2 text-xs text-ink-500">
              Drop files here or choose them. SPICE or CDL ({NETLIST_EXTENSIONS.join(' ')}) with their includes, or one bundle ({ARCHIVE_EXTENSIONS.join(' ')}).
            </p>
          </div>
          {problem && (
            <p role="alert" className="mt-1.5 flex items-center gap-1.5 text-xs font-medium text-error">
              <span aria-hidden="true">■</span>
              {problem}
            </p>
          )}
          {files.length > 0 && (
            <ul aria-label="Files to submit" className="mt-2 divide-y divide-ink-100 rounded-md border border-ink-200 bg-white text-sm">
              {files.map((f) => (
                <li key={f.name} className="flex items-center justify-between gap-3 px-3 py-1.5">
                  <span className="font-mono text-ink-900">{f.name}</span>
                  <span className="flex items-center gap-3 text-xs text-ink-500">
                    {size(f.size)}
                    <Button size="sm" variant="ghost" onClick={() => setFiles(files.filter((x) => x !== f))} aria-label={`Remove ${f.name}`}>
                      Remove
                    </Button>
                  </span>
                </li>
              ))}
            </ul>
          )}
        </div>
        <div className="grid gap-4 lg:grid-cols-2">
          <div>
            <label htmlFor="run-deck-version" className="mb-1.5 block text-sm font-medium text-ink-800">
              Rule deck version
            </label>
            <select
              id="run-deck-version"
              className="block h-10 w-full rounded-md border border-ink-300 bg-white px-3 text-sm shadow-xs"
              value={chosenVersion}
              onChange={(e) => setDeckVersionId(e.target.value)}
              disabled={decks.isPending}
              aria-describedby="run-deck-version-hint"
            >
              {decks.isPending && <option value="">Loading decks…</option>}
              {decks.isError && <option value="">The team’s default version</option>}
              {decks.data?.map((deck) => (
                <optgroup key={deck.id} label={deck.name}>
                  {deck.versions
                    .slice()
                    .sort((a, b) => b.version - a.version)
                    .map((v) => (
                      <option key={v.id} value={v.id}>
                        v{v.version} · {v.state === 'draft' ? 'draft' : `published ${formatDate(v.publishedAt)}`}
                        {v.isDeckDefault ? ' · deck default' : ''}
                        {deck.teamDefault && v.isDeckDefault ? ' (team default)' : ''}
                      </option>
                    ))}
                </optgroup>
              ))}
            </select>
            <p id="run-deck-version-hint" className="mt-1.5 text-xs text-ink-500">
              {decks.isError ? 'The decks could not be listed; the run uses the team’s default version.' : 'Preselected: your team’s default. The run records the version it used.'}
            </p>
          </div>
          <TextField label="Top cell" className="font-mono" value={top} onChange={(e) => setTop(e.target.value)} hint="Optional. Default: every cell that nothing instantiates." maxLength={200} />
        </div>
        <TextAreaField label="Note" rows={2} value={note} onChange={(e) => setNote(e.target.value)} hint="Optional. What changed since the last run, for the reviewers." maxLength={2000} />
        <div className="flex justify-end gap-2">
          <Button onClick={onCancel}>Cancel</Button>
          <Button type="submit" variant="primary" busy={submit.isPending}>
            Start the check
          </Button>
        </div>
      </form>
    </Panel>
  );
}
