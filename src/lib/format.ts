// Dates as engineers write them (ISO 8601 order, 24-hour clock), in the reader's time zone.

const pad = (n: number) => String(n).padStart(2, '0');

function parse(iso: string | null | undefined): Date | null {
  if (!iso) return null;
  const date = new Date(iso);
  return Number.isNaN(date.getTime()) ? null : date;
}

/** `2025-12-04 09:41`; an em dash for a missing value. */
export function formatDateTime(iso: string | null | undefined): string {
  const d = parse(iso);
  return d ? `${formatDate(iso)} ${pad(d.getHours())}:${pad(d.getMinutes())}` : '—';
}

/** `2025-12-04`; an em dash for a missing value. */
export function formatDate(iso: string | null | undefined): string {
  const d = parse(iso);
  return d ? `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())}` : '—';
}

export function initials(name: string): string {
  const parts = name.trim().split(/\s+/).filter(Boolean);
  if (parts.length === 0) return '?';
  return (parts[0][0] + (parts.length > 1 ? parts[parts.length - 1][0] : '')).toUpperCase();
}
