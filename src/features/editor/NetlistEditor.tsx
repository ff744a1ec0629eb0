import Editor, { type OnMount } from '@monaco-editor/react';
import { useEffect, useRef } from 'react';
import { monaco } from './monaco-setup';
import { SPICE_LANGUAGE_ID } from './spice-language';
import { NETLIST_THEME } from './theme';
import { tone as tones } from '../../design/palette';
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
}: NetlistEditorProps) {
  const editorRef = useRef<monaco.editor.IStandaloneCodeEditor | null>(null);
  const decorationsRef = useRef<monaco.editor.IEditorDecorationsCollection | null>(null);
  const marksRef = useRef(marks);
  const onMarkClickRef = useRef(onMarkClick);
  marksRef.current = marks;
  onMarkClickRef.current = onMarkClick;

  const handleMount: OnMount = (editor) => {
    editorRef.current = editor;
    decorationsRef.current = editor.createDecorationsCollection();
    editor.onMouseDown((e) => {
      if (e.target.type !== monaco.editor.MouseTargetType.GUTTER_GLYPH_MARGIN || !e.target.position) return;
      const line = e.target.position.lineNumber;
      const mark = marksRef.current.find((m) => m.line === line);
      if (mark) onMarkClickRef.current?.(mark);
    });
    applyDecorations();
    if (revealLine) editor.revealLineInCenter(revealLine);
  };

  function applyDecorations() {
    const editor = editorRef.current;
    const lineCount = editor?.getModel()?.getLineCount() ?? 1;
    decorationsRef.current?.set(toDecorations(highlights, marks, lineCount));
  }

  useEffect(applyDecorations, [highlights, marks, value]);

  useEffect(() => {
    if (revealLine && editorRef.current) editorRef.current.revealLineInCenter(revealLine, monaco.editor.ScrollType.Smooth);
  }, [revealLine]);

  return (
    <div className={className} style={{ height }}>
      <Editor
        value={value}
        path={fileName}
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
