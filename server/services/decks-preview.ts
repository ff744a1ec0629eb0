// "What would change": check the team's newest netlist (or a chosen one) with a
// draft and with the version it started from, and list the findings the draft adds,
// removes or re-grades, matched by fingerprint. The checker runs in a worker thread
// with a time and memory limit; a preview past its limit is stopped and reported.

import { Worker } from 'node:worker_threads';
import type { DeckPreview } from '../../shared/api/decks';
import type { Deck } from '../../shared/deck';
import type { Finding } from '../../shared/findings';
import { defaultDeck } from '../../rules/default-deck';
import { Block, Netlist, NetlistFile, RuleDeckVersion } from '../db/models';
import { HttpError, notFound } from '../errors';
import { canonicalDeck, getVersion } from './decks';
import type { PreviewJob, PreviewOutcome } from './decks-preview-worker';

export interface PreviewLimits {
  /** Wall-clock limit of the check, both decks together (default 60 s). */
  timeMs?: number;
  /** Heap limit of the worker thread (default 2 GiB). */
  heapMb?: number;
}

/** Each of the added/removed/changed lists is cut at this length; the counts stay complete. */
export const PREVIEW_LIST_LIMIT = 200;

const DEFAULT_TIME_MS = 60_000;
const DEFAULT_HEAP_MB = 2048;

function startWorker(job: PreviewJob, heapMb: number): Worker {
  const here = import.meta.url;
  const resourceLimits = { maxOldGenerationSizeMb: heapMb };
  if (!here.endsWith('.ts')) return new Worker(new URL('./decks-preview-worker.js', here), { workerData: job, resourceLimits });
  const entry = new URL('./decks-preview-worker.ts', here).href;
  return new Worker(new URL('./decks-preview-boot.mjs', here), { workerData: { ...job, entry }, resourceLimits });
}

export function runPreviewJob(files: [string, string][], decks: Deck[], limits: PreviewLimits = {}): Promise<PreviewOutcome[]> {
  const timeMs = limits.timeMs ?? DEFAULT_TIME_MS;
  return new Promise((resolve, reject) => {
    const worker = startWorker({ kind: 'keepwell-deck-preview', files, decks }, limits.heapMb ?? DEFAULT_HEAP_MB);
    let settled = false;
    const settle = (fn: () => void) => {
      if (settled) return;
      settled = true;
      clearTimeout(timer);
      fn();
      void worker.terminate();
    };
    const timer = setTimeout(
      () =>
        settle(() =>
          reject(new HttpError(504, 'preview-timeout', `The preview took longer than ${Math.round(timeMs / 1000)} s and was stopped. Submit a run to check this netlist in the queue.`)),
        ),
      timeMs,
    );
    worker.once('message', (outcomes: PreviewOutcome[]) => settle(() => resolve(outcomes)));
    worker.once('error', (err) => {
      const outOfMemory = (err as { code?: string }).code === 'ERR_WORKER_OUT_OF_MEMORY';
      settle(() => reject(outOfMemory ? new HttpError(507, 'preview-too-large', 'The preview ran out of memory. Submit a run to check this netlist in the queue.') : err));
    });
    worker.once('exit', (code) => settle(() => reject(new Error(`preview worker stopped with exit code ${code} before answering`))));
  });
}

/** Fingerprint → finding; `compareFindings` lists what `after` adds, removes and re-grades. */
export function compareFindings(before: Finding[], after: Finding[]) {
  const old = new Map(before.map((f) => [f.fingerprint, f]));
  const now = new Map(after.map((f) => [f.fingerprint, f]));
  const added = after.filter((f) => !old.has(f.fingerprint));
  const removed = before.filter((f) => !now.has(f.fingerprint));
  const changed = after
    .filter((f) => old.has(f.fingerprint) && old.get(f.fingerprint)!.severity !== f.severity)
    .map((f) => ({ before: old.get(f.fingerprint)!, after: f }));
  return { added, removed, changed };
}

async function netlistFor(teamId: string, netlistId?: string) {
  const netlist = await Netlist.findOne({
    where: netlistId ? { id: netlistId, teamId } : { teamId },
    include: [{ model: Block, as: 'block', attributes: ['id', 'name'] }],
    order: [['createdAt', 'DESC']],
  });
  if (!netlist) {
    if (netlistId) throw notFound('Netlist');
    throw new HttpError(409, 'no-netlist', 'Your team has not uploaded a netlist yet; the preview checks the newest upload.');
  }
  return netlist as Netlist & { block?: Block };
}

export async function previewVersion(
  teamId: string,
  deckId: string,
  versionId: string,
  input: { netlistId?: string },
  limits: PreviewLimits = {},
): Promise<DeckPreview> {
  const started = performance.now();
  const { version } = await getVersion(teamId, deckId, versionId);
  const parent = version.parentVersionId ? await RuleDeckVersion.findByPk(version.parentVersionId) : null;
  const baseDeck = parent ? canonicalDeck(parent.content) : defaultDeck();
  const netlist = await netlistFor(teamId, input.netlistId);
  const rows = await NetlistFile.unscoped().findAll({ where: { netlistId: netlist.id }, attributes: ['path', 'content'], order: [['path', 'ASC']] });
  const decoder = new TextDecoder('utf-8', { fatal: false });
  const files: [string, string][] = rows.map((r) => [r.path, decoder.decode(r.content)]);

  const [base, draft] = await runPreviewJob(files, [baseDeck, canonicalDeck(version.content)], limits);
  const { added, removed, changed } = compareFindings(base.findings, draft.findings);
  const cut = <T>(xs: T[]) => xs.slice(0, PREVIEW_LIST_LIMIT);
  return {
    netlist: {
      id: netlist.id,
      blockId: netlist.blockId,
      blockName: netlist.block?.name ?? '',
      createdAt: netlist.createdAt.toISOString(),
      files: files.length,
    },
    base: parent
      ? { versionId: parent.id, version: parent.version, label: `version ${parent.version}` }
      : { versionId: null, version: null, label: 'the built-in deck' },
    draft: { versionId: version.id, version: version.version, label: `${version.state === 'draft' ? 'draft' : 'version'} ${version.version}` },
    added: cut(added),
    removed: cut(removed),
    changed: cut(changed),
    counts: { base: base.findings.length, draft: draft.findings.length, added: added.length, removed: removed.length, changed: changed.length },
    listLimit: PREVIEW_LIST_LIMIT,
    parseErrors: draft.parseErrors,
    elapsedMs: Math.round(performance.now() - started),
  };
}
