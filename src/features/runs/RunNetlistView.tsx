// The run's netlist in the editor: the selected finding's line highlighted and brought into
// view, a gutter mark for every finding in the file (hover for its message, click to open it),
// next/previous finding, and go-to-definition from an instance to its `.subckt` in any file
// of the run (switching files when the definition is in another one).

import { useQueries, useQuery } from '@tanstack/react-query';
import { useEffect, useMemo, useState } from 'react';
import type { RunDetail, StoredFinding } from '../../../shared/api/runs';
import { Button } from '../../components/Button';
import { Loading } from '../../components/LoadState';
import { ErrorNotice, Notice } from '../../components/Notice';
import { NetlistEditor, type GutterMark, type HighlightRange, type NetlistFileText } from '../editor';
import { fileFindingsQuery } from '../findings/queries';
import { runFileQuery } from './queries';

/** Beyond these, only the shown file is loaded and go-to-definition stays within it. */
const WORKSPACE_MAX_FILES = 200;
const WORKSPACE_MAX_BYTES = 24 * 1024 * 1024;

/** Lines of the named devices inside the cell's `.subckt` block, or at the top level when no file line defines the cell. */
export function deviceLines(text: string, cell: string, devices: readonly string[]): number[] {
  if (!devices.length) return [];
  const wanted = new Set(devices.map((d) => d.toLowerCase()));
  const lines = text.split(/\r\n|\r|\n/);
  const cellName = cell.toLowerCase();
  const subcktOf = (line: string) => /^\s*\.(?:subckt|macro)\s+(\S+)/i.exec(line)?.[1].toLowerCase() ?? null;
  const defined = lines.some((l) => subcktOf(l) === cellName);
  let block: string | null = null;
  const found: number[] = [];
  for (let i = 0; i < lines.length; i++) {
    const opened = subcktOf(lines[i]);
    if (opened) {
      block = opened;
      continue;
    }
    if (/^\s*\.(?:ends|eom)\b/i.test(lines[i])) {
      block = null;
      continue;
    }
    if (defined ? block !== cellName : block !== null) continue;
    const element = /^\s*([^\s*+.$;]\S*)/.exec(lines[i])?.[1];
    if (element && wanted.has(element.toLowerCase())) found.push(i + 1);
  }
  return found;
}

const TONE_ORDER: GutterMark['tone'][] = ['error', 'warning', 'info', 'waived'];

/** One gutter mark per line: the most severe open finding's tone, every finding's message on hover, a click opening the most severe. */
export function lineMarks(findings: readonly StoredFinding[]): GutterMark[] {
  const byLine = new Map<number, StoredFinding[]>();
  for (const f of findings) byLine.set(f.line, [...(byLine.get(f.line) ?? []), f]);
  const toneOf = (f: StoredFinding): GutterMark['tone'] => (f.status === 'waived' ? 'waived' : f.severity);
  return [...byLine].map(([line, list]) => {
    const sorted = list.slice().sort((a, b) => TONE_ORDER.indexOf(toneOf(a)) - TONE_ORDER.indexOf(toneOf(b)));
    return { line, tone: toneOf(sorted[0]), label: sorted.map((f) => `${f.ruleId}: ${f.message}`).join('\n\n'), id: String(sorted[0].id) };
  });
}

function lineCount(text: string) {
  const lines = text.split(/\r\n|\r|\n/).length;
  return /(\r\n|\r|\n)$/.test(text) ? lines - 1 : lines;
}

export function RunNetlistView({ run, selected, onSelect }: { run: RunDetail; selected: StoredFinding | null; onSelect: (finding: StoredFinding) => void }) {
  const paths = run.files.map((f) => f.path);
  const [current, setCurrent] = useState<string>(selected?.file ?? paths[0] ?? '');
  useEffect(() => {
    if (selected && paths.includes(selected.file)) setCurrent(selected.file);
  }, [selected?.id]);

  const totalBytes = run.files.reduce((sum, f) => sum + f.size, 0);
  const wholeSet = run.files.length <= WORKSPACE_MAX_FILES && totalBytes <= WORKSPACE_MAX_BYTES;
  const loaded = useQueries({ queries: (wholeSet ? paths : [current]).map((p) => runFileQuery(run.id, p)) });
  const currentFile = loaded.find((q) => q.data?.path === current)?.data;
  const currentQuery = loaded[(wholeSet ? paths : [current]).indexOf(current)];
  const allLoaded = loaded.every((q) => q.data);
  const files = useMemo<NetlistFileText[] | undefined>(
    () => (allLoaded ? loaded.map((q) => ({ path: q.data!.path, text: q.data!.text })) : undefined),
    // Made once every file has arrived (a run's files never change); per file when only the shown one is loaded.
    [allLoaded, wholeSet ? '' : current],
  );

  const marksQuery = useQuery({ ...fileFindingsQuery(run.id, current), enabled: Boolean(current) });
  const inFile = marksQuery.data?.items ?? [];
  const marks = useMemo(() => lineMarks(inFile), [inFile]);
  const highlights = useMemo<HighlightRange[]>(() => {
    if (!selected || selected.file !== current || !currentFile) return [];
    const tone: HighlightRange['tone'] = selected.status === 'waived' ? 'waived' : selected.severity;
    const others = deviceLines(currentFile.text, selected.cell, selected.devices).filter((l) => l !== selected.line);
    return [...others.map((l) => ({ startLine: l, endLine: l, tone })), { startLine: selected.line, endLine: selected.line, tone: 'focus' as const }];
  }, [selected, current, currentFile]);

  const index = selected ? inFile.findIndex((f) => f.id === selected.id) : -1;
  function step(direction: 'next' | 'previous') {
    if (!inFile.length) return;
    const target = index < 0 ? (direction === 'next' ? 0 : inFile.length - 1) : index + (direction === 'next' ? 1 : -1);
    if (target >= 0 && target < inFile.length) onSelect(inFile[target]);
  }

  if (!paths.length) return <Notice tone="info" title="No files">This run has no netlist files to show.</Notice>;

  return (
    <div className="overflow-hidden rounded-lg border border-ink-200 bg-white shadow-xs">
      <div className="flex flex-wrap items-center justify-between gap-3 border-b border-ink-200 bg-ink-50 px-3 py-2">
        <div className="flex items-center gap-2 text-sm">
          {paths.length > 1 ? (
            <>
              <label htmlFor="netlist-file" className="font-medium text-ink-700">
                File
              </label>
              <select id="netlist-file" className="h-8 rounded-md border border-ink-300 bg-white px-2 font-mono text-sm" value={current} onChange={(e) => setCurrent(e.target.value)}>
                {paths.map((p) => (
                  <option key={p} value={p}>
                    {p}
                  </option>
                ))}
              </select>
            </>
          ) : (
            <span className="font-mono text-ink-800">{current}</span>
          )}
          {currentFile && <span className="text-xs text-ink-500">{lineCount(currentFile.text)} lines</span>}
        </div>
        <div className="flex items-center gap-2 text-sm">
          <span className="tabular-nums text-ink-600" aria-live="polite">
            {marksQuery.isPending
              ? 'Finding marks…'
              : inFile.length === 0
                ? 'No findings in this file'
                : index >= 0
                  ? `Finding ${index + 1} of ${inFile.length} in this file`
                  : `${inFile.length} finding${inFile.length === 1 ? '' : 's'} in this file`}
          </span>
          <Button size="sm" onClick={() => step('previous')} disabled={!inFile.length || index === 0} title="Previous finding (Shift+F8 in the editor)">
            ↑ Previous
          </Button>
          <Button size="sm" onClick={() => step('next')} disabled={!inFile.length || index === inFile.length - 1} title="Next finding (F8 in the editor)">
            ↓ Next
          </Button>
        </div>
      </div>
      {currentQuery?.isError ? (
        <div className="p-4">
          <ErrorNotice error={currentQuery.error} title={`Could not load ${current}`} />
        </div>
      ) : !currentFile ? (
        <Loading label={`Loading ${current}…`} />
      ) : (
        <NetlistEditor
          value={currentFile.text}
          fileName={current}
          workspaceId={run.id}
          files={files}
          height="34rem"
          highlights={highlights}
          marks={marks}
          revealLine={selected && selected.file === current ? selected.line : undefined}
          onMarkClick={(mark) => {
            const finding = inFile.find((f) => String(f.id) === mark.id);
            if (finding) onSelect(finding);
          }}
          onOpenFile={(path) => setCurrent(path)}
          onNavigateFinding={step}
          ariaLabel={`Netlist ${current}, read-only`}
        />
      )}
      <p className="border-t border-ink-200 bg-ink-50 px-3 py-1.5 text-xs text-ink-600">
        Read-only. F12 or Ctrl+click on an instance’s subcircuit name goes to its <code>.subckt</code>
        {wholeSet ? ' in any file of the run' : ' (within this file: the set is too large to load whole)'}; F8 and Shift+F8 step through the findings.
        {marksQuery.data && !marksQuery.data.complete && ' Only the first 5000 findings of this file are marked.'}
      </p>
    </div>
  );
}
