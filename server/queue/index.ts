// The run queue: its name, key prefix, job names and deterministic job ids, the
// connections BullMQ uses, and enqueueing. PostgreSQL holds the truth about a run;
// a job only says "work on run X". Job ids derive from the run id, so adding a job
// twice (a submitter and the reconciler racing) never makes two.
//
// BullMQ always talks to the real Redis: its maintainers state that in-memory Redis
// fakes cannot run its Lua scripts.

import { FlowProducer, Queue, type JobsOptions } from 'bullmq';
import { Redis } from 'ioredis';
import type { Config } from '../config';
import type { AppContext } from '../context';
import type { QueueSettings } from './config';

export const RUN_QUEUE = 'runs';

/** `run`: read, then check whole or split; `part`: check one group of cells of a split run; `merge`: write a split run's findings. */
export type RunJobName = 'run' | 'part' | 'merge';

export interface RunJobData {
  runId: string;
}
export interface PartJobData {
  runId: string;
  part: number;
  /** Cell keys (grammar/design.ts `Cell.key`) this part checks. */
  cells: string[];
}
export type MergeJobData = RunJobData;

/** BullMQ refuses ':' in custom ids; a run id is a uuid, so these never collide. */
export const jobIds = {
  run: (runId: string) => runId,
  merge: (runId: string) => `${runId}.merge`,
  part: (runId: string, part: number) => `${runId}.part-${part}`,
};

/** Every queue key lives under the app's Redis prefix (tests give each environment its own). */
export function queuePrefix(config: Pick<Config, 'redisPrefix'>): string {
  return `${config.redisPrefix}bull`;
}

/** Options of every job: retries with exponential backoff for crashes; finished jobs kept a while for inspection, then dropped. */
export function jobOptions(settings: Pick<QueueSettings, 'attempts' | 'backoffMs'>): JobsOptions {
  return {
    attempts: settings.attempts,
    backoff: { type: 'exponential', delay: settings.backoffMs },
    removeOnComplete: { age: 7 * 24 * 3600, count: 10_000 },
    removeOnFail: { age: 30 * 24 * 3600, count: 10_000 },
  };
}

/** A connection for workers and flow producers: BullMQ requires blocking commands to retry forever. */
export function createWorkerRedis(config: Pick<Config, 'redisUrl'>): Redis {
  const redis = new Redis(config.redisUrl, { maxRetriesPerRequest: null, connectTimeout: 5000 });
  redis.on('error', () => {
    // ioredis reconnects by itself; the worker logs outages through BullMQ's own error events.
  });
  return redis;
}

const queues = new WeakMap<AppContext, Queue>();

/** The run queue over the context's Redis connection (which fails fast when Redis is away). */
export function runQueue(ctx: Pick<AppContext, 'config' | 'redis'> & object): Queue {
  let queue = queues.get(ctx as AppContext);
  if (!queue) {
    queue = new Queue(RUN_QUEUE, { connection: ctx.redis, prefix: queuePrefix(ctx.config) });
    queue.on('error', () => {
      // Redis outages surface as rejected commands; the reconciler repairs what they cost.
    });
    queues.set(ctx as AppContext, queue);
  }
  return queue;
}

export function createFlowProducer(config: Pick<Config, 'redisPrefix'>, connection: Redis): FlowProducer {
  const flow = new FlowProducer({ connection, prefix: queuePrefix(config) });
  flow.on('error', () => {});
  return flow;
}

export function withTimeout<T>(promise: Promise<T>, ms: number, what: string): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  return Promise.race([
    promise.finally(() => clearTimeout(timer)),
    new Promise<never>((_, reject) => {
      timer = setTimeout(() => reject(new Error(`${what}: no answer within ${ms} ms`)), ms);
    }),
  ]);
}

/**
 * Put a run's first job on the queue. Never throws: when Redis is away the run stays
 * queued in PostgreSQL and a worker's reconciler enqueues it once Redis answers.
 */
export async function enqueueRun(queue: Queue, settings: Pick<QueueSettings, 'attempts' | 'backoffMs'>, runId: string): Promise<boolean> {
  try {
    await withTimeout(queue.add('run', { runId } satisfies RunJobData, { ...jobOptions(settings), jobId: jobIds.run(runId) }), 5000, 'enqueue');
    return true;
  } catch (err) {
    console.error(`queue: run ${runId} stays queued for the reconciler: ${err instanceof Error ? err.message : String(err)}`);
    return false;
  }
}

/** Remove what is waiting for a run (its job, or a split run's merge job and parts). Active jobs stay: their worker sees the run's state. */
export async function removeRunJobs(queue: Queue, runId: string): Promise<void> {
  for (const id of [jobIds.merge(runId), jobIds.run(runId)]) {
    try {
      const job = await withTimeout(queue.getJob(id), 3000, 'getJob');
      if (!job) continue;
      const state = await job.getState();
      if (state === 'active') continue;
      await job.remove({ removeChildren: true });
    } catch {
      // A locked (active) job or an unreachable Redis: the worker and the reconciler cope with a run that is no longer queued.
    }
  }
}
