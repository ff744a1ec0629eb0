import Editor, { type OnMount } from '@monaco-editor/react';
import { useEffect, useRef } from 'react';
import { monaco } from './monaco-setup';
import { SPICE_LANGUAGE_ID } from './spice-language';
import { NETLIST_THEME } from './theme';
import { tone as tones } from '../../design/palette';
import { registerOpener, registerWorkspace } from './definition-provider';
import type { GutterMark, HighlightRange, NetlistEditorProps } from './types';

type Decoration = monaco.editor.IModelDeltaDecoration;

const TONE_WORD = { error: 'Error', warning: 'Warning', info: 'Info', waived: 'Waived' } as const;

/** Hover texts are Markdown; net names like `a_85_193#` or `bl[3]` must stay literal. */
function literalMarkdown(text: string) {
  return text.replace(/[\\`*_{}[\]()#+\-.!|<>~]/g, '\\$&');
}

function toDecorations(highlights: HighlightRange[], marks: GutterMark[], lineCount: number): Decoration[] {
  const clamp = (line: number) => Math.min(Math.max(1, Math.floor(line)), Math.max(1, lineCount));
  const out: Decoration[] = [];
  for (const h of highlights) {
    const start = clamp(h.startLine);
    const end = clamp(Math.max(h.startLine, h.endLine));
    out.push({
      range: new monaco.Range(start, 1, end, 1),
      options: {
        isWholeLine: true,
        className: `kw-line-${h.tone}`,
        overviewRuler: h.tone === 'focus' ? undefined : { color: tones[h.tone].fg, position: monaco.editor.OverviewRulerLane.Left },
        minimap: h.tone === 'focus' ? undefined : { color: tones[h.tone].line, position: monaco.editor.MinimapPosition.Inline },
      },
    });
  }
  for (const m of marks) {
    const line = clamp(m.line);
    out.push({
      range: new monaco.Range(line, 1, line, 1),
      options: {
        glyphMarginClassName: `kw-glyph kw-glyph-${m.tone}`,
        glyphMarginHoverMessage: { value: `**${TONE_WORD[m.tone]}:** ${literalMarkdown(m.label)}` },
        stickiness: monaco.editor.TrackedRangeStickiness.NeverGrowsWhenTypingAtEdges,
      },
    });
  }
  return out;
}

/** The model address of a file: the file name alone, or under the workspace's own folder. */
function modelPath(fileName: string, workspaceId: string | undefined) {
  if (workspaceId === undefined) return fileName;
  return `/${encodeURIComponent(workspaceId)}/${fileName.split('/').map(encodeURIComponent).join('/')}`;
}

/** A SPICE-family netlist in Monaco, with Keepwell's colouring, line tints and gutter marks. */
export default function NetlistEditor({
  value,
  fileName = 'netlist.sp',
  readOnly = true,
  highlights = [],
  marks = [],
  revealLine,
  onMarkClick,
  onChange,
  height = '100%',
  ariaLabel,
  className,
  files,
  workspaceId,
  onOpenFile,
  onNavigateFinding,
}: NetlistEditorProps) {
  const editorRef = useRef<monaco.editor.IStandaloneCodeEditor | null>(null);
  const decorationsRef = useRef<monaco.editor.IEditorDecorationsCollection | null>(null);
  // onMount runs once, possibly several renders after the first one: it reads the props through refs.
  const highlightsRef = useRef(highlights);
  const marksRef = useRef(marks);
  const revealLineRef = useRef(revealLine);
  /** When the finding's line was last revealed: a re-layout soon after reveals it again if it fell out of view. */
  const revealedAtRef = useRef(0);
  const revealCheckRef = useRef<number | undefined>(undefined);
  const onMarkClickRef = useRef(onMarkClick);
  const onOpenFileRef = useRef(onOpenFile);
  const onNavigateRef = useRef(onNavigateFinding);
  const fileNameRef = useRef(fileName);
  /** A definition in another file, waiting for that file to be shown. */
  const pendingRef = useRef<{ path: string; position: monaco.IPosition } | null>(null);
  highlightsRef.current = highlights;
  marksRef.current = marks;
  revealLineRef.current = revealLine;
  onMarkClickRef.current = onMarkClick;
  onOpenFileRef.current = onOpenFile;
  onNavigateRef.current = onNavigateFinding;
  fileNameRef.current = fileName;

  // The other files of the set become models too, so definitions in them can be found, peeked and opened.
  useEffect(() => {
    if (!files?.length) return;
    const uriOf = (path: string) => monaco.Uri.parse(modelPath(path, workspaceId));
    const created: monaco.editor.ITextModel[] = [];
    for (const file of files) {
      const uri = uriOf(file.path);
      if (!monaco.editor.getModel(uri)) created.push(monaco.editor.createModel(file.text, SPICE_LANGUAGE_ID, uri));
    }
    const unregister = registerWorkspace(files, uriOf);
    return () => {
      unregister();
      const attached = new Set(monaco.editor.getEditors().map((e) => e.getModel()));
      for (const model of created) if (!model.isDisposed() && !attached.has(model)) model.dispose();
    };
  }, [files, workspaceId]);

  function showPosition(position: monaco.IPosition) {
    const editor = editorRef.current;
    if (!editor) return;
    editor.setPosition(position);
    editor.revealPositionInCenter(position, monaco.editor.ScrollType.Smooth);
    editor.focus();
  }

  const handleMount: OnMount = (editor) => {
    editorRef.current = editor;
    registerOpener(editor, (path, position) => {
      if (path === fileNameRef.current) {
        showPosition(position);
        return true;
      }
      if (!onOpenFileRef.current) return false;
      pendingRef.current = { path, position };
      onOpenFileRef.current(path);
      return true;
    });
    const navigate = (direction: 'next' | 'previous') => () => onNavigateRef.current?.(direction);
    editor.addAction({
      id: 'keepwell.next-finding',
      label: 'Next finding',
      keybindings: [monaco.KeyCode.F8],
      contextMenuGroupId: 'navigation',
      contextMenuOrder: 10,
      run: navigate('next'),
    });
    editor.addAction({
      id: 'keepwell.previous-finding',
      label: 'Previous finding',
      keybindings: [monaco.KeyMod.Shift | monaco.KeyCode.F8],
      contextMenuGroupId: 'navigation',
      contextMenuOrder: 11,
      run: navigate('previous'),
    });
    decorationsRef.current = editor.createDecorationsCollection();
    // A collection empties when the editor switches models (another file of the set).
    editor.onDidChangeModel(() => applyDecorations());
    editor.onMouseDown((e) => {
      if (e.target.type !== monaco.editor.MouseTargetType.GUTTER_GLYPH_MARGIN || !e.target.position) return;
      const line = e.target.position.lineNumber;
      const mark = marksRef.current.find((m) => m.line === line);
      if (mark) onMarkClickRef.current?.(mark);
    });
    applyDecorations();
    // A reveal made before the editor has its final size, or a smooth scroll cut short by a
    // re-layout, can leave the line out of view: a layout change soon after reveals it again.
    editor.onDidLayoutChange(() => {
      if (Date.now() - revealedAtRef.current < 3000) keepLineInView(editor);
    });
    if (revealLineRef.current) revealFindingLine(false);
  };

  function keepLineInView(editor: monaco.editor.IStandaloneCodeEditor) {
    const line = revealLineRef.current;
    if (!line || editorRef.current !== editor) return;
    const inView = editor.getVisibleRanges().some((r) => r.startLineNumber <= line && line <= r.endLineNumber);
    if (!inView) editor.revealLineInCenter(line, monaco.editor.ScrollType.Immediate);
  }

  function revealFindingLine(smooth: boolean) {
    const editor = editorRef.current;
    const line = revealLineRef.current;
    if (!editor || !line) return;
    editor.revealLineInCenter(line, smooth ? monaco.editor.ScrollType.Smooth : monaco.editor.ScrollType.Immediate);
    revealedAtRef.current = Date.now();
    window.clearTimeout(revealCheckRef.current);
    revealCheckRef.current = window.setTimeout(() => keepLineInView(editor), 500);
  }

  useEffect(() => () => window.clearTimeout(revealCheckRef.current), []);

  function applyDecorations() {
    const editor = editorRef.current;
    const lineCount = editor?.getModel()?.getLineCount() ?? 1;
    decorationsRef.current?.set(toDecorations(highlightsRef.current, marksRef.current, lineCount));
  }

  useEffect(applyDecorations, [highlights, marks, value, fileName]);

  // A finding's line is revealed whenever it or the file changes; a pending definition (just
  // switched to its file) comes after and wins.
  useEffect(() => {
    revealFindingLine(true);
  }, [revealLine, fileName]);

  useEffect(() => {
    const pending = pendingRef.current;
    if (!pending || pending.path !== fileName) return;
    pendingRef.current = null;
    showPosition(pending.position);
  }, [fileName]);

  return (
    <div className={className} style={{ height }}>
      <Editor
        value={value}
        path={modelPath(fileName, workspaceId)}
        language={SPICE_LANGUAGE_ID}
        theme={NETLIST_THEME}
        onMount={handleMount}
        onChange={(v) => onChange?.(v ?? '')}
        loading={<p className="p-4 text-sm text-ink-500">Opening the netlist…</p>}
        options={{
          readOnly,
          domReadOnly: readOnly,
          readOnlyMessage: { value: 'Netlists are shown as uploaded; change them in your design environment and submit a new run.' },
          ariaLabel: ariaLabel ?? `Netlist ${fileName}`,
          fontFamily: '"IBM Plex Mono", ui-monospace, monospace',
          fontSize: 13,
          lineHeight: 20,
          glyphMargin: true,
          lineNumbersMinChars: 5,
          folding: true,
          minimap: { enabled: true, renderCharacters: false, scale: 1 },
          scrollBeyondLastLine: false,
          renderLineHighlight: 'line',
          wordWrap: 'off',
          automaticLayout: true,
          smoothScrolling: true,
          contextmenu: true,
          fixedOverflowWidgets: true,
          padding: { top: 8, bottom: 8 },
          unicodeHighlight: { ambiguousCharacters: true, invisibleCharacters: true, nonBasicASCII: false, includeComments: false, includeStrings: true },
        }}
      />
    </div>
  );
}
