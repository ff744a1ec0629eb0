import { copper, well } from '../design/palette';

/**
 * Keepwell's mark: a well, drawn like a potential-well diagram (ground line, dip, ground line),
 * holding its charge near the brim. Drawn for 16–64 px; `title` makes it an image for screen readers, otherwise it is
 * decorative.
 */
export function Logomark({ size = 28, title, inverted = false }: { size?: number; title?: string; inverted?: boolean }) {
  const wall = inverted ? well[100] : well[700];
  const level = inverted ? copper[300] : copper[400];
  return (
    <svg
      width={size}
      height={size}
      viewBox="0 0 32 32"
      role={title ? 'img' : undefined}
      aria-hidden={title ? undefined : true}
      aria-label={title}
      focusable="false"
    >
      <path d="M9.5 13.5h13v6a6.5 6.5 0 0 1-13 0Z" fill={level} />
      <path d="M2.5 9.5h4v10a9.5 9.5 0 0 0 19 0v-10h4" fill="none" stroke={wall} strokeWidth="3" strokeLinecap="round" strokeLinejoin="round" />
    </svg>
  );
}

/** Mark and name together, for the sidebar and the sign-in page. */
export function Logotype({ size = 28, inverted = false }: { size?: number; inverted?: boolean }) {
  return (
    <span className="inline-flex items-center gap-2.5" aria-label="Keepwell" role="img">
      <Logomark size={size} inverted={inverted} />
      <span
        aria-hidden="true"
        className={`font-semibold tracking-tight ${inverted ? 'text-white' : 'text-ink-900'}`}
        style={{ fontSize: size * 0.72 }}
      >
        Keep<span className={inverted ? 'text-well-200' : 'text-well-700'}>well</span>
      </span>
    </span>
  );
}
