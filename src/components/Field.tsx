import { useId, type InputHTMLAttributes, type ReactNode, type Ref, type TextareaHTMLAttributes } from 'react';

function sentence(text: string) {
  return text ? text[0].toUpperCase() + text.slice(1) : text;
}

const control =
  'block w-full rounded-md border bg-white px-3 text-sm text-ink-900 shadow-xs placeholder:text-ink-400 ' +
  'focus:border-well-600 focus-visible:outline-offset-1 ' +
  'disabled:bg-ink-100 disabled:text-ink-500';

interface FieldShellProps {
  id: string;
  label: ReactNode;
  hint?: ReactNode;
  error?: string;
  children: ReactNode;
  className?: string;
}

function FieldShell({ id, label, hint, error, children, className = '' }: FieldShellProps) {
  return (
    <div className={className}>
      <label htmlFor={id} className="mb-1.5 block text-sm font-medium text-ink-800">
        {label}
      </label>
      {children}
      {hint && !error && (
        <p id={`${id}-hint`} className="mt-1.5 text-xs text-ink-500">
          {hint}
        </p>
      )}
      {error && (
        <p id={`${id}-error`} className="mt-1.5 flex items-center gap-1.5 text-xs font-medium text-error">
          <span aria-hidden="true">■</span>
          {sentence(error)}
        </p>
      )}
    </div>
  );
}

/** The control's id and the element that describes it: the error when there is one, else the hint. */
function useFieldIds(id: string | undefined, error: string | undefined, hint: ReactNode) {
  const autoId = useId();
  const fieldId = id ?? autoId;
  return { fieldId, describedBy: error ? `${fieldId}-error` : hint ? `${fieldId}-hint` : undefined };
}

type TextFieldProps = InputHTMLAttributes<HTMLInputElement> & {
  label: ReactNode;
  hint?: ReactNode;
  error?: string;
  ref?: Ref<HTMLInputElement>;
  wrapperClassName?: string;
};

export function TextField({ label, hint, error, id, className = '', wrapperClassName, ref, ...rest }: TextFieldProps) {
  const { fieldId, describedBy } = useFieldIds(id, error, hint);
  return (
    <FieldShell id={fieldId} label={label} hint={hint} error={error} className={wrapperClassName}>
      <input
        id={fieldId}
        ref={ref}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy}
        className={`${control} h-10 ${error ? 'border-error' : 'border-ink-300'} ${className}`}
        {...rest}
      />
    </FieldShell>
  );
}

type TextAreaFieldProps = TextareaHTMLAttributes<HTMLTextAreaElement> & {
  label: ReactNode;
  hint?: ReactNode;
  error?: string;
  ref?: Ref<HTMLTextAreaElement>;
  wrapperClassName?: string;
};

export function TextAreaField({ label, hint, error, id, className = '', wrapperClassName, ref, ...rest }: TextAreaFieldProps) {
  const { fieldId, describedBy } = useFieldIds(id, error, hint);
  return (
    <FieldShell id={fieldId} label={label} hint={hint} error={error} className={wrapperClassName}>
      <textarea
        id={fieldId}
        ref={ref}
        aria-invalid={error ? true : undefined}
        aria-describedby={describedBy}
        className={`${control} py-2 ${error ? 'border-error' : 'border-ink-300'} ${className}`}
        {...rest}
      />
    </FieldShell>
  );
}

/** A group of checkboxes with one legend and one error, e.g. the roles of a user. */
export function CheckboxGroup({ legend, error, children, hint }: { legend: ReactNode; error?: string; hint?: ReactNode; children: ReactNode }) {
  const id = useId();
  return (
    <fieldset aria-describedby={error ? `${id}-error` : hint ? `${id}-hint` : undefined}>
      <legend className="mb-1.5 text-sm font-medium text-ink-800">{legend}</legend>
      <div className="space-y-2">{children}</div>
      {hint && !error && (
        <p id={`${id}-hint`} className="mt-1.5 text-xs text-ink-500">
          {hint}
        </p>
      )}
      {error && (
        <p id={`${id}-error`} className="mt-1.5 flex items-center gap-1.5 text-xs font-medium text-error">
          <span aria-hidden="true">■</span>
          {sentence(error)}
        </p>
      )}
    </fieldset>
  );
}

type CheckboxProps = InputHTMLAttributes<HTMLInputElement> & { label: ReactNode; description?: ReactNode; ref?: Ref<HTMLInputElement> };

export function Checkbox({ label, description, id, ref, ...rest }: CheckboxProps) {
  const autoId = useId();
  const boxId = id ?? autoId;
  return (
    <div className="flex items-start gap-2.5">
      <input
        id={boxId}
        ref={ref}
        type="checkbox"
        className="mt-0.5 size-4 shrink-0 rounded border-ink-400 accent-well-700"
        aria-describedby={description ? `${boxId}-desc` : undefined}
        {...rest}
      />
      <div className="text-sm leading-5">
        <label htmlFor={boxId} className="font-medium text-ink-800">
          {label}
        </label>
        {description && (
          <p id={`${boxId}-desc`} className="text-xs text-ink-500">
            {description}
          </p>
        )}
      </div>
    </div>
  );
}
