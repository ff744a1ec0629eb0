// The deck's naming and deck-wide settings: clock roots and inverted-phase endings,
// supply and ground patterns, the device map (first match wins), and the scale,
// slowest clock period and description.

import { useMemo } from 'react';
import { useFieldArray, useForm } from 'react-hook-form';
import { z } from 'zod';
import type { DeckVersion, PatchOperation } from '../../../shared/api/decks';
import { clockRootSchema, deckSchema, deviceMapEntrySchema, patternSchema, polaritySchema, type Deck } from '../../../shared/deck';
import { Button } from '../../components/Button';
import { TextAreaField, TextField } from '../../components/Field';
import { Panel } from '../../components/PageHeader';
import { SaveError, SchemaField, SelectField, useSavedValues } from './fields';
import { usePatchVersion } from './queries';
import { fieldInfo, formSchemaOf, quantityResolver, toFormValues } from './quantity';

const splitList = (text: string) => text.split(/[\s,]+/).filter(Boolean);

/** A comma- or space-separated list in one text field, each item checked by `item`. */
function listField(item: z.ZodType<string, string>, max: number) {
  return z.string().transform(splitList).pipe(z.array(item).max(max, `at most ${max} entries`));
}

function FormActions({ dirty, busy, onUndo, label }: { dirty: boolean; busy: boolean; onUndo: () => void; label: string }) {
  return (
    <div className="flex justify-end gap-2 pt-2">
      <Button size="sm" disabled={!dirty} onClick={onUndo}>
        Undo changes
      </Button>
      <Button size="sm" type="submit" variant="primary" disabled={!dirty} busy={busy}>
        {label}
      </Button>
    </div>
  );
}

// ---- clocks and supplies ------------------------------------------------------------

const namingSchema = z.object({
  roots: z.array(clockRootSchema).max(200),
  invertedSuffixes: listField(z.string().min(1).max(10), 40),
  power: listField(patternSchema, 100),
  ground: listField(patternSchema, 100),
});
type NamingForm = { roots: { pattern: string; phase: string; polarity: 'true' | 'inverted' }[]; invertedSuffixes: string; power: string; ground: string };

function namingValues(deck: Deck): NamingForm {
  return {
    roots: deck.clocks.roots.map((r) => ({ ...r })),
    invertedSuffixes: deck.clocks.invertedSuffixes.join(', '),
    power: deck.supplies.power.join(', '),
    ground: deck.supplies.ground.join(', '),
  };
}

export function NamingEditor({ version, editable }: { version: DeckVersion; editable: boolean }) {
  const values = useMemo(() => namingValues(version.content), [version.content]);
  const form = useForm<NamingForm>({ resolver: quantityResolver<NamingForm>(namingSchema, namingSchema), defaultValues: values });
  useSavedValues(form, values);
  const roots = useFieldArray({ control: form.control, name: 'roots' });
  const save = usePatchVersion(version);
  const { errors, dirtyFields, isDirty } = form.formState;

  const submit = form.handleSubmit((raw) => {
    const parsed = raw as unknown as z.output<typeof namingSchema>;
    const ops: PatchOperation[] = [];
    if (dirtyFields.roots) ops.push({ op: 'replace', path: '/clocks/roots', value: parsed.roots });
    if (dirtyFields.invertedSuffixes) ops.push({ op: 'replace', path: '/clocks/invertedSuffixes', value: parsed.invertedSuffixes });
    if (dirtyFields.power) ops.push({ op: 'replace', path: '/supplies/power', value: parsed.power });
    if (dirtyFields.ground) ops.push({ op: 'replace', path: '/supplies/ground', value: parsed.ground });
    if (ops.length) save.mutate(ops, { onSuccess: (v) => form.reset(namingValues(v.content)) });
  });

  return (
    <form noValidate onSubmit={submit} aria-label="Clocks and supplies" className="space-y-6">
      <fieldset disabled={!editable} className="space-y-6">
        <Panel className="p-4">
          <h2 className="text-base font-semibold text-ink-900">Clock roots</h2>
          <p className="mb-3 text-sm text-ink-500">
            Nets whose names match are clocks. Patterns are whole-name globs: <code>*</code> any run, <code>?</code> one character, case ignored. An empty phase name means the
            matched name without its inverted ending.
          </p>
          <div className="space-y-2">
            {roots.fields.map((row, i) => (
              <div key={row.id} className="grid items-start gap-2 sm:grid-cols-[minmax(0,2fr)_minmax(0,1fr)_10rem_auto]">
                <TextField label={`Clock pattern ${i + 1}`} className="font-mono" error={errors.roots?.[i]?.pattern?.message} {...form.register(`roots.${i}.pattern`)} />
                <TextField label="Phase" className="font-mono" error={errors.roots?.[i]?.phase?.message} {...form.register(`roots.${i}.phase`)} />
                <SelectField
                  label="Polarity"
                  options={polaritySchema.options.map((p) => ({ value: p, label: p === 'true' ? 'True phase' : 'Inverted' }))}
                  {...form.register(`roots.${i}.polarity`)}
                />
                {editable && (
                  <Button size="sm" variant="ghost" className="mt-7" onClick={() => roots.remove(i)} aria-label={`Remove clock pattern ${i + 1}`}>
                    Remove
                  </Button>
                )}
              </div>
            ))}
          </div>
          {editable && (
            <Button size="sm" className="mt-3" onClick={() => roots.append({ pattern: '', phase: '', polarity: 'true' })}>
              Add a clock pattern
            </Button>
          )}
          <TextField
            wrapperClassName="mt-4"
            label="Endings that mean the inverted phase"
            hint="Comma- or space-separated, e.g. _b, _n, bar."
            className="font-mono"
            error={errors.invertedSuffixes?.message}
            {...form.register('invertedSuffixes')}
          />
        </Panel>
        <Panel className="grid gap-4 p-4 md:grid-cols-2">
          <h2 className="text-base font-semibold text-ink-900 md:col-span-2">Supplies</h2>
          <TextAreaField label="Power nets" rows={2} hint="Glob patterns, comma- or space-separated." className="font-mono" error={errors.power?.message} {...form.register('power')} />
          <TextAreaField label="Ground nets" rows={2} hint="Glob patterns, comma- or space-separated." className="font-mono" error={errors.ground?.message} {...form.register('ground')} />
        </Panel>
      </fieldset>
      {save.isError && <SaveError error={save.error} title="Clocks and supplies not saved" version={version} />}
      {editable && <FormActions dirty={isDirty} busy={save.isPending} onUndo={() => form.reset(values)} label="Save clocks and supplies" />}
    </form>
  );
}

// ---- device map ---------------------------------------------------------------------

const deviceMapSchema = z.object({ entries: z.array(deviceMapEntrySchema).max(200) });
type DeviceMapForm = z.input<typeof deviceMapSchema>;
const KIND_LABELS: Record<string, string> = {
  nmos: 'n-channel transistor',
  pmos: 'p-channel transistor',
  resistor: 'Resistor',
  capacitor: 'Capacitor',
  diode: 'Diode',
  ignore: 'Ignore',
};

export function DeviceMapEditor({ version, editable }: { version: DeckVersion; editable: boolean }) {
  const values = useMemo(() => ({ entries: version.content.deviceMap.map((e) => ({ ...e })) }), [version.content]);
  const form = useForm<DeviceMapForm>({ resolver: quantityResolver<DeviceMapForm>(deviceMapSchema, deviceMapSchema), defaultValues: values });
  useSavedValues(form, values);
  const entries = useFieldArray({ control: form.control, name: 'entries' });
  const save = usePatchVersion(version);
  const { errors, isDirty } = form.formState;
  const kinds = deviceMapEntrySchema.shape.kind.options;

  return (
    <form
      noValidate
      aria-label="Device map"
      onSubmit={form.handleSubmit((parsed) =>
        save.mutate([{ op: 'replace', path: '/deviceMap', value: parsed.entries }], { onSuccess: (v) => form.reset({ entries: v.content.deviceMap.map((e) => ({ ...e })) }) }),
      )}
    >
      <Panel className="p-4">
        <p className="mb-3 text-sm text-ink-500">
          Model names (and subcircuits the netlist never defines) matched to what they are. The first matching pattern wins, so order matters.
        </p>
        <fieldset disabled={!editable}>
          <ol className="space-y-2">
            {entries.fields.map((row, i) => (
              <li key={row.id} className="grid items-start gap-2 sm:grid-cols-[2rem_minmax(0,2fr)_minmax(0,1.2fr)_auto]">
                <span className="mt-8 text-right text-sm tabular-nums text-ink-500">{i + 1}.</span>
                <TextField label={`Model pattern ${i + 1}`} className="font-mono" error={errors.entries?.[i]?.pattern?.message} {...form.register(`entries.${i}.pattern`)} />
                <SelectField label="Is a" options={kinds.map((k) => ({ value: k, label: KIND_LABELS[k] ?? k }))} {...form.register(`entries.${i}.kind`)} />
                {editable && (
                  <span className="mt-6 flex gap-1">
                    <Button size="sm" variant="ghost" disabled={i === 0} onClick={() => entries.move(i, i - 1)} aria-label={`Move pattern ${i + 1} up`}>
                      ↑
                    </Button>
                    <Button size="sm" variant="ghost" disabled={i === entries.fields.length - 1} onClick={() => entries.move(i, i + 1)} aria-label={`Move pattern ${i + 1} down`}>
                      ↓
                    </Button>
                    <Button size="sm" variant="ghost" onClick={() => entries.remove(i)} aria-label={`Remove pattern ${i + 1}`}>
                      Remove
                    </Button>
                  </span>
                )}
              </li>
            ))}
          </ol>
          {editable && (
            <Button size="sm" className="mt-3" onClick={() => entries.append({ pattern: '', kind: 'nmos' })}>
              Add a pattern
            </Button>
          )}
        </fieldset>
      </Panel>
      {save.isError && <SaveError error={save.error} title="Device map not saved" version={version} />}
      {editable && <FormActions dirty={isDirty} busy={save.isPending} onUndo={() => form.reset(values)} label="Save device map" />}
    </form>
  );
}

// ---- deck-wide settings -------------------------------------------------------------

const generalSource = deckSchema.pick({ name: true, description: true, scale: true, slowestClockPeriod: true, useNetlistModels: true });
const generalForm = formSchemaOf(generalSource);
type GeneralForm = Record<'name' | 'description' | 'scale' | 'slowestClockPeriod' | 'useNetlistModels', unknown>;
const GENERAL_HINTS: Record<string, string> = {
  scale: 'Applied to lengths when a netlist sets no .option scale; 1 means lengths are in metres, 1e-6 that they are in micrometres.',
  slowestClockPeriod: 'The longest a dynamic node must hold its charge: the slowest clock the block sees, test and scan clocks included.',
  useNetlistModels: 'Level-1 parameters on a netlist’s .model cards replace the corner’s values for the devices that name them.',
};

export function GeneralEditor({ version, editable }: { version: DeckVersion; editable: boolean }) {
  const values = useMemo(() => toFormValues(generalSource, version.content) as GeneralForm, [version.content]);
  const form = useForm<GeneralForm>({ resolver: quantityResolver<GeneralForm>(generalForm, generalSource), defaultValues: values });
  useSavedValues(form, values);
  const save = usePatchVersion(version);
  const { errors, dirtyFields, isDirty } = form.formState;
  const shape = generalSource.shape as Record<string, z.ZodType>;

  return (
    <form
      noValidate
      aria-label="Deck settings"
      onSubmit={form.handleSubmit((parsed) => {
        const ops: PatchOperation[] = (Object.keys(shape) as (keyof GeneralForm)[])
          .filter((k) => dirtyFields[k])
          .map((k) => ({ op: 'replace', path: `/${k}`, value: parsed[k] }));
        if (ops.length) save.mutate(ops, { onSuccess: (v) => form.reset(toFormValues(generalSource, v.content) as GeneralForm) });
      })}
    >
      <Panel className="p-4">
        <fieldset disabled={!editable} className="grid gap-4 md:grid-cols-2">
          <TextField label="Name in reports" hint="What the command line and reports call this deck." error={errors.name?.message as string | undefined} {...form.register('name')} />
          <div />
          <TextAreaField wrapperClassName="md:col-span-2" label="Description" rows={3} error={errors.description?.message as string | undefined} {...form.register('description')} />
          {(['scale', 'slowestClockPeriod', 'useNetlistModels'] as const).map((k) => (
            <div key={k}>
              <SchemaField
                info={{ ...fieldInfo(shape[k]), label: k === 'useNetlistModels' ? 'Use the netlist’s own .model parameters' : fieldInfo(shape[k]).label }}
                registration={form.register(k)}
                error={errors[k] as never}
              />
              <p className="mt-1 text-xs text-ink-500">{GENERAL_HINTS[k]}</p>
            </div>
          ))}
        </fieldset>
      </Panel>
      {save.isError && <SaveError error={save.error} title="Settings not saved" version={version} />}
      {editable && <FormActions dirty={isDirty} busy={save.isPending} onUndo={() => form.reset(values)} label="Save settings" />}
    </form>
  );
}
