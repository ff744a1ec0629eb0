// A run's state as a mark (shape and word, never colour alone) and its progress as a bar.

import type { RunProgress, RunState, RunView } from '../../../shared/api/runs';
import { Spinner } from '../../components/Button';
import { ToneBadge, ToneGlyph } from '../../design/severity';

const STATE_WORDS: Record<RunState, string> = {
  queued: 'Queued',
  running: 'Running',
  succeeded: 'Finished',
  failed: 'Failed',
  cancelled: 'Cancelled',
};

export function RunStateBadge({ state }: { state: RunState }) {
  const word = STATE_WORDS[state];
  const base = 'inline-flex items-center gap-1.5 rounded border px-1.5 py-0.5 text-xs font-medium';
  switch (state) {
    case 'queued':
      return (
        <span className={`${base} border-ink-300 bg-white text-ink-700`} data-state={state}>
          <svg viewBox="0 0 12 12" width="11" height="11" aria-hidden="true">
            <circle cx="6" cy="6" r="4.6" fill="none" stroke="currentColor" strokeWidth="1.6" strokeDasharray="2 1.6" />
          </svg>
          {word}
        </span>
      );
    case 'running':
      return (
        <span className={`${base} border-well-300 bg-well-50 text-well-800`} data-state={state}>
          <Spinner className="size-3" />
          {word}
        </span>
      );
    case 'succeeded':
      return (
        <span className={`${base} border-ok-line bg-ok-soft text-ok`} data-state={state}>
          <ToneGlyph tone="ok" size={11} />
          {word}
        </span>
      );
    case 'failed':
      return (
        <span data-state={state}>
          <ToneBadge tone="error" label={word} />
        </span>
      );
    case 'cancelled':
      return (
        <span className={`${base} border-waived-line bg-waived-soft text-waived`} data-state={state}>
          <svg viewBox="0 0 12 12" width="11" height="11" aria-hidden="true">
            <circle cx="6" cy="6" r="4.6" fill="none" stroke="currentColor" strokeWidth="1.6" />
            <path d="M2.8 9.2 9.2 2.8" stroke="currentColor" strokeWidth="1.6" />
          </svg>
          {word}
        </span>
      );
  }
}

/** Fraction done of a run, from its stage counts; null when the stage has no count. */
export function progressFraction(progress: RunProgress | null): number | null {
  if (!progress) return null;
  if (progress.stage === 'done') return 1;
  if (progress.parts && progress.parts.total > 0) return progress.parts.done / progress.parts.total;
  return progress.total > 0 ? Math.min(1, progress.done / progress.total) : null;
}

export function RunProgressBar({ run, compact = false }: { run: Pick<RunView, 'state' | 'progress'>; compact?: boolean }) {
  const fraction = progressFraction(run.progress);
  const label = run.state === 'queued' ? 'Waiting for a worker' : (run.progress?.label ?? 'Starting');
  const counts = run.progress && run.progress.total > 0 ? `${run.progress.done} of ${run.progress.total}` : null;
  return (
    <div className={compact ? 'w-40' : 'w-full'}>
      <div
        role="progressbar"
        aria-label={`Progress: ${label}`}
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={fraction === null ? undefined : Math.round(fraction * 100)}
        aria-valuetext={fraction === null ? label : `${Math.round(fraction * 100)} %, ${label}`}
        className={`overflow-hidden rounded-full bg-ink-100 ${compact ? 'h-1.5' : 'h-2.5'}`}
      >
        {fraction === null ? (
          <div className="h-full w-1/3 animate-pulse rounded-full bg-well-300" />
        ) : (
          <div className="h-full rounded-full bg-well-600 transition-[width]" style={{ width: `${Math.max(2, fraction * 100)}%` }} />
        )}
      </div>
      <p className={`mt-1 text-ink-600 ${compact ? 'text-[11px]' : 'text-sm'}`}>
        {label}
        {counts && !compact && <span className="tabular-nums"> · {counts}</span>}
      </p>
    </div>
  );
}

export function SeverityCounts({ summary }: { summary: { errors: number; warnings: number; infos: number } | null }) {
  if (!summary) return <span className="text-ink-400">—</span>;
  return (
    <span className="inline-flex flex-wrap gap-1">
      <ToneBadge tone="error" count={summary.errors} label={summary.errors === 1 ? 'Error' : 'Errors'} />
      <ToneBadge tone="warning" count={summary.warnings} label={summary.warnings === 1 ? 'Warning' : 'Warnings'} />
      <ToneBadge tone="info" count={summary.infos} label={summary.infos === 1 ? 'Info' : 'Infos'} />
    </span>
  );
}
