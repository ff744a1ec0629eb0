// Monaco, bundled with the app: the editor core, the few features a netlist viewer needs,
// our language and theme, and the editor worker built by Vite. @monaco-editor/react is told to
// use this instance, so it never loads Monaco from a CDN.

import { loader } from '@monaco-editor/react';
import * as monaco from 'monaco-editor/editor';
import 'monaco-editor/features/codicon/register';
import 'monaco-editor/features/find/register';
import 'monaco-editor/features/folding/register';
import 'monaco-editor/features/bracketMatching/register';
import 'monaco-editor/features/hover/register';
import 'monaco-editor/features/wordHighlighter/register';
import 'monaco-editor/features/contextmenu/register';
import 'monaco-editor/features/clipboard/register';
import 'monaco-editor/features/gotoLine/register';
// Go to definition (F12, Ctrl+click) from an instance to its `.subckt`: ./definition-provider.ts.
import 'monaco-editor/features/gotoSymbol/register';
import 'monaco-editor/features/lineSelection/register';
import 'monaco-editor/features/readOnlyMessage/register';
// Look-alike and invisible characters in a netlist silently make a second net (`vdd` with a
// Cyrillic `d`, a no-break space inside a name): the editor marks them, computed in the worker.
import 'monaco-editor/features/unicodeHighlighter/register';
import EditorWorker from 'monaco-editor/editor/editor.worker?worker';
import { SPICE_LANGUAGE_ID, spiceLanguage, spiceLanguageConfiguration } from './spice-language';
import { NETLIST_THEME, netlistTheme } from './theme';

globalThis.MonacoEnvironment = { getWorker: () => new EditorWorker() };

if (!monaco.languages.getLanguages().some((l) => l.id === SPICE_LANGUAGE_ID)) {
  monaco.languages.register({ id: SPICE_LANGUAGE_ID, extensions: ['.sp', '.spi', '.spice', '.cir', '.cdl', '.net', '.ckt'], aliases: ['SPICE netlist'] });
  monaco.languages.setMonarchTokensProvider(SPICE_LANGUAGE_ID, spiceLanguage);
  monaco.languages.setLanguageConfiguration(SPICE_LANGUAGE_ID, spiceLanguageConfiguration);
}
monaco.editor.defineTheme(NETLIST_THEME, netlistTheme);

loader.config({ monaco });

export { monaco };
