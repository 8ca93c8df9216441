import { WaitingError, type Job } from 'bullmq';
import type { Orm } from '../server/db/orm';
import type { RunJobData } from '../server/queue';
import type { RunProgress } from '../shared/api/contract';
import { markRunning, markCancelled, markRequeued, recordProgress, isCancelRequested, storeResult, markFailed } from '../server/services/runResults';
import type { RunPool } from './pool';

const PROGRESS_DB_EVERY_MS = 1000; // the database gets coarse progress; live events get every update
const CANCEL_POLL_MS = 500;

export interface ProcessorDeps {
  orm: Orm;
  pool: RunPool;
  onEnded?: (runId: string) => Promise<void>;
}

/** Carries one queued run from the database through a pool thread and back. */
export function runProcessor({ orm, pool, onEnded }: ProcessorDeps) {
  return async (job: Job<RunJobData>, token?: string): Promise<{ status: string }> => {
    const { runId } = job.data;
    const em = orm.em.fork();
    const run = await markRunning(em, runId);
    if (!run) return { status: 'skipped' };
    if (run.cancelRequested) {
      await markCancelled(em, runId);
      return { status: 'cancelled' };
    }

    let lastDbWrite = 0;
    const handle = pool.start(run.spec, (p: RunProgress) => {
      void job.updateProgress(p);
      const now = Date.now();
      if (now - lastDbWrite >= PROGRESS_DB_EVERY_MS) {
        lastDbWrite = now;
        void recordProgress(orm.em.fork(), runId, p.percent / 100).catch(() => undefined);
      }
    });
    const poll = setInterval(() => {
      void isCancelRequested(orm.em.fork(), runId).then((yes) => yes && handle.cancel(), () => undefined);
    }, CANCEL_POLL_MS);

    try {
      const result = await handle.result;
      await storeResult(orm.em.fork(), runId, result);
      return { status: result.cancelled ? 'cancelled' : 'finished' };
    } catch (err) {
      if (pool.closing) {
        // The worker is stopping: the run goes back to the queue for the next worker, not to failed.
        await markRequeued(orm.em.fork(), runId);
        await job.moveToWait(token);
        throw new WaitingError();
      }
      // A thread the watchdog ended after a cancel it did not answer is a cancelled run, not a failed one.
      if (await isCancelRequested(orm.em.fork(), runId).catch(() => false)) {
        await markCancelled(orm.em.fork(), runId);
        return { status: 'cancelled' };
      }
      const reason = err instanceof Error ? err.message : String(err);
      await markFailed(orm.em.fork(), runId, `The engine stopped with an error: ${reason}`);
      return { status: 'failed' };
    } finally {
      clearInterval(poll);
      if (onEnded) await onEnded(runId).catch((e) => console.error('[worker] after-run hook failed', e));
    }
  };
}

/**
 * A job BullMQ has given up on (its attempts used, or stalled too often because the
 * process running it died each time) fails its run for good with the reason, refunded
 * like any failure, so it cannot come back as a poison pill. Earlier failures are retried.
 */
export async function failForGood(orm: Orm, job: Job<RunJobData>, err: Error): Promise<void> {
  const stalledOut = /stalled more than allowable limit/.test(err.message);
  if (!stalledOut && job.attemptsMade < (job.opts.attempts ?? 1)) return;
  const tries = Math.max(1, job.attemptsMade);
  const why = stalledOut ? 'its worker stopped while running it too many times' : err.message;
  await markFailed(orm.em.fork(), job.data.runId, `The run failed for good after ${tries} attempt${tries === 1 ? '' : 's'}: ${why}`).catch((e) =>
    console.error(`[worker] could not mark run ${job.data.runId} failed`, e),
  );
}
