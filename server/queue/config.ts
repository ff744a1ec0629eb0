// Settings of the run queue and its workers, read from the environment beside the
// server's own (server/config.ts). Every entry names its variable and default.

import os from 'node:os';
import { z } from 'zod';

export interface QueueSettings {
  /** KEEPWELL_WORKER_CONCURRENCY (number of CPU cores, at least 1): jobs one worker process runs at once, each on its own thread. */
  concurrency: number;
  /** KEEPWELL_WORKER_NAME (host name and process id): stored with every job execution. */
  workerName: string;
  /**
   * KEEPWELL_SPLIT_MIN_CELLS (400): a design with at least this many distinct cells to analyse
   * (cells × port contexts are what the engine costs, not flattened devices) is split into child jobs.
   */
  splitMinCells: number;
  /** KEEPWELL_CELLS_PER_PART (200): cells per child job of a split run. */
  cellsPerPart: number;
  /** KEEPWELL_RUN_ATTEMPTS (4): executions of a job before a crash fails its run. Bad input is never retried. */
  attempts: number;
  /** KEEPWELL_RUN_BACKOFF_MS (5000): first retry delay; each further retry waits twice as long. */
  backoffMs: number;
  /** KEEPWELL_JOB_LOCK_MS (30000): a job whose worker stops renewing its lock this long is taken over by another worker. */
  lockMs: number;
  /** KEEPWELL_STALLED_CHECK_MS (15000): how often a worker looks for jobs whose worker died. */
  stalledCheckMs: number;
  /** KEEPWELL_RECONCILE_SECONDS (60): how often a worker re-enqueues runs PostgreSQL holds as queued or running that the queue lost. */
  reconcileSeconds: number;
  /** KEEPWELL_RECONCILE_GRACE_SECONDS (5): a run must be untouched this long before the reconciler acts on it (its submitter may be enqueueing it, a plan adding its flow). */
  reconcileGraceSeconds: number;
  /** KEEPWELL_PROGRESS_MS (750): least time between two progress writes of a job. */
  progressMs: number;
}

const int = (fallback: number, min = 0, max = Number.MAX_SAFE_INTEGER) =>
  z.coerce.number().int().min(min).max(max).optional().transform((v) => v ?? fallback);

export function loadQueueSettings(env: NodeJS.ProcessEnv = process.env): QueueSettings {
  const cores = Math.max(1, os.availableParallelism?.() ?? os.cpus().length);
  const schema = z.object({
    KEEPWELL_WORKER_CONCURRENCY: int(cores, 1, 256),
    KEEPWELL_WORKER_NAME: z.string().min(1).max(200).default(`${os.hostname()}:${process.pid}`),
    KEEPWELL_SPLIT_MIN_CELLS: int(400, 2),
    KEEPWELL_CELLS_PER_PART: int(200, 1),
    KEEPWELL_RUN_ATTEMPTS: int(4, 1, 50),
    KEEPWELL_RUN_BACKOFF_MS: int(5000, 0),
    KEEPWELL_JOB_LOCK_MS: int(30_000, 1000),
    KEEPWELL_STALLED_CHECK_MS: int(15_000, 500),
    KEEPWELL_RECONCILE_SECONDS: z.coerce.number().min(0.2).optional().transform((v) => v ?? 60),
    KEEPWELL_RECONCILE_GRACE_SECONDS: z.coerce.number().min(0).optional().transform((v) => v ?? 5),
    KEEPWELL_PROGRESS_MS: int(750, 0),
  });
  const parsed = schema.safeParse(env);
  if (!parsed.success) {
    throw new Error('invalid queue configuration:\n' + parsed.error.issues.map((i) => `  ${i.path.join('.')}: ${i.message}`).join('\n'));
  }
  const e = parsed.data;
  return {
    concurrency: e.KEEPWELL_WORKER_CONCURRENCY,
    workerName: e.KEEPWELL_WORKER_NAME,
    splitMinCells: e.KEEPWELL_SPLIT_MIN_CELLS,
    cellsPerPart: e.KEEPWELL_CELLS_PER_PART,
    attempts: e.KEEPWELL_RUN_ATTEMPTS,
    backoffMs: e.KEEPWELL_RUN_BACKOFF_MS,
    lockMs: e.KEEPWELL_JOB_LOCK_MS,
    stalledCheckMs: e.KEEPWELL_STALLED_CHECK_MS,
    reconcileSeconds: e.KEEPWELL_RECONCILE_SECONDS,
    reconcileGraceSeconds: e.KEEPWELL_RECONCILE_GRACE_SECONDS,
    progressMs: e.KEEPWELL_PROGRESS_MS,
  };
}
