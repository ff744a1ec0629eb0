import type { ReactNode } from 'react';
import { Spinner } from '../components/Button';
import { Logomark } from '../components/Logo';

export function Splash({ children }: { children?: ReactNode }) {
  return (
    <div className="flex min-h-screen flex-col items-center justify-center gap-4 bg-ink-50 px-6">
      <Logomark size={40} />
      {children ?? (
        <p role="status" className="flex items-center gap-2 text-sm text-ink-500">
          <Spinner /> Opening Keepwell…
        </p>
      )}
    </div>
  );
}
