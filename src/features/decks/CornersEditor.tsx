// Process corners side by side: one column per corner, one row per field (supply,
// temperature, device model, and every n- and p-channel parameter with its unit).
// Field edits are saved together; adding or removing a corner is its own change.

import { Fragment, useMemo } from 'react';
import { useForm, type FieldErrors } from 'react-hook-form';
import { z } from 'zod';
import { toPointer, type DeckVersion, type PatchOperation } from '../../../shared/api/decks';
import { cornerSchema, deviceParamsSchema, type Corner } from '../../../shared/deck';
import { Button } from '../../components/Button';
import { SaveError, useSavedValues } from './fields';
import { usePatchVersion } from './queries';
import { fieldInfo, formSchemaOf, quantityResolver, rangeText, toFormValues, unitLabel, type FieldInfo } from './quantity';

type CornerForm = Record<string, unknown>;
type FormValues = { corners: CornerForm[] };

const formSchema = z.object({ corners: z.array(formSchemaOf(cornerSchema)) });
const source = z.object({ corners: z.array(cornerSchema) });

interface Row {
  path: string[];
  label: string;
  info: FieldInfo;
}

const cornerShape = cornerSchema.shape as Record<string, z.ZodType>;
const deviceShape = deviceParamsSchema.shape as Record<string, z.ZodType>;

const ROWS: { group: string; rows: Row[] }[] = [
  {
    group: 'Operating point',
    rows: [
      { path: ['name'], label: 'Name', info: { ...fieldInfo(cornerShape.name), label: 'Name' } },
      { path: ['vdd'], label: 'Supply VDD', info: fieldInfo(cornerShape.vdd) },
      { path: ['temperatureC'], label: 'Temperature', info: fieldInfo(cornerShape.temperatureC) },
      { path: ['model'], label: 'Device model', info: fieldInfo(cornerShape.model) },
    ],
  },
  ...(['nmos', 'pmos'] as const).map((polarity) => ({
    group: polarity === 'nmos' ? 'n-channel devices' : 'p-channel devices',
    rows: Object.entries(deviceShape).map(([key, field]) => ({ path: [polarity, key], label: fieldInfo(field).label, info: fieldInfo(field) })),
  })),
];

function at(value: unknown, path: string[]): unknown {
  return path.reduce<unknown>((v, k) => (v && typeof v === 'object' ? (v as Record<string, unknown>)[k] : undefined), value);
}

/** Leaf paths marked in react-hook-form's dirtyFields tree. */
function dirtyLeaves(tree: unknown, prefix: string[] = []): string[][] {
  if (tree === true) return [prefix];
  if (!tree || typeof tree !== 'object') return [];
  return Object.entries(tree).flatMap(([k, v]) => dirtyLeaves(v, [...prefix, k]));
}

function uniqueName(base: string, taken: Set<string>): string {
  for (let i = 2; ; i++) {
    const name = `${base}-${i}`.slice(0, 40);
    if (!taken.has(name)) return name;
  }
}

export function CornersEditor({ version, editable }: { version: DeckVersion; editable: boolean }) {
  const corners = version.content.corners;
  const values = useMemo<FormValues>(() => ({ corners: corners.map((c) => toFormValues(cornerSchema, c)) }), [corners]);
  const form = useForm<FormValues>({ resolver: quantityResolver<FormValues>(formSchema, source), defaultValues: values });
  useSavedValues(form, values);
  const save = usePatchVersion(version);
  const structure = usePatchVersion(version);
  const { isDirty, dirtyFields, errors } = form.formState;

  const submit = form.handleSubmit((parsed) => {
    const ops: PatchOperation[] = [];
    (dirtyFields.corners ?? []).forEach((tree, i) => {
      for (const leaf of dirtyLeaves(tree)) ops.push({ op: 'replace', path: toPointer(['corners', i, ...leaf]), value: at(parsed.corners[i], leaf) });
    });
    if (ops.length) save.mutate(ops, { onSuccess: (v) => form.reset({ corners: v.content.corners.map((c) => toFormValues(cornerSchema, c)) }) });
  });

  const addCopy = (from: Corner) => {
    const name = uniqueName(from.name, new Set(corners.map((c) => c.name)));
    structure.mutate([{ op: 'add', path: '/corners/-', value: { ...from, name } }]);
  };

  const cellError = (i: number, path: string[]) => {
    const e = at((errors as FieldErrors<FormValues>).corners?.[i], path) as { message?: string } | undefined;
    return typeof e?.message === 'string' ? e.message : undefined;
  };

  return (
    <form noValidate onSubmit={submit} aria-label="Process corners">
      <p className="mb-3 max-w-3xl text-sm text-ink-600">
        Every rule that measures something measures it at each corner and reports the worst. Values are those of your process; the built-in ones model a generic 0.25 µm
        process and are a starting point only.
      </p>
      <div className="overflow-x-auto rounded-lg border border-ink-200 bg-white shadow-xs">
        <table className="w-full border-collapse text-sm">
          <caption className="sr-only">Process corners, one column per corner</caption>
          <thead className="border-b border-ink-200 bg-ink-50 text-xs text-ink-600">
            <tr>
              <th scope="col" className="px-3 py-2 text-left font-semibold uppercase tracking-wide">
                Field
              </th>
              {corners.map((c, i) => (
                <th key={`${c.name}-${i}`} scope="col" className="min-w-40 px-3 py-2 text-left font-mono text-sm text-ink-900">
                  {c.name}
                  {editable && (
                    <span className="mt-1 flex gap-1 font-sans">
                      <Button size="sm" variant="ghost" disabled={isDirty || structure.isPending} onClick={() => addCopy(c)} aria-label={`Add a corner copied from ${c.name}`}>
                        Copy
                      </Button>
                      <Button
                        size="sm"
                        variant="ghost"
                        disabled={isDirty || structure.isPending || corners.length === 1}
                        onClick={() => structure.mutate([{ op: 'remove', path: toPointer(['corners', i]) }])}
                        aria-label={`Remove corner ${c.name}`}
                      >
                        Remove
                      </Button>
                    </span>
                  )}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {ROWS.map(({ group, rows }) => (
              <Fragment key={group}>
                <tr className="bg-ink-50/60">
                  <th colSpan={corners.length + 1} scope="colgroup" className="px-3 py-1.5 text-left text-xs font-semibold uppercase tracking-wide text-ink-600">
                    {group}
                  </th>
                </tr>
                {rows.map((row) => {
                  const unit = unitLabel(row.info.unit);
                  return (
                    <tr key={row.path.join('.')} className="border-t border-ink-100">
                      <th scope="row" className="px-3 py-1.5 text-left align-top font-normal text-ink-700">
                        {row.label}
                        {unit && <span className="ml-1 text-ink-500">({unit})</span>}
                        {rangeText(row.info) && <span className="block text-xs text-ink-500">{rangeText(row.info)}</span>}
                      </th>
                      {corners.map((c, i) => {
                        const name = `corners.${i}.${row.path.join('.')}` as const;
                        const error = cellError(i, row.path);
                        const label = row.path.length > 1 ? `${c.name}, ${group}: ${row.label}` : `${c.name}: ${row.label}`;
                        return (
                          <td key={`${c.name}-${i}`} className="px-3 py-1.5 align-top">
                            {row.info.kind === 'enum' ? (
                              <select aria-label={label} disabled={!editable} className="h-8 w-full rounded border border-ink-300 bg-white px-1.5 text-sm disabled:bg-ink-50" {...form.register(name as never)}>
                                {row.info.options!.map((o) => (
                                  <option key={o} value={o}>
                                    {o}
                                  </option>
                                ))}
                              </select>
                            ) : (
                              <input
                                aria-label={label}
                                aria-invalid={error ? true : undefined}
                                readOnly={!editable}
                                inputMode={row.info.kind === 'string' ? undefined : 'decimal'}
                                spellCheck={false}
                                className={`h-8 w-full rounded border bg-white px-1.5 font-mono text-sm tabular-nums read-only:border-transparent read-only:bg-transparent ${error ? 'border-error' : 'border-ink-300'}`}
                                {...form.register(name as never)}
                              />
                            )}
                            {error && (
                              <p className="mt-1 text-xs font-medium text-error" role="alert">
                                ■ {error}
                              </p>
                            )}
                          </td>
                        );
                      })}
                    </tr>
                  );
                })}
              </Fragment>
            ))}
          </tbody>
        </table>
      </div>
      {save.isError && <SaveError error={save.error} title="Corners not saved" version={version} />}
      {structure.isError && <SaveError error={structure.error} title="Corner not added or removed" version={version} />}
      {editable && (
        <div className="mt-3 flex items-center justify-end gap-2">
          {isDirty && <span className="text-sm text-ink-500">Save or undo your edits before adding or removing a corner.</span>}
          <Button size="sm" disabled={!isDirty} onClick={() => form.reset(values)}>
            Undo changes
          </Button>
          <Button size="sm" type="submit" variant="primary" disabled={!isDirty} busy={save.isPending}>
            Save corners
          </Button>
        </div>
      )}
    </form>
  );
}
