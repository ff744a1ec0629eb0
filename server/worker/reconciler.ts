// The reconciler: PostgreSQL says which runs still want work (queued or running);
// the queue should hold a job for each. Whatever the queue lost (Redis restarted
// without its data, a submitter that could not reach Redis, a flow cut short) is
// put back; a job the queue gave up on fails its run. Every worker runs it on start
// and periodically; job ids are the run's, so two reconcilers never double a job.

import { QueryTypes } from 'sequelize';
import type { Queue } from 'bullmq';
import type { AppContext } from '../context';
import { enqueueRun, jobIds } from '../queue';
import type { QueueSettings } from '../queue/config';
import { failRun } from '../services/runs-store';

export interface ReconcileReport {
  checked: number;
  requeued: string[];
  failed: string[];
}

export async function reconcile(ctx: AppContext, queue: Queue, settings: QueueSettings, log: (line: string) => void = () => {}): Promise<ReconcileReport> {
  const runs = await ctx.sequelize.query<{ id: string; parts: number | null }>(
    `select id, parts from runs
     where state in ('queued', 'running') and updated_at < now() - make_interval(secs => :grace)
     order by created_at limit 1000`,
    { replacements: { grace: settings.reconcileGraceSeconds }, type: QueryTypes.SELECT },
  );
  const report: ReconcileReport = { checked: runs.length, requeued: [], failed: [] };
  for (const run of runs) {
    const jobId = run.parts ? jobIds.merge(run.id) : jobIds.run(run.id);
    const job = await queue.getJob(jobId);
    const state = job ? await job.getState() : 'missing';
    if (state === 'failed') {
      const reason = job?.failedReason || 'the queue gave up on the job';
      if (await failRun(ctx, run.id, `The check could not be completed: ${reason}`)) report.failed.push(run.id);
      continue;
    }
    if (state !== 'missing' && state !== 'completed' && state !== 'unknown') continue;
    // Lost, or ended without ending its run: start the run over from its first job.
    if (run.parts) {
      await ctx.sequelize.transaction(async (transaction) => {
        await ctx.sequelize.query(`update runs set parts = null, updated_at = now() where id = :id and state in ('queued', 'running')`, {
          replacements: { id: run.id },
          transaction,
        });
        await ctx.sequelize.query(`delete from run_parts where run_id = :id`, { replacements: { id: run.id }, transaction });
      });
    }
    for (const id of [jobIds.run(run.id), jobIds.merge(run.id)]) {
      const stale = await queue.getJob(id);
      if (stale && (await stale.getState()) !== 'active') await stale.remove({ removeChildren: true }).catch(() => {});
    }
    if (await enqueueRun(queue, settings, run.id)) report.requeued.push(run.id);
  }
  if (report.requeued.length || report.failed.length) {
    log(`reconciler: re-enqueued ${report.requeued.length} run(s), failed ${report.failed.length} run(s) the queue had given up on`);
  }
  return report;
}
