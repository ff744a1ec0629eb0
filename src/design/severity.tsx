// Severity and status marks: a shape, a colour and a word together, so each reads without colour.

import type { Severity } from '../../shared/deck';

export type Tone = Severity | 'waived' | 'ok';

export const TONE_LABELS: Record<Tone, string> = {
  error: 'Error',
  warning: 'Warning',
  info: 'Info',
  waived: 'Waived',
  ok: 'OK',
};

const toneText: Record<Tone, string> = {
  error: 'text-error',
  warning: 'text-warning',
  info: 'text-info',
  waived: 'text-waived',
  ok: 'text-ok',
};

const toneChip: Record<Tone, string> = {
  error: 'bg-error-soft border-error-line text-error',
  warning: 'bg-warning-soft border-warning-line text-warning',
  info: 'bg-info-soft border-info-line text-info',
  waived: 'bg-waived-soft border-waived-line text-waived',
  ok: 'bg-ok-soft border-ok-line text-ok',
};

export function toneChipClass(tone: Tone) {
  return toneChip[tone];
}

/** Square for errors, triangle for warnings, disc for information, hollow diamond for waived, tick for OK. */
export function ToneGlyph({ tone, size = 12, className = '' }: { tone: Tone; size?: number; className?: string }) {
  const common = { width: size, height: size, viewBox: '0 0 12 12', 'aria-hidden': true, focusable: false as const };
  const cls = `${toneText[tone]} shrink-0 ${className}`;
  switch (tone) {
    case 'error':
      return (
        <svg {...common} className={cls}>
          <rect x="1" y="1" width="10" height="10" rx="1.5" fill="currentColor" />
          <path d="M4 4l4 4M8 4l-4 4" stroke="white" strokeWidth="1.5" strokeLinecap="round" />
        </svg>
      );
    case 'warning':
      return (
        <svg {...common} className={cls}>
          <path d="M6 0.8 11.4 10.6H0.6Z" fill="currentColor" strokeLinejoin="round" />
          <path d="M6 4.3v3" stroke="white" strokeWidth="1.4" strokeLinecap="round" />
          <circle cx="6" cy="9" r="0.8" fill="white" />
        </svg>
      );
    case 'info':
      return (
        <svg {...common} className={cls}>
          <circle cx="6" cy="6" r="5.2" fill="currentColor" />
          <path d="M6 5.4v3.2" stroke="white" strokeWidth="1.4" strokeLinecap="round" />
          <circle cx="6" cy="3.6" r="0.8" fill="white" />
        </svg>
      );
    case 'waived':
      return (
        <svg {...common} className={cls}>
          <path d="M6 0.9 11.1 6 6 11.1 0.9 6Z" fill="none" stroke="currentColor" strokeWidth="1.6" strokeLinejoin="round" />
        </svg>
      );
    case 'ok':
      return (
        <svg {...common} className={cls}>
          <circle cx="6" cy="6" r="5.2" fill="currentColor" />
          <path d="M3.6 6.2 5.3 7.9 8.5 4.4" fill="none" stroke="white" strokeWidth="1.5" strokeLinecap="round" strokeLinejoin="round" />
        </svg>
      );
  }
}

/** A compact chip: glyph and word, optionally with a count (`▲ 12 Warnings`). */
export function ToneBadge({ tone, label, count }: { tone: Tone; label?: string; count?: number }) {
  const word = label ?? TONE_LABELS[tone];
  return (
    <span className={`inline-flex items-center gap-1.5 rounded border px-1.5 py-0.5 text-xs font-medium ${toneChip[tone]}`}>
      <ToneGlyph tone={tone} size={11} />
      {count !== undefined && <span className="tabular-nums">{count}</span>}
      <span>{word}</span>
    </span>
  );
}
