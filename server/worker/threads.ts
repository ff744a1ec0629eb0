// A pool of check threads, one per job a worker runs at once. A thread that is
// cancelled (its run was cancelled) or dies is terminated and replaced on demand.
//
// Threads load TypeScript through tsx's scoped loader: module hooks registered by
// `tsx` on the main thread do not reach worker threads on Node 20.

import { Worker } from 'node:worker_threads';
import type { CheckOutcome, CheckRequest, ThreadMessage, ThreadStage } from './check-protocol';

const threadEntry = new URL('./check-thread.ts', import.meta.url).href;
const tsxApi = import.meta.resolve('tsx/esm/api');
/**
 * Semi-space of the V8 young generation for checks. A check of a big flat netlist makes millions of objects, most of them
 * kept to the end; with V8's default young generation of a few megabytes it spends about a quarter of its time in
 * scavenges. Measured on the benchmark's flat million (2 cores): 16 MB 9.6–9.9 s, 32 MB 9.6 s, 64 MB 9.1 s with
 * 80 MB more peak memory (1.76 GB), 128 MB 9.2–9.5 s and 1.88 GB. The command line (`npm run keepwell`) runs with the
 * same `--max-semi-space-size`, and so do the netlist benchmark's children.
 */
export const CHECK_SEMI_SPACE_MB = 64;

/** Young generation of a check thread: two semi-spaces and V8's new large-object space of the same size. */
export const CHECK_THREAD_YOUNG_GENERATION_MB = 3 * CHECK_SEMI_SPACE_MB;

const bootstrap = `import(${JSON.stringify(tsxApi)}).then((tsx) => tsx.tsImport(${JSON.stringify(threadEntry)}, ${JSON.stringify(import.meta.url)}))`;

export class CancelledError extends Error {
  constructor() {
    super('cancelled');
    this.name = 'CancelledError';
  }
}

export class CheckThreads {
  private readonly idle: Worker[] = [];
  private readonly all = new Set<Worker>();
  private closed = false;

  constructor(private readonly size: number) {}

  private spawn(): Worker {
    const worker = new Worker(bootstrap, { eval: true, resourceLimits: { maxYoungGenerationSizeMb: CHECK_THREAD_YOUNG_GENERATION_MB } });
    worker.unref();
    this.all.add(worker);
    worker.once('exit', () => {
      this.all.delete(worker);
      const i = this.idle.indexOf(worker);
      if (i >= 0) this.idle.splice(i, 1);
    });
    return worker;
  }

  /** Run one request on a thread. `signal` aborts it (the thread is terminated); `onStage` receives its progress. */
  run(request: CheckRequest, onStage: (stage: ThreadStage) => void, signal?: AbortSignal): Promise<CheckOutcome> {
    if (this.closed) return Promise.reject(new Error('the check threads are closed'));
    if (signal?.aborted) return Promise.reject(new CancelledError());
    const worker = this.idle.pop() ?? this.spawn();
    return new Promise<CheckOutcome>((resolve, reject) => {
      let settled = false;
      const finish = (keep: boolean) => {
        settled = true;
        worker.off('message', onMessage);
        worker.off('error', onError);
        worker.off('exit', onExit);
        signal?.removeEventListener('abort', onAbort);
        if (keep && !this.closed && this.idle.length < this.size) this.idle.push(worker);
        else void worker.terminate();
      };
      const onMessage = (message: ThreadMessage) => {
        if (settled) return;
        if (message.type === 'stage') onStage(message);
        else if (message.type === 'done') {
          finish(true);
          resolve(message.outcome);
        } else {
          finish(true);
          const err = new Error(message.message);
          if (message.stack) err.stack = message.stack;
          reject(err);
        }
      };
      const onError = (err: Error) => {
        if (settled) return;
        finish(false);
        reject(err);
      };
      const onExit = (code: number) => {
        if (settled) return;
        finish(false);
        reject(new Error(`the check thread exited (code ${code})`));
      };
      const onAbort = () => {
        if (settled) return;
        finish(false);
        reject(new CancelledError());
      };
      worker.on('message', onMessage);
      worker.on('error', onError);
      worker.on('exit', onExit);
      signal?.addEventListener('abort', onAbort, { once: true });
      worker.postMessage(request);
    });
  }

  async close(): Promise<void> {
    this.closed = true;
    await Promise.all([...this.all].map((w) => w.terminate()));
  }
}
