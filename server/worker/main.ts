// The worker process (`npm run worker`): takes jobs of the run queue from Redis and
// writes results to PostgreSQL. Start as many as you like, on any machine that
// reaches the same Redis and PostgreSQL (REDIS_URL, DATABASE_URL): they share the
// work. Settings: server/config.ts and server/queue/config.ts.
//
//   tsx server/worker/main.ts               work until stopped (SIGINT/SIGTERM)
//   tsx server/worker/main.ts --until-idle  exit once no run is queued or running (the demo seed)

import { Worker, type Job } from 'bullmq';
import { QueryTypes } from 'sequelize';
import { getConfig } from '../config';
import { createContext } from '../context';
import { createFlowProducer, createWorkerRedis, queuePrefix, RUN_QUEUE, runQueue, type RunJobName } from '../queue';
import { loadQueueSettings } from '../queue/config';
import { processMergeJob, processPartJob, processRunJob, type JobEnv } from './jobs';
import { reconcile } from './reconciler';
import { sweepExpiringWaivers } from '../services/waivers';
import { CheckThreads } from './threads';

const WAIVER_SWEEP_MS = 15 * 60 * 1000;

const log = (line: string) => process.stdout.write(`worker: ${line}\n`);

async function activeRuns(env: JobEnv): Promise<number> {
  const [row] = await env.ctx.sequelize.query<{ n: number }>(`select cast(count(*) as integer) as n from runs where state in ('queued', 'running')`, {
    type: QueryTypes.SELECT,
  });
  return row.n;
}

async function main(argv: string[]): Promise<number> {
  const untilIdle = argv.includes('--until-idle');
  const config = getConfig();
  const settings = loadQueueSettings();
  const ctx = createContext(config, { startOutbox: false });
  const connection = createWorkerRedis(config);
  const flow = createFlowProducer(config, connection);
  const threads = new CheckThreads(settings.concurrency);
  const env: JobEnv = { ctx, settings, threads, flow, log };
  const queue = runQueue(ctx);

  const worker = new Worker<unknown, string, RunJobName>(
    RUN_QUEUE,
    async (job: Job<unknown, string, RunJobName>) => {
      switch (job.name) {
        case 'run':
          return processRunJob(env, job as Job<never>);
        case 'part':
          return processPartJob(env, job as Job<never>);
        case 'merge':
          return processMergeJob(env, job as Job<never>);
        default:
          throw new Error(`unknown job ${String(job.name)}`);
      }
    },
    {
      connection,
      prefix: queuePrefix(config),
      concurrency: settings.concurrency,
      name: settings.workerName,
      lockDuration: settings.lockMs,
      stalledInterval: settings.stalledCheckMs,
      // A job whose worker died twice is given up (the run fails): a netlist that kills its reader must not loop forever.
      maxStalledCount: 2,
      autorun: false,
    },
  );
  worker.on('error', (err) => log(`queue error: ${err.message}`));
  worker.on('failed', (job, err) => {
    if (job) log(`job ${job.id} (${job.name}) failed on attempt ${job.attemptsMade}: ${err.message}`);
  });

  let reconciling: Promise<unknown> = Promise.resolve();
  const reconcileNow = () => {
    reconciling = reconciling
      .then(() => reconcile(ctx, queue, settings, log))
      .catch((err) => log(`reconciler: ${err instanceof Error ? err.message : String(err)}`));
    return reconciling;
  };
  const timer = setInterval(reconcileNow, settings.reconcileSeconds * 1000);
  // Waivers expiring within a week: one warning each, however many workers sweep (services/waivers.ts).
  const sweepWaivers = () =>
    sweepExpiringWaivers(ctx).then(
      (n) => n && log(`warned of ${n} expiring waiver${n === 1 ? '' : 's'}`),
      (err) => log(`waiver sweep: ${err instanceof Error ? err.message : String(err)}`),
    );
  const waiverTimer = setInterval(sweepWaivers, WAIVER_SWEEP_MS);
  waiverTimer.unref();

  let stopping = false;
  const stop = async (code: number) => {
    if (stopping) return;
    stopping = true;
    clearInterval(timer);
    clearInterval(waiverTimer);
    log('stopping');
    // Give running checks a moment; a job cut off here is taken over by another worker when its lock runs out.
    await Promise.race([worker.close(), new Promise((r) => setTimeout(r, 10_000))]);
    await threads.close();
    await flow.close().catch(() => {});
    await queue.close().catch(() => {});
    connection.disconnect();
    await ctx.close();
    process.exit(code);
  };
  process.on('SIGINT', () => void stop(0));
  process.on('SIGTERM', () => void stop(0));

  // In --until-idle mode the grace period does not apply: the runs this process was started for are already enqueued or lost.
  if (untilIdle) settings.reconcileGraceSeconds = 0;
  await worker.waitUntilReady();
  void worker.run();
  log(`ready: ${settings.concurrency} at once as ${settings.workerName}, queue ${queuePrefix(config)}:${RUN_QUEUE}`);
  await reconcileNow();
  void sweepWaivers();

  if (untilIdle) {
    for (;;) {
      await new Promise((r) => setTimeout(r, 500));
      if ((await activeRuns(env)) === 0) break;
    }
    await stop(0);
  }
  return 0;
}

main(process.argv.slice(2)).catch((err) => {
  process.stderr.write(`worker: ${err instanceof Error ? err.stack ?? err.message : String(err)}\n`);
  process.exit(1);
});
