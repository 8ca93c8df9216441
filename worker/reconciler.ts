import type { Queue } from 'bullmq';
import type { Orm } from '../server/db/orm';
import { Run } from '../server/db/entities';
import type { RunJobData } from '../server/queue';
import { markFailed, markRequeued } from './store';

// Brings the database and the queue back together after an outage or a crash.
// Every run the database calls queued or running must have a job BullMQ will
// hand out; a run whose job is gone, or ended without the database hearing of
// it, is put back in the queue (it resumes from its checkpoint) or, after too
// many tries or when its workers kept dying, failed with its uncomputed part refunded.

/** BullMQ's reason for a job whose workers died more often than the worker's maxStalledCount allows. */
export const GAVE_UP_STALLED = 'job stalled more than allowable limit';
/** The run's error when that happened: the same whether the worker that next takes the job or a reconciler pass fails it. */
export const STALLED_OUT_ERROR = 'The workers running this run stopped unexpectedly several times; it was given up. The uncomputed part was refunded.';
/** A job in one of these states will still reach a worker. */
const LIVE = new Set(['waiting', 'active', 'delayed', 'prioritized', 'waiting-children']);

export interface ReconcileOptions {
  /** A run younger than this may not have its job in Redis yet (submission writes the row first). */
  graceMs?: number;
  /** Put back in the queue at most this many times, then failed. */
  maxRequeues?: number;
  /** Tells event-stream watchers that a run the reconciler failed has ended. */
  announceEnd?: (runId: string) => Promise<void>;
}

export interface ReconcileReport {
  requeued: string[];
  failed: string[];
}

// Arbitrary constant naming the reconciler's advisory lock: one reconciler at a time across all hosts.
const LOCK_KEY = 7_140_231;

export async function reconcile(orm: Orm, queue: Queue<RunJobData>, { graceMs = 30_000, maxRequeues = 3, announceEnd }: ReconcileOptions = {}): Promise<ReconcileReport> {
  const report: ReconcileReport = { requeued: [], failed: [] };
  // The pass runs inside a transaction only to hold its lock; each change is its own transaction.
  await orm.em.fork().transactional(async (em) => {
    const [{ ok }] = await em.execute<{ ok: boolean }[]>('select pg_try_advisory_xact_lock(?) as ok', [LOCK_KEY]);
    if (!ok) return; // another process is reconciling
    const open = await em.find(Run, { status: { $in: ['queued', 'running'] } }, { fields: ['id', 'createdAt'], disableIdentityMap: true });
    for (const { id, createdAt } of open) {
      const state = await queue.getJobState(id);
      if (LIVE.has(state)) continue;
      // Read after its state: a job read first could still be waiting with no failure reason and
      // be failed (given up as stalled) before its state is read, and would then be requeued.
      const job = await queue.getJob(id);
      if (!job && Date.now() - createdAt.getTime() < graceMs) continue;
      // Read again after the queue: the worker may have ended the run in between.
      const fresh = await orm.em.fork().findOne(Run, { id }, { fields: ['status'], disableIdentityMap: true });
      if (!fresh || (fresh.status !== 'queued' && fresh.status !== 'running')) continue;

      const requeues = job?.data.requeues ?? 0;
      const why = job?.failedReason;
      if (why === GAVE_UP_STALLED) {
        await markFailed(orm.em.fork(), id, STALLED_OUT_ERROR);
      } else if (requeues >= maxRequeues) {
        await markFailed(orm.em.fork(), id, `The run could not be completed after ${requeues + 1} attempts${why ? `: ${why}` : ''}. The uncomputed part was refunded.`);
      } else {
        // A job still locked by a worker cannot be removed; it is left for the next pass.
        if (job && !(await job.remove().then(() => true, () => false))) continue;
        await markRequeued(orm.em.fork(), id);
        await queue.add('run', { runId: id, requeues: requeues + 1 }, { jobId: id });
        report.requeued.push(id);
        continue;
      }
      report.failed.push(id);
      // Its watchers hear of it on whichever server process they are connected to.
      await announceEnd?.(id).catch(() => undefined);
    }
  });
  return report;
}
