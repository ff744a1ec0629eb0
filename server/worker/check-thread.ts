// A check thread: decodes the files, reads the design, and checks it (whole, or the
// cells of one part) with the deck. Pure computation; progress goes to the main
// thread as messages. Started by threads.ts; one request at a time.

import { parentPort } from 'node:worker_threads';
import { flattenedTotals, instanceCounts, occurringOrder, readDesign, topologicalOrder, type Design } from '../../grammar/index';
import { checkDesign } from '../../rules/engine';
import type { RunDiagnostic } from '../../shared/api/runs';
import { decodeNetlistText } from '../services/uploads-text';
import type { CheckOutcome, CheckRequest, ThreadMessage } from './check-protocol';

const port = parentPort;
if (!port) throw new Error('check-thread.ts runs as a worker thread');
const post = (message: ThreadMessage) => port.postMessage(message);

function countsByName(design: Design, counts: Map<string, number>, keys: Iterable<string>): Record<string, number> {
  const out: Record<string, number> = {};
  for (const key of keys) {
    const cell = design.cells.get(key);
    if (cell) out[cell.name] = (out[cell.name] ?? 0) + (counts.get(key) ?? 0);
  }
  return out;
}

/** Levels of hierarchy the analyses descend (they go level by level); real designs stay within a few dozen (a rule of thumb of the trade). */
const MAX_HIERARCHY_DEPTH = 256;

/**
 * Why a design that read without errors cannot be checked, or null. Nothing to check (an empty
 * file, only comments) must not look clean; a hierarchy deeper than MAX_HIERARCHY_DEPTH costs the
 * analyses far more than its size (measured: 256 levels under a second, 5 000 levels 49 s, and on a
 * main thread 2 000 levels exhaust the stack); and a cell occurring more than 2^53
 * times (the largest integer a double holds exactly, IEEE 754 binary64) could not be counted in the
 * run's summary and findings.
 */
function unfitDesign(design: Design, firstFile: string): RunDiagnostic | null {
  const error = (code: string, loc: { file: string; line: number; column: number }, message: string, hint: string): RunDiagnostic => ({
    severity: 'error', code, message, hint, file: loc.file, line: loc.line, column: loc.column,
  });
  if (![...design.cells.values()].some((c) => c.mosfets.length + c.others.length > 0)) {
    return error('no-devices', { file: firstFile, line: 1, column: 1 }, 'the netlist holds no device to check', 'upload the netlist with its transistor-level subcircuits');
  }
  const order = topologicalOrder(design);
  // Levels from each cell down to its deepest leaf (children first), and the instance that leads there.
  const depth = new Map<string, number>();
  const deepest = new Map<string, number>();
  for (let i = order.length - 1; i >= 0; i--) {
    const cell = design.cells.get(order[i])!;
    let below = 0;
    cell.instances.forEach((inst, k) => {
      const d = depth.get(inst.cell) ?? 0;
      if (d > below) {
        below = d;
        deepest.set(cell.key, k);
      }
    });
    depth.set(cell.key, below + 1);
  }
  for (const root of design.roots) {
    const levels = depth.get(root) ?? 0;
    if (levels <= MAX_HIERARCHY_DEPTH) continue;
    let cell = design.cells.get(root)!;
    for (let level = 1; level < MAX_HIERARCHY_DEPTH; level++) cell = design.cells.get(cell.instances[deepest.get(cell.key)!].cell)!;
    const inst = cell.instances[deepest.get(cell.key)!];
    return error(
      'hierarchy-too-deep',
      inst.loc,
      `the hierarchy under ${design.cells.get(root)!.name} is ${levels} levels deep; ${inst.name} in ${cell.name} goes past the ${MAX_HIERARCHY_DEPTH} levels Keepwell checks`,
      'flatten some levels, or check the blocks one at a time',
    );
  }
  const counts = instanceCounts(design);
  for (const key of order) {
    const cell = design.cells.get(key)!;
    const inst = (counts.get(key) ?? 0) <= Number.MAX_SAFE_INTEGER ? cell.instances.find((x) => (counts.get(x.cell) ?? 0) > Number.MAX_SAFE_INTEGER) : undefined;
    if (!inst) continue;
    return error(
      'hierarchy-too-large',
      inst.loc,
      `${inst.name} in ${cell.name} makes ${design.cells.get(inst.cell)!.name} occur ${(counts.get(inst.cell) ?? 0).toPrecision(3)} times in the flattened design, more than can be counted exactly (2^53)`,
      'check a smaller part of the hierarchy',
    );
  }
  return null;
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
  const unfit = unfitDesign(design, request.files[0]?.path ?? '');
  if (unfit) return { kind: 'invalid', diagnostics: [...diagnostics, unfit] };

  const counts = instanceCounts(design);
  const order = occurringOrder(design, counts);
  if (request.kind === 'plan' && order.length >= request.splitMinCells) {
    const parts: string[][] = [];
    for (let i = 0; i < order.length; i += request.cellsPerPart) parts.push(order.slice(i, i + request.cellsPerPart));
    return {
      kind: 'split',
      parts,
      summary: { cells: order.length, ...flattenedTotals(design, counts), parseErrors: 0, errors: 0, warnings: 0, infos: 0 },
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
