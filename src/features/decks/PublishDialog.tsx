// Publishing a draft: a change note (required), whether new runs use it, and what
// changed since the version it started from.

import { useQuery } from '@tanstack/react-query';
import { useEffect, useId, useRef } from 'react';
import { useForm } from 'react-hook-form';
import { publishBodySchema, type DeckVersion } from '../../../shared/api/decks';
import { Button } from '../../components/Button';
import { Checkbox, TextAreaField } from '../../components/Field';
import { Loading } from '../../components/LoadState';
import { ErrorNotice } from '../../components/Notice';
import { formResolver } from '../../lib/form';
import { DiffView } from './DiffView';
import { SaveError } from './fields';
import { diffQuery, usePublish } from './queries';

const publishFormSchema = publishBodySchema.omit({ lockVersion: true });

export function PublishDialog({ version, onClose, onPublished }: { version: DeckVersion; onClose: () => void; onPublished: (v: DeckVersion) => void }) {
  const titleId = useId();
  const dialog = useRef<HTMLDivElement>(null);
  const form = useForm({ resolver: formResolver(publishFormSchema), defaultValues: { changeNote: '', makeDefault: true } });
  const publish = usePublish(version);
  const diff = useQuery({ ...diffQuery(version.parentVersionId ?? version.id, version.id), enabled: version.parentVersionId !== null });

  useEffect(() => {
    const onKey = (e: KeyboardEvent) => e.key === 'Escape' && onClose();
    window.addEventListener('keydown', onKey);
    return () => window.removeEventListener('keydown', onKey);
  }, [onClose]);

  return (
    <div className="fixed inset-0 z-40 flex items-start justify-center overflow-y-auto bg-ink-950/40 p-4 pt-16">
      <div ref={dialog} role="dialog" aria-modal="true" aria-labelledby={titleId} className="w-full max-w-2xl rounded-lg border border-ink-200 bg-white p-5 shadow-lg">
        <h2 id={titleId} className="text-lg font-semibold text-ink-900">
          Publish version {version.version}
        </h2>
        <p className="mt-1 text-sm text-ink-600">
          A published version never changes again: every run checked against it can be reproduced. Later edits start a new draft.
        </p>
        <form
          noValidate
          className="mt-4 space-y-4"
          onSubmit={form.handleSubmit((values) => publish.mutate(values, { onSuccess: onPublished }))}
        >
          <TextAreaField
            label="Change note"
            rows={3}
            autoFocus
            hint="What changed and why, for whoever reads the history later (a silicon failure, a new corner from the foundry, a rule too noisy)."
            error={form.formState.errors.changeNote?.message}
            {...form.register('changeNote')}
          />
          <Checkbox label="Use this version for new runs of this deck" description="Runs already checked keep the version they used." {...form.register('makeDefault')} />
          <section aria-label="Changes in this version" className="rounded-md border border-ink-200 bg-ink-50/50 p-3">
            {version.parentVersionId === null ? (
              <p className="text-sm text-ink-600">This is the deck’s first version.</p>
            ) : diff.isPending ? (
              <Loading label="Comparing with the version it started from…" />
            ) : diff.isError ? (
              <ErrorNotice error={diff.error} title="Could not compare with the earlier version" />
            ) : (
              <DiffView diff={diff.data} />
            )}
          </section>
          {publish.isError && <SaveError error={publish.error} title="Not published" version={version} />}
          <div className="flex justify-end gap-2">
            <Button onClick={onClose}>Cancel</Button>
            <Button type="submit" variant="primary" busy={publish.isPending}>
              Publish version {version.version}
            </Button>
          </div>
        </form>
      </div>
    </div>
  );
}
