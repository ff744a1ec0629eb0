import type { ReactNode } from 'react';
import { ToneGlyph, toneChipClass, type Tone } from '../design/severity';
import { isApiError } from '../lib/api';

/** A message in a box: errors are announced (role="alert"), the rest politely. */
export function Notice({ tone, title, children, className = '' }: { tone: Tone; title?: ReactNode; children?: ReactNode; className?: string }) {
  return (
    <div
      role={tone === 'error' ? 'alert' : 'status'}
      className={`flex items-start gap-2.5 rounded-md border px-3.5 py-3 text-sm ${toneChipClass(tone)} ${className}`}
    >
      <ToneGlyph tone={tone} size={14} className="mt-0.5" />
      <div className="min-w-0 text-ink-800">
        {title && <p className="font-semibold text-ink-900">{title}</p>}
        {children && <div className={title ? 'mt-0.5' : ''}>{children}</div>}
      </div>
    </div>
  );
}

/** The message to show for a failed request. */
export function errorMessage(error: unknown): string {
  if (isApiError(error)) return error.message;
  if (error instanceof Error) return error.message;
  return 'Something went wrong.';
}

export function ErrorNotice({ error, title = 'That did not work', className }: { error: unknown; title?: string; className?: string }) {
  const details = isApiError(error) ? error.details : [];
  return (
    <Notice tone="error" title={title} className={className}>
      <p>{errorMessage(error)}</p>
      {details.length > 0 && (
        <ul className="mt-1 list-disc pl-5">
          {details.map((d) => (
            <li key={`${d.path}:${d.message}`}>
              <code className="text-xs">{d.path}</code>: {d.message}
            </li>
          ))}
        </ul>
      )}
    </Notice>
  );
}
