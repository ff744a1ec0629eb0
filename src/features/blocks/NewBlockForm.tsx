import { useForm } from 'react-hook-form';
import { createBlockBodySchema, type Block } from '../../../shared/api/blocks';
import { Button } from '../../components/Button';
import { TextAreaField, TextField } from '../../components/Field';
import { ErrorNotice } from '../../components/Notice';
import { Panel } from '../../components/PageHeader';
import { isApiError } from '../../lib/api';
import { formResolver } from '../../lib/form';
import { useCreateBlock } from './queries';

export function NewBlockForm({ onCreated, onCancel }: { onCreated: (block: Block) => void; onCancel: () => void }) {
  const form = useForm({ resolver: formResolver(createBlockBodySchema), defaultValues: { name: '', description: '' } });
  const create = useCreateBlock();
  const { errors } = form.formState;

  return (
    <Panel className="mb-6 p-5">
      <form
        noValidate
        aria-labelledby="new-block-title"
        onSubmit={form.handleSubmit((values) =>
          create.mutate(values, {
            onSuccess: onCreated,
            onError: (error) => {
              if (isApiError(error, 'conflict')) form.setError('name', { message: 'Your team already has a block with this name.' });
            },
          }),
        )}
        className="space-y-4"
      >
        <h2 id="new-block-title" className="text-base font-semibold text-ink-900">
          New block
        </h2>
        {create.isError && !isApiError(create.error, 'conflict') && <ErrorNotice error={create.error} title="Could not create the block" />}
        <div className="grid gap-4 lg:grid-cols-[minmax(0,1fr)_minmax(0,2fr)]">
          <TextField
            label="Name"
            autoFocus
            className="font-mono"
            hint="As designers call it, e.g. the top cell’s name. Letters, digits, dot, dash, underscore."
            error={errors.name?.message}
            {...form.register('name')}
          />
          <TextAreaField label="Description" rows={3} hint="Optional. What the block is and where it sits." error={errors.description?.message} {...form.register('description')} />
        </div>
        <div className="flex justify-end gap-2">
          <Button onClick={onCancel}>Cancel</Button>
          <Button type="submit" variant="primary" busy={create.isPending}>
            Create block
          </Button>
        </div>
      </form>
    </Panel>
  );
}
