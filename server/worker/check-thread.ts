// A check thread: decodes the files, reads the design, and checks it (whole, or the
// cells of one part) with the deck. Pure computation; progress goes to the main
// thread as messages. Started by threads.ts; one request at a time.

import { parentPort } from 'node:worker_threads';
import { instanceCounts, readDesign, topologicalOrder, type Design } from '../../grammar/index';
import { checkDesign } from '../../rules/engine';
import type { RunDiagnostic } from '../../shared/api/runs';
import { decodeNetlistText } from '../services/uploads-text';
import type { CheckOutcome, CheckRequest, ThreadMessage } from './check-protocol';

const port = parentPort;
if (!port) throw new Error('check-thread.ts runs as a worker thread');
const post = (message: ThreadMessage) => port.postMessage(message);

/** Cells the engine analyses, parents first: every cell that occurs under the roots. */
function analysedOrder(design: Design, counts: Map<string, number>): string[] {
  return topologicalOrder(design).filter((k) => (counts.get(k) ?? 0) > 0);
}

function designCounts(design: Design, counts: Map<string, number>): { devices: number; instances: number } {
  let devices = 0;
  let instances = 0;
  for (const [key, n] of counts) {
    const cell = design.cells.get(key);
    if (!cell) continue;
    devices += n * (cell.mosfets.length + cell.others.length);
    instances += n * cell.instances.length;
  }
  return { devices, instances };
}

function countsByName(design: Design, counts: Map<string, number>, keys: Iterable<string>): Record<string, number> {
  const out: Record<string, number> = {};
  for (const key of keys) {
    const cell = design.cells.get(key);
    if (cell) out[cell.name] = (out[cell.name] ?? 0) + (counts.get(key) ?? 0);
  }
  return out;
}

function handle(request: CheckRequest): CheckOutcome {
  const texts = new Map<string, string>();
  const diagnostics: RunDiagnostic[] = [];
  for (const f of request.files) {
    const decoded = decodeNetlistText(f.path, f.content);
    texts.set(f.path, decoded.text);
    if (decoded.diagnostic) diagnostics.push(decoded.diagnostic);
  }
  post({ type: 'stage', stage: 'elaborating' });
  const { deck } = request;
  const design = readDesign(texts, {
    ...(request.top ? { top: request.top } : {}),
    defaultScale: deck.scale,
    deviceMap: deck.deviceMap,
    supplies: deck.supplies,
  });
  diagnostics.push(...design.diagnostics);
  const parseErrors = design.diagnostics.filter((d) => d.severity === 'error').length;
  if (parseErrors > 0) return { kind: 'invalid', diagnostics };

  const counts = instanceCounts(design);
  const order = analysedOrder(design, counts);
  if (request.kind === 'plan' && order.length >= request.splitMinCells) {
    const parts: string[][] = [];
    for (let i = 0; i < order.length; i += request.cellsPerPart) parts.push(order.slice(i, i + request.cellsPerPart));
    return {
      kind: 'split',
      parts,
      summary: { cells: order.length, ...designCounts(design, counts), parseErrors: 0, errors: 0, warnings: 0, infos: 0 },
      diagnostics,
    };
  }

  const cells = request.kind === 'part' ? request.cells : undefined;
  let lastPost = 0;
  const result = checkDesign(design, deck, {
    ...(cells ? { cells } : {}),
    onProgress: ({ done, total }) => {
      const now = Date.now();
      if (now - lastPost < 100 && done < total) return;
      lastPost = now;
      post({ type: 'stage', stage: 'checking', done, total });
    },
  });
  return {
    kind: 'checked',
    findings: result.findings,
    summary: { ...result.summary, parseErrors: 0 },
    cellCounts: countsByName(design, counts, cells ?? order),
    diagnostics,
  };
}

port.on('message', (request: CheckRequest) => {
  try {
    post({ type: 'done', outcome: handle(request) });
  } catch (err) {
    post({ type: 'error', message: err instanceof Error ? err.message : String(err), stack: err instanceof Error ? err.stack : undefined });
  }
});
