import { Spinner } from './Button';

export function Loading({ label = 'Loading…' }: { label?: string }) {
  return (
    <div role="status" aria-live="polite" className="flex items-center gap-2 px-1 py-6 text-sm text-ink-500">
      <Spinner />
      {label}
    </div>
  );
}
