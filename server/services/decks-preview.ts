// "What would change": check the team's newest netlist (or a chosen one) with a
// draft and with the version it started from, and list the findings the draft adds,
// removes or re-grades, matched by fingerprint. The checker runs in a worker thread
// with a time and memory limit; a preview past its limit is stopped and reported.

import { Worker } from 'node:worker_threads';
import type { DeckPreview } from '../../shared/api/decks';
import type { Deck } from '../../shared/deck';
import type { Finding } from '../../shared/findings';
import { defaultDeck } from '../../rules/default-deck';
import type { AppContext } from '../context';
import { Block, Netlist, RuleDeckVersion } from '../db/models';
import { HttpError, notFound } from '../errors';
import { canonicalDeck, getVersion } from './decks';
import type { PreviewJob, PreviewOutcome } from './decks-preview-worker';
import { loadNetlistBytes } from './uploads';
import { decodeNetlistText } from './uploads-text';

export interface PreviewLimits {
  /** Wall-clock limit of the check, both decks together (default 60 s). */
  timeMs?: number;
}

/** Each of the added/removed/changed lists is cut at this length; the counts stay complete. */
export const PREVIEW_LIST_LIMIT = 200;

const DEFAULT_TIME_MS = 60_000;
/** Heap limit of the preview thread: a preview past it fails alone, the server carries on. */
const HEAP_MB = 2048;
/** A warm thread is kept this long after its last preview (loading the checker costs seconds). */
const IDLE_MS = 10 * 60_000;

type Reply = { id: number; ok: true; outcomes: PreviewOutcome[] } | { id: number; ok: false; error: string };

function startWorker(): Worker {
  const here = import.meta.url;
  const workerData = { kind: 'keepwell-deck-preview-thread' };
  const resourceLimits = { maxOldGenerationSizeMb: HEAP_MB };
  if (!here.endsWith('.ts')) return new Worker(new URL('./decks-preview-worker.js', here), { workerData, resourceLimits });
  const entry = new URL('./decks-preview-worker.ts', here).href;
  return new Worker(new URL('./decks-preview-boot.mjs', here), { workerData: { ...workerData, entry }, resourceLimits });
}

class ThreadEnded extends Error {
  constructor(readonly code: number) {
    super(`preview thread stopped with exit code ${code} before answering`);
  }
}

/**
 * One preview thread per process, kept warm between previews and given one job at a
 * time. A job past its time limit terminates the thread (the next job starts a new one),
 * so a runaway check never outlives its request.
 */
class PreviewThread {
  private worker: Worker | null = null;
  private queue: Promise<unknown> = Promise.resolve();
  private nextId = 1;
  private idle: NodeJS.Timeout | null = null;

  run(files: [string, string][], decks: Deck[], timeMs: number): Promise<PreviewOutcome[]> {
    // A thread that ended cleanly without answering (it never took the job) gets one fresh try.
    const attempt = () => this.runNow(files, decks, timeMs).catch((err: unknown) => (err instanceof ThreadEnded && err.code === 0 ? this.runNow(files, decks, timeMs) : Promise.reject(err)));
    const result = this.queue.then(attempt);
    this.queue = result.catch(() => undefined);
    return result;
  }

  private runNow(files: [string, string][], decks: Deck[], timeMs: number): Promise<PreviewOutcome[]> {
    if (this.idle) clearTimeout(this.idle);
    const worker = (this.worker ??= startWorker());
    worker.ref();
    const id = this.nextId++;
    return new Promise<PreviewOutcome[]>((resolve, reject) => {
      const done = (fn: () => void, keep: boolean) => {
        clearTimeout(timer);
        worker.off('message', onMessage);
        worker.off('error', onError);
        worker.off('exit', onExit);
        if (keep) this.park(worker);
        else this.discard(worker);
        fn();
      };
      const onMessage = (reply: Reply) => {
        if (reply.id !== id) return;
        done(() => (reply.ok ? resolve(reply.outcomes) : reject(new Error(`preview check failed: ${reply.error}`))), true);
      };
      const onError = (err: Error) => {
        const outOfMemory = (err as { code?: string }).code === 'ERR_WORKER_OUT_OF_MEMORY';
        done(() => reject(outOfMemory ? new HttpError(507, 'preview-too-large', 'The preview ran out of memory. Submit a run to check this netlist in the queue.') : err), false);
      };
      const onExit = (code: number) => done(() => reject(new ThreadEnded(code)), false);
      const timer = setTimeout(
        () =>
          done(
            () => reject(new HttpError(504, 'preview-timeout', `The preview took longer than ${Math.round(timeMs / 1000)} s and was stopped. Submit a run to check this netlist in the queue.`)),
            false,
          ),
        timeMs,
      );
      worker.on('message', onMessage);
      worker.once('error', onError);
      worker.once('exit', onExit);
      const job: PreviewJob = { id, files, decks };
      worker.postMessage(job);
    });
  }

  /** Keep the thread for the next preview without holding the process open. */
  private park(worker: Worker) {
    worker.unref();
    this.idle = setTimeout(() => this.discard(worker), IDLE_MS);
    this.idle.unref();
  }

  private discard(worker: Worker) {
    if (this.worker === worker) this.worker = null;
    void worker.terminate();
  }
}

const thread = new PreviewThread();

export function runPreviewJob(files: [string, string][], decks: Deck[], limits: PreviewLimits = {}): Promise<PreviewOutcome[]> {
  return thread.run(files, decks, limits.timeMs ?? DEFAULT_TIME_MS);
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
  ctx: Pick<AppContext, 'sequelize'>,
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
  // Read and decoded as a run reads them (invalid UTF-8 becomes U+FFFD).
  const files: [string, string][] = (await loadNetlistBytes(ctx, netlist.id)).map((f) => [f.path, decodeNetlistText(f.path, f.content).text]);

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
