// Tailwind 4 reads this file through `@config` in src/styles.css. It holds the parts of the
// theme that come from Keepwell's palette (src/design/palette.ts) so the same colours drive
// the utilities and the editor's syntax theme.
import type { Config } from 'tailwindcss';
import { copper, ink, tone, well } from './src/design/palette';

const toneColours = Object.fromEntries(
  Object.entries(tone).map(([name, t]) => [name, { DEFAULT: t.fg, soft: t.soft, line: t.line }]),
);

export default {
  content: ['./index.html', './src/**/*.{ts,tsx}', './tests/ui/browser/*.{html,tsx}'],
  theme: {
    extend: {
      colors: { ink, well, copper, ...toneColours },
      fontFamily: {
        sans: ['"IBM Plex Sans"', 'system-ui', 'sans-serif'],
        mono: ['"IBM Plex Mono"', 'ui-monospace', 'monospace'],
      },
      maxWidth: { page: '100rem' },
    },
  },
} satisfies Config;
