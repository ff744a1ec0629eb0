// Keepwell's colours, in one place: Tailwind's theme (tailwind.config.ts) and the
// editor's syntax theme both read them from here.

/** Neutrals: a cool graphite with a faint green cast, used for text, lines and surfaces. */
export const ink = {
  50: '#f7f8f7',
  100: '#eef0ee',
  200: '#dee2df',
  300: '#c4cac6',
  400: '#9aa29d',
  500: '#646d68',
  600: '#525a56',
  700: '#3d4441',
  800: '#2a302d',
  900: '#1b201e',
  950: '#101412',
} as const;

/** Brand colour: deep "well" teal, used for the logotype, primary actions and focus rings. */
export const well = {
  50: '#eff7f6',
  100: '#d6ece9',
  200: '#aed8d3',
  300: '#7dbdb6',
  400: '#4e9e97',
  500: '#2f827c',
  600: '#226964',
  700: '#1c5551',
  800: '#174442',
  900: '#123735',
  950: '#0a2221',
} as const;

/** Accent: copper, used sparingly (the held level in the mark, continuation marks, highlights). */
export const copper = {
  50: '#fbf3ec',
  100: '#f5e1cf',
  200: '#ebc29f',
  300: '#de9c69',
  400: '#cf7a3f',
  500: '#b8622a',
  600: '#984e22',
  700: '#7a3f1e',
  800: '#60331b',
  900: '#4c2a18',
} as const;

/**
 * Severity colours. Each `fg` keeps a contrast of at least 4.5:1 on white and on its own `soft`
 * background; the four hues also differ in lightness, and every use pairs the colour with a
 * glyph and a word (see src/design/severity.tsx), so meaning never rests on hue alone
 * (colour-blind readers, grey-scale print).
 */
export const tone = {
  error: { fg: '#a4262c', soft: '#fcedec', line: '#e2a09c' },
  warning: { fg: '#855000', soft: '#fdf3dc', line: '#e3c27a' },
  info: { fg: '#1f5f99', soft: '#e8f1fa', line: '#9dc0e3' },
  waived: { fg: '#5a5470', soft: '#f0eef4', line: '#bfb9cd' },
  ok: { fg: '#1d6b3f', soft: '#e7f4ec', line: '#9ccdb0' },
} as const;

/** Netlist syntax colours for the editor (light theme, on white). */
export const syntax = {
  text: ink[900],
  comment: ink[500],
  annotation: copper[700],
  command: well[700],
  structure: well[800],
  cellName: copper[600],
  mosfet: '#265b8c',
  instance: '#6a4c93',
  passive: '#6b5a14',
  source: '#8e3b5e',
  otherElement: '#265b8c',
  number: '#0f6b5a',
  unit: '#357a6b',
  parameter: copper[700],
  expression: '#6a4c93',
  function: '#265b8c',
  continuation: copper[600],
  string: '#6b5a14',
  lineNumber: ink[500],
  activeLineNumber: ink[800],
  selection: well[100],
  lineHighlight: ink[50],
} as const;
