// What a worker does with each job of the run queue.
//
//  run    claim the run, read the files, elaborate; bad input fails the run for good
//         (UnrecoverableError, no retry). A small design is checked here and its
//         results written; a large one becomes a flow: one `part` job per group of
//         cells under a `merge` parent.
//  part   check one group of cells and stage its findings (replacing an earlier
//         attempt of the same part).
//  merge  join the staged parts and write the run's results.
//
// Every step asks PostgreSQL first: a cancelled or finished run is left alone, and
// progress writes double as the cancellation check between stages.

import { UnrecoverableError, type FlowProducer, type Job } from 'bullmq';
import type { RunDiagnostic, RunProgress } from '../../shared/api/runs';
import type { CheckSummary } from '../../shared/findings';
import type { AppContext } from '../context';
import { jobIds, jobOptions, RUN_QUEUE, type MergeJobData, type PartJobData, type RunJobData } from '../queue';
import type { QueueSettings } from '../queue/config';
import {
  breakdownOf,
  claimRun,
  failRun,
  finishExecution,
  finishRun,
  loadRunInputs,
  markSplit,
  mergeParts,
  progressOf,
  readStagedParts,
  readRun,
  stagePart,
  startExecution,
  vacuumFindings,
  writeProgress,
  type ExecutionKind,
  type ExecutionOutcome,
} from '../services/runs-store';
import type { CheckOutcome, CheckRequest, ThreadStage } from './check-protocol';
import { CancelledError, type CheckThreads } from './threads';

export interface JobEnv {
  ctx: AppContext;
  settings: QueueSettings;
  threads: CheckThreads;
  flow: FlowProducer;
  log: (line: string) => void;
}

export function formatDiagnostics(diagnostics: RunDiagnostic[]): string {
  const errors = diagnostics.filter((d) => d.severity === 'error');
  const shown = errors.slice(0, 50).map((d) => `${d.file}:${d.line}:${d.column}: ${d.message}${d.hint ? ` (${d.hint})` : ''}`);
  if (errors.length > shown.length) shown.push(`… and ${errors.length - shown.length} more`);
  return `The netlist could not be read:\n${shown.join('\n')}`;
}

/** Progress writes for one job: at most one per `progressMs`, each telling whether the run still wants the work. */
class ProgressWriter {
  private last = 0;
  private pending: Promise<void> = Promise.resolve();
  readonly abort = new AbortController();

  constructor(
    private readonly env: JobEnv,
    private readonly runId: string,
    private readonly attempt?: number,
  ) {}

  /** Write now (stage changes) or when due (counts within a stage). */
  write(progress: RunProgress, force = false): Promise<void> {
    const now = Date.now();
    if (!force && now - this.last < this.env.settings.progressMs) return this.pending;
    this.last = now;
    this.pending = this.pending.then(async () => {
      if (this.abort.signal.aborted) return;
      try {
        const running = await writeProgress(this.env.ctx, this.runId, progress, this.attempt);
        if (!running) this.abort.abort();
      } catch (err) {
        // A lost progress write is no reason to stop a check; the next one may land.
        this.env.log(`run ${this.runId}: progress not written: ${err instanceof Error ? err.message : String(err)}`);
      }
    });
    return this.pending;
  }

  /** Between stages: throws CancelledError when the run was cancelled meanwhile. */
  async checkpoint(progress: RunProgress): Promise<void> {
    await this.write(progress, true);
    if (this.abort.signal.aborted) throw new CancelledError();
  }
}

function isFinalAttempt(job: Job): boolean {
  return job.attemptsMade + 1 >= (job.opts.attempts ?? 1);
}

const describe = (err: unknown) => (err instanceof Error ? err.message : String(err));

async function runThread(env: JobEnv, request: CheckRequest, progress: ProgressWriter, label: (stage: ThreadStage) => RunProgress): Promise<CheckOutcome> {
  return env.threads.run(request, (stage) => void progress.write(label(stage), stage.stage === 'elaborating'), progress.abort.signal);
}

/** Wraps a job body: records the execution, maps cancellation and failures onto the run. */
async function execute(env: JobEnv, job: Job, kind: ExecutionKind, runId: string, body: () => Promise<ExecutionOutcome>): Promise<ExecutionOutcome> {
  const executionId = await startExecution(env.ctx, { runId, jobId: job.id ?? '', kind, attempt: job.attemptsMade + 1, worker: env.settings.workerName });
  try {
    const outcome = await body();
    await finishExecution(env.ctx, executionId, outcome);
    return outcome;
  } catch (err) {
    if (err instanceof CancelledError) {
      await finishExecution(env.ctx, executionId, 'cancelled');
      return 'cancelled';
    }
    await finishExecution(env.ctx, executionId, 'failed', describe(err)).catch(() => {});
    if (err instanceof UnrecoverableError) throw err;
    if (isFinalAttempt(job)) {
      const failed = await failRun(env.ctx, runId, `The check stopped with an internal error after ${job.attemptsMade + 1} attempt(s): ${describe(err)}`).catch(() => false);
      if (failed) env.log(`run ${runId}: failed after ${job.attemptsMade + 1} attempt(s): ${describe(err)}`);
    }
    throw err;
  }
}

export async function processRunJob(env: JobEnv, job: Job<RunJobData>): Promise<ExecutionOutcome> {
  const { runId } = job.data;
  const run = await claimRun(env.ctx, runId);
  if (!run) {
    await finishExecution(env.ctx, await startExecution(env.ctx, { runId, jobId: job.id ?? '', kind: 'run', attempt: job.attemptsMade + 1, worker: env.settings.workerName }), 'skipped');
    return 'skipped';
  }
  return execute(env, job, 'run', runId, async () => {
    // This job already split the run and its flow is queued (the worker died before the job could complete): leave the flow to finish.
    if (run.parts) {
      const flow = await env.flow.getFlow({ id: jobIds.merge(runId), queueName: RUN_QUEUE, depth: 0 }).catch(() => null);
      if (flow?.job) return 'split';
    }
    const started = Date.now();
    const progress = new ProgressWriter(env, runId, run.attempt);
    const inputs = await loadRunInputs(env.ctx, run);
    await progress.checkpoint(progressOf('elaborating', 'Reading and elaborating the netlist'));
    const outcome = await runThread(
      env,
      {
        kind: 'plan',
        files: inputs.files,
        deck: inputs.deck,
        ...(run.topCell ? { top: run.topCell } : {}),
        splitMinCells: env.settings.splitMinCells,
        cellsPerPart: env.settings.cellsPerPart,
      },
      progress,
      (s) =>
        s.stage === 'elaborating'
          ? progressOf('elaborating', 'Reading and elaborating the netlist')
          : progressOf('checking', `Checking cell ${s.done} of ${s.total}`, { done: s.done, total: s.total }),
    );

    if (outcome.kind === 'invalid') {
      await failRun(env.ctx, runId, formatDiagnostics(outcome.diagnostics), outcome.diagnostics);
      throw new UnrecoverableError('the netlist has errors');
    }

    if (outcome.kind === 'split') {
      const summary: CheckSummary = { ...outcome.summary, elapsedMs: 0 };
      if (!(await markSplit(env.ctx, runId, run.attempt, { parts: outcome.parts.length, summary, diagnostics: outcome.diagnostics }))) throw new CancelledError();
      const queueOpts = jobOptions(env.settings);
      // A retried plan finds its flow already there: job ids are the run's, so nothing doubles.
      const existing = await env.flow.getFlow({ id: jobIds.merge(runId), queueName: RUN_QUEUE, depth: 0 }).catch(() => null);
      if (!existing?.job) {
        await env.flow.add({
          name: 'merge',
          queueName: RUN_QUEUE,
          data: { runId } satisfies MergeJobData,
          opts: { ...queueOpts, jobId: jobIds.merge(runId) },
          children: outcome.parts.map((cells, part) => ({
            name: 'part',
            queueName: RUN_QUEUE,
            data: { runId, part, cells } satisfies PartJobData,
            opts: { ...queueOpts, jobId: jobIds.part(runId, part), failParentOnFailure: true },
          })),
        });
      }
      env.log(`run ${runId}: split into ${outcome.parts.length} parts of up to ${env.settings.cellsPerPart} cells`);
      return 'split';
    }

    await progress.checkpoint(progressOf('writing', `Writing ${outcome.findings.length} findings`));
    const result = await finishRun(
      env.ctx,
      runId,
      {
        findings: outcome.findings,
        summary: { ...outcome.summary, elapsedMs: Date.now() - started },
        breakdown: breakdownOf(outcome.findings, outcome.cellCounts),
        diagnostics: outcome.diagnostics,
      },
      run.attempt,
    );
    if (result === 'succeeded') await vacuumFindings(env.ctx);
    env.log(`run ${runId}: ${result} (${outcome.findings.length} findings, ${Date.now() - started} ms)`);
    return result;
  });
}

export async function processPartJob(env: JobEnv, job: Job<PartJobData>): Promise<ExecutionOutcome> {
  const { runId, part, cells } = job.data;
  return execute(env, job, 'part', runId, async () => {
    const run = await readRun(env.ctx, runId);
    if (run?.state !== 'running' || !run.parts) return 'skipped';
    const parts = run.parts;
    const progress = new ProgressWriter(env, runId);
    const inputs = await loadRunInputs(env.ctx, run);
    const outcome = await runThread(
      env,
      { kind: 'part', files: inputs.files, deck: inputs.deck, ...(run.topCell ? { top: run.topCell } : {}), cells },
      progress,
      (s) =>
        progressOf('checking', s.stage === 'checking' ? `Part ${part + 1} of ${parts}: cell ${s.done} of ${s.total}` : `Part ${part + 1} of ${parts}: elaborating`, {
          ...(s.stage === 'checking' ? { done: s.done, total: s.total } : {}),
        }),
    );
    if (outcome.kind !== 'checked') throw new UnrecoverableError(`part ${part} of run ${runId} found the input ${outcome.kind}, unlike its plan`);
    const staged = await stagePart(env.ctx, runId, { part, cells: outcome.summary.cells, findings: outcome.findings, cellCounts: outcome.cellCounts });
    if (!staged) return 'skipped';
    await progress.write(
      progressOf('checking', `Checked ${staged.staged} of ${staged.total} parts`, { done: staged.staged, total: staged.total, parts: { done: staged.staged, total: staged.total } }),
      true,
    );
    return 'staged';
  });
}

export async function processMergeJob(env: JobEnv, job: Job<MergeJobData>): Promise<ExecutionOutcome> {
  const { runId } = job.data;
  return execute(env, job, 'merge', runId, async () => {
    const staged = await readStagedParts(env.ctx, runId);
    if (!staged) return 'skipped';
    if (staged.parts.length !== staged.expected) {
      // Children completed but a staged part is missing (a part that skipped while the run was re-planned): retry later.
      throw new Error(`run ${runId}: ${staged.parts.length} of ${staged.expected} parts staged`);
    }
    const progress = new ProgressWriter(env, runId);
    await progress.checkpoint(progressOf('merging', `Merging ${staged.expected} parts`, { parts: { done: staged.expected, total: staged.expected } }));
    const merged = mergeParts(staged.parts);
    const base = staged.summary;
    const summary: CheckSummary = {
      cells: merged.cells,
      devices: base?.devices ?? 0,
      instances: base?.instances ?? 0,
      parseErrors: 0,
      errors: merged.findings.filter((f) => f.severity === 'error').length,
      warnings: merged.findings.filter((f) => f.severity === 'warning').length,
      infos: merged.findings.filter((f) => f.severity === 'info').length,
      elapsedMs: staged.startedAt ? Date.now() - staged.startedAt.getTime() : 0,
    };
    const run = await readRun(env.ctx, runId);
    await progress.checkpoint(progressOf('writing', `Writing ${merged.findings.length} findings`));
    const result = await finishRun(env.ctx, runId, {
      findings: merged.findings,
      summary,
      breakdown: breakdownOf(merged.findings, merged.cellCounts),
      diagnostics: run?.diagnostics ?? [],
    });
    if (result === 'succeeded') await vacuumFindings(env.ctx);
    env.log(`run ${runId}: ${result} after merging ${staged.expected} parts (${merged.findings.length} findings)`);
    return result;
  });
}
