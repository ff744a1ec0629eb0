// Form fields for deck settings, built from a zod field's kind, unit, label and range.

import { useEffect, useId, useRef, type ReactNode, type Ref, type SelectHTMLAttributes } from 'react';
import type { FieldError, FieldValues, UseFormRegisterReturn, UseFormReturn } from 'react-hook-form';
import { useQueryClient } from '@tanstack/react-query';
import { Button } from '../../components/Button';
import { Checkbox, TextField } from '../../components/Field';
import { ErrorNotice, Notice } from '../../components/Notice';
import { isApiError } from '../../lib/api';
import { versionQuery } from './queries';
import { formatQuantity, rangeText, unitLabel, type FieldInfo } from './quantity';

export function SelectField({
  label,
  options,
  error,
  hint,
  ref,
  className = '',
  ...rest
}: SelectHTMLAttributes<HTMLSelectElement> & { label: ReactNode; options: { value: string; label: string }[]; error?: string; hint?: ReactNode; ref?: Ref<HTMLSelectElement> }) {
  const id = useId();
  return (
    <div className={className}>
      <label htmlFor={id} className="mb-1.5 block text-sm font-medium text-ink-800">
        {label}
      </label>
      <select
        id={id}
        ref={ref}
        aria-invalid={error ? true : undefined}
        aria-describedby={error ? `${id}-error` : hint ? `${id}-hint` : undefined}
        className={`block h-10 w-full rounded-md border bg-white px-2.5 text-sm text-ink-900 shadow-xs disabled:bg-ink-100 disabled:text-ink-500 ${error ? 'border-error' : 'border-ink-300'}`}
        {...rest}
      >
        {options.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </select>
      {hint && !error && (
        <p id={`${id}-hint`} className="mt-1.5 text-xs text-ink-500">
          {hint}
        </p>
      )}
      {error && (
        <p id={`${id}-error`} className="mt-1.5 flex items-center gap-1.5 text-xs font-medium text-error">
          <span aria-hidden="true">■</span>
          {error}
        </p>
      )}
    </div>
  );
}

/**
 * Follow the saved values of a form: when the server's copy changes (a save here, a
 * reload after someone else's save), fields the user has not touched take the new
 * values and fields they have typed in keep what they typed.
 */
export function useSavedValues<V extends FieldValues>(form: UseFormReturn<V>, values: V) {
  const first = useRef(values);
  useEffect(() => {
    if (values === first.current) return;
    first.current = values;
    form.reset(values, { keepDirtyValues: true });
  }, [form, values]);
}

/** One schema field as a form control: numbers as quantity text with their unit and range, booleans as a box, enums as a list. */
export function SchemaField({
  info,
  registration,
  error,
  disabled,
  label,
  compact = false,
}: {
  info: FieldInfo;
  registration: UseFormRegisterReturn;
  error?: FieldError;
  disabled?: boolean;
  /** Defaults to the field's own label. */
  label?: ReactNode;
  /** Table cells: no hint under the field (the range is in its title). */
  compact?: boolean;
}) {
  const text = label ?? info.label;
  const message = typeof error?.message === 'string' ? error.message : undefined;
  if (info.kind === 'boolean') return <Checkbox label={text} disabled={disabled} {...registration} />;
  if (info.kind === 'enum')
    return <SelectField label={text} options={(info.options ?? []).map((o) => ({ value: o, label: o }))} disabled={disabled} error={message} {...registration} />;
  if (info.kind === 'number' || info.kind === 'integer') {
    const unit = unitLabel(info.unit);
    const range = rangeText(info);
    const hint = [range && `Range ${range}`, info.defaultValue !== undefined && `default ${formatQuantity(Number(info.defaultValue), info.unit)}`].filter(Boolean).join('; ');
    return (
      <TextField
        label={
          <>
            {text}
            {unit && <span className="ml-1 font-normal text-ink-500">({unit})</span>}
          </>
        }
        inputMode="decimal"
        autoComplete="off"
        spellCheck={false}
        className="font-mono tabular-nums"
        title={compact && range ? `Range ${range}` : undefined}
        hint={compact ? undefined : hint || undefined}
        error={message}
        disabled={disabled}
        {...registration}
      />
    );
  }
  return <TextField label={text} className="font-mono" disabled={disabled} error={message} {...registration} />;
}

/** A failed save: a stale draft gets a way to load the other person's change (the form keeps what was typed). */
export function SaveError({ error, title, version }: { error: unknown; title: string; version: { deckId: string; id: string } }) {
  const queryClient = useQueryClient();
  if (isApiError(error, 'stale-version'))
    return (
      <Notice tone="warning" title="Someone else saved this draft first" className="mt-3">
        <p>Load their change, check that yours still makes sense, and save again. What you typed here is kept.</p>
        <Button size="sm" className="mt-2" onClick={() => queryClient.invalidateQueries({ queryKey: versionQuery(version.deckId, version.id).queryKey })}>
          Load the latest draft
        </Button>
      </Notice>
    );
  return <ErrorNotice error={error} title={title} className="mt-3" />;
}
