import type { ReactNode } from 'react';

/**
 * What a page or section shows when it has nothing yet: what will appear here, and what the
 * reader can do to get there. `steps` are the ways to get there, in order.
 */
export function EmptyState({
  title,
  children,
  steps,
  action,
  illustration = 'well',
  compact = false,
}: {
  title: string;
  children: ReactNode;
  steps?: ReactNode[];
  action?: ReactNode;
  illustration?: 'well' | 'list' | 'deck' | 'mail' | 'key' | 'lost';
  compact?: boolean;
}) {
  return (
    <section
      aria-label={title}
      className={`rounded-lg border border-dashed border-ink-300 bg-white/70 ${compact ? 'px-6 py-8' : 'px-8 py-12'} text-center`}
    >
      <EmptyIllustration kind={illustration} />
      <h2 className="mt-4 text-base font-semibold text-ink-900">{title}</h2>
      <div className="mx-auto mt-1.5 max-w-xl text-sm leading-6 text-ink-600">{children}</div>
      {steps && steps.length > 0 && (
        <ol className="mx-auto mt-5 max-w-lg space-y-2 text-left text-sm text-ink-700">
          {steps.map((step, i) => (
            <li key={i} className="flex gap-3">
              <span className="mt-0.5 flex size-5 shrink-0 items-center justify-center rounded-full bg-well-100 text-xs font-semibold text-well-800">
                {i + 1}
              </span>
              <span className="leading-6">{step}</span>
            </li>
          ))}
        </ol>
      )}
      {action && <div className="mt-6 flex justify-center gap-3">{action}</div>}
    </section>
  );
}

function EmptyIllustration({ kind }: { kind: 'well' | 'list' | 'deck' | 'mail' | 'key' | 'lost' }) {
  const stroke = 'stroke-ink-300';
  return (
    <svg viewBox="0 0 64 40" className="mx-auto h-10 w-16" aria-hidden="true" fill="none" strokeWidth="2" strokeLinecap="round" strokeLinejoin="round">
      {kind === 'well' && (
        <>
          <path d="M6 12h10v10a16 16 0 0 0 32 0V12h10" className={stroke} />
          <path d="M22 26h20" className="stroke-copper-300" strokeDasharray="3 3" />
        </>
      )}
      {kind === 'list' && (
        <>
          <rect x="14" y="4" width="36" height="32" rx="3" className={stroke} />
          <path d="M21 13h22M21 20h22M21 27h14" className="stroke-copper-300" />
        </>
      )}
      {kind === 'deck' && (
        <>
          <rect x="18" y="8" width="30" height="26" rx="3" className={stroke} />
          <path d="M14 30V6a2 2 0 0 1 2-2h26" className={stroke} />
          <path d="M24 17h18M24 24h12" className="stroke-copper-300" />
        </>
      )}
      {kind === 'mail' && (
        <>
          <rect x="12" y="8" width="40" height="26" rx="3" className={stroke} />
          <path d="m13 10 19 14 19-14" className="stroke-copper-300" />
        </>
      )}
      {kind === 'key' && (
        <>
          <circle cx="22" cy="20" r="8" className={stroke} />
          <path d="M30 20h20v6M44 20v5" className="stroke-copper-300" />
        </>
      )}
      {kind === 'lost' && (
        <>
          <path d="M6 30h14l6-20 6 20 6-20 6 20h14" className={stroke} />
          <circle cx="32" cy="6" r="2" className="stroke-copper-300" />
        </>
      )}
    </svg>
  );
}
