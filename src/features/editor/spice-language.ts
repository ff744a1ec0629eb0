// Syntax colouring for SPICE-family netlists (SPICE3 conventions, ngspice and CDL usage) as a
// Monaco Monarch grammar. Colouring only: the real reader is grammar/, and nothing here decides
// what a line means for a check.
//
// Token names (the theme in ./theme.ts colours them; `.spice` is appended by Monaco):
//   comment                 `*` line, `$` or `;` to end of line
//   annotation              CDL `*.PININFO`, `*.SCALE`, … lines and `$[model]` tags
//   keyword                 dot-commands (`.param`, `.option`, `.global`, …) and `params:`
//   keyword.structure       `.subckt`, `.ends`, `.include`, `.lib`, `.end`
//   type.cell               the cell named by `.subckt`, `.ends` or after a CDL `/`
//   element.<kind>          the element name that starts a line, by its first letter:
//                           mosfet M, instance X, passive R C L K, source V I E F G H B,
//                           diode D, bipolar Q, jfet J, line T O U, switch S W, unknown other
//   delimiter.continuation  `+` at the start of a continuation line
//   attribute.name          the name in `name=value`
//   number / number.unit    a value and its engineering suffix or unit letters (`10` `fF`)
//   delimiter.curly         `{` `}` around an expression; `'` quotes work the same
//   variable, predefined, operator   inside expressions
//   string                  "…" (file names of `.include`)
//   identifier              nodes, model names and everything else

import type { languages } from 'monaco-editor/editor';

export const SPICE_LANGUAGE_ID = 'keepwell-spice';

/** Characters that may start a node or model name on an element line. */
const NAME = /[^\s$;=(){}'",/+][^\s;=(){}'",]*/;

// First letter of an element name → its kind (SPICE3 letters; `u` is a uniform RC line).
const ELEMENT_KINDS: [letters: string, kind: string][] = [
  ['m', 'mosfet'],
  ['x', 'instance'],
  ['rclk', 'passive'],
  ['viefghb', 'source'],
  ['d', 'diode'],
  ['q', 'bipolar'],
  ['j', 'jfet'],
  ['tou', 'line'],
  ['sw', 'switch'],
];

const elementRules: languages.IMonarchLanguageRule[] = ELEMENT_KINDS.map(([letters, kind]) => [
  new RegExp(`^\\s*[${letters}][^\\s$;=(){}'",]*`),
  `element.${kind}`,
]);

/** Numbers as SPICE reads them: `10`, `-1.5`, `.5`, `1e-3`, `1e+06u`, `10fF`, `2.5meg`, `3mil`. */
const NUMBER_WITH_UNIT = /([+-]?(?:\d+\.?\d*|\.\d+)(?:e[+-]?\d+)?)([a-z]+)/;
const NUMBER = /[+-]?(?:\d+\.?\d*|\.\d+)(?:e[+-]?\d+)?/;

const FUNCTIONS = ['sqrt', 'exp', 'log', 'ln', 'log10', 'min', 'max', 'abs', 'pow', 'pwr', 'sin', 'cos', 'tan', 'atan', 'sinh', 'cosh', 'tanh', 'floor', 'ceil', 'int', 'nint', 'sgn', 'if', 'limit'];

export const spiceLanguage: languages.IMonarchLanguage = {
  ignoreCase: true,
  defaultToken: 'identifier',
  tokenPostfix: '.spice',
  functions: FUNCTIONS,

  tokenizer: {
    root: [
      // Whole-line forms, only at the start of a line.
      [/^\s*\*\.pininfo\b/, { token: 'annotation', next: '@pinInfo' }],
      [/^\s*\*\.[a-z_]+\b.*$/, 'annotation'],
      [/^\s*\*.*$/, 'comment'],
      [/^\s*\+/, 'delimiter.continuation'],
      [/^\s*\.(?:subckt|macro)\b/, { token: 'keyword.structure', next: '@cellName' }],
      [/^\s*\.(?:ends|eom)\b/, { token: 'keyword.structure', next: '@cellName' }],
      [/^\s*\.(?:include|inc|lib|end)\b/, 'keyword.structure'],
      [/^\s*\.model\b/, { token: 'keyword', next: '@modelName' }],
      [/^\s*\.[a-z_][\w]*/, 'keyword'],
      ...elementRules,
      [/^\s*[a-z][^\s$;=(){}'",]*/, 'element.other'],
      { include: '@arguments' },
    ],

    // Everything after the first word of a line, and on continuation lines.
    arguments: [
      [/\s+/, 'white'],
      [/;.*$/, 'comment'],
      [/\$\[[^\]]*\]/, 'annotation'],
      [/\$.*$/, 'comment'],
      [/\{/, { token: 'delimiter.curly', next: '@braceExpression' }],
      [/\}/, 'delimiter.curly'],
      [/'/, { token: 'delimiter.quote', next: '@quoteExpression' }],
      [/"[^"]*"?/, 'string'],
      [/params:/, 'keyword'],
      [/([a-z_][\w.]*)(\s*)(=)/, ['attribute.name', 'white', 'operator']],
      [/(\/)(\s*)([^\s$;=(){}'",]+)/, ['delimiter', 'white', 'type.cell']],
      [NUMBER_WITH_UNIT, ['number', 'number.unit']],
      [NUMBER, 'number'],
      [/[()]/, 'delimiter.parenthesis'],
      [/=/, 'operator'],
      [NAME, 'identifier'],
    ],

    cellName: [
      [/^/, { token: '', next: '@pop' }],
      [/\s+/, 'white'],
      [/[^\s$;]+/, { token: 'type.cell', next: '@pop' }],
      [/./, { token: '@rematch', next: '@pop' }],
    ],

    modelName: [
      [/^/, { token: '', next: '@pop' }],
      [/\s+/, 'white'],
      [/([^\s$;(]+)(\s+)([a-z]+)/, ['type.cell', 'white', { token: 'type', next: '@pop' }]],
      [/[^\s$;(]+/, { token: 'type.cell', next: '@pop' }],
      [/./, { token: '@rematch', next: '@pop' }],
    ],

    pinInfo: [
      [/^/, { token: '', next: '@pop' }],
      [/\s+/, 'white'],
      [/([^\s:]+)(:)([a-z]+)/, ['identifier', 'delimiter', 'keyword.direction']],
      [/\S+/, 'annotation'],
    ],

    braceExpression: [
      [/^/, { token: '', next: '@pop' }],
      [/\}/, { token: 'delimiter.curly', next: '@pop' }],
      { include: '@expression' },
    ],

    quoteExpression: [
      [/^/, { token: '', next: '@pop' }],
      [/'/, { token: 'delimiter.quote', next: '@pop' }],
      { include: '@expression' },
    ],

    expression: [
      [/\s+/, 'white'],
      [NUMBER_WITH_UNIT, ['number', 'number.unit']],
      [NUMBER, 'number'],
      [/[a-z_]\w*(?=\s*\()/, { cases: { '@functions': 'predefined', '@default': 'variable' } }],
      [/[a-z_]\w*/, 'variable'],
      [/[()]/, 'delimiter.parenthesis'],
      [/\*\*|[-+*/^%<>=!&|?:,]+/, 'operator'],
    ],
  },
};

export const spiceLanguageConfiguration: languages.LanguageConfiguration = {
  comments: { lineComment: '*' },
  brackets: [
    ['{', '}'],
    ['(', ')'],
    ['[', ']'],
  ],
  autoClosingPairs: [
    { open: '{', close: '}' },
    { open: '(', close: ')' },
    { open: '"', close: '"' },
  ],
  // Names as netlists write them: `a_85_193#`, `addr0[3]`, `net<2>`, `x1/x2/n5`, `gnd:F12`.
  wordPattern: /[^\s$;=(){}'",]+/,
  folding: {
    markers: { start: /^\s*\.(?:subckt|macro)\b/i, end: /^\s*\.(?:ends|eom)\b/i },
  },
};
