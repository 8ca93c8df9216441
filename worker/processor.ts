import { WaitingError, type Job } from 'bullmq';
import type { Orm } from '../server/db/orm';
import { Run } from '../server/db/entities';
import type { RunJobData } from '../server/queue';
import type { RunProgress } from '../shared/api/contract';
import type { RunCheckpoint } from '../shared/engine';
import { stepCount } from '../shared/spec';
import { markRunning, markCancelled, markRequeued, recordProgress, isCancelRequested, storeResult, markFailed, loadCheckpoint, saveCheckpoint } from './store';
import { GAVE_UP_STALLED, STALLED_OUT_ERROR } from './reconciler';
import type { RunPool } from './pool';

const PROGRESS_DB_EVERY_MS = 1000; // the database gets coarse progress; live events get every update
const CANCEL_POLL_MS = 500;

export interface ProcessorDeps {
  orm: Orm;
  pool: RunPool;
  onEnded?: (runId: string) => Promise<void>;
  /** Checkpoint cadence (see config.resilience); off when absent. */
  checkpointEvery?: { steps: number; ms: number };
  /** How long a run's end (results or failure) is retried while PostgreSQL is away (default 120 s). */
  storeRetryMs?: number;
}

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Retries `fn` with growing pauses until it succeeds, `stop()` says there is nothing left to do, or time is up. */
async function retrying(what: string, limitMs: number, fn: () => Promise<void>, stop: () => Promise<boolean>): Promise<void> {
  const deadline = Date.now() + limitMs;
  for (let pause = 250; ; pause = Math.min(2 * pause, 5000)) {
    try {
      return await fn();
    } catch (err) {
      if (Date.now() + pause > deadline) throw err;
      console.error(`[worker] ${what} failed (${err instanceof Error ? err.message : String(err)}); retrying in ${pause} ms`);
      await sleep(pause);
      // A write whose answer was lost may have landed: then it must not be made twice.
      if (await stop().catch(() => false)) return;
    }
  }
}

/** Carries one queued run from the database through a pool thread and back. */
export function runProcessor({ orm, pool, onEnded, checkpointEvery, storeRetryMs = 120_000 }: ProcessorDeps) {
  return async (job: Job<RunJobData>, token?: string): Promise<{ status: string }> => {
    const { runId } = job.data;
    const em = orm.em.fork();
    const run = await markRunning(em, runId);
    if (!run) return { status: 'skipped' };
    if (run.cancelRequested) {
      await markCancelled(em, runId);
      return { status: 'cancelled' };
    }

    // A run taken over from a worker that died (or extended after it finished) carries on from its
    // last checkpoint; steps before it are neither computed nor stored again.
    const saved = checkpointEvery ? await loadCheckpoint(em, runId) : null;
    const resumeFrom = saved && saved.state.step <= stepCount(run.spec) ? saved : undefined;
    if (resumeFrom) {
      console.log(`[worker] run ${runId} resumes from its checkpoint at step ${resumeFrom.state.step}`);
      await recordProgress(em, runId, resumeFrom.state.step / stepCount(run.spec));
    }

    // Checkpoints are written one at a time; one that arrives during a write replaces any still waiting.
    let waiting: RunCheckpoint | null = null;
    let newest: RunCheckpoint | null = null;
    let writing: Promise<void> | null = null;
    const writeCheckpoints = async () => {
      for (let c = waiting; c; c = waiting) {
        waiting = null;
        await saveCheckpoint(orm.em.fork(), runId, c).catch((e) => console.error(`[worker] checkpoint of ${runId} not saved: ${e.message}`));
      }
      writing = null;
    };
    const checkpointing = checkpointEvery && {
      resumeFrom,
      every: checkpointEvery,
      onCheckpoint: (c: RunCheckpoint) => {
        waiting = newest = c;
        writing ??= writeCheckpoints();
      },
    };

    let lastDbWrite = 0;
    const handle = pool.start(
      run.spec,
      (p: RunProgress) => {
        void job.updateProgress(p).catch(() => undefined);
        // Kept on the job until it ends, so a page opened mid-run can plot from t = 0.
        void job.log(JSON.stringify(p)).catch(() => undefined);
        const now = Date.now();
        if (now - lastDbWrite >= PROGRESS_DB_EVERY_MS) {
          lastDbWrite = now;
          void recordProgress(orm.em.fork(), runId, p.percent / 100).catch(() => undefined);
        }
      },
      checkpointing || undefined,
    );
    const poll = setInterval(() => {
      void isCancelRequested(orm.em.fork(), runId).then((yes) => yes && handle.cancel(), () => undefined);
    }, CANCEL_POLL_MS);

    // Whether the run's end is already in the database (a write whose answer was lost may have landed).
    const ended = async () => {
      const row = await orm.em.fork().findOne(Run, { id: runId }, { fields: ['status'], disableIdentityMap: true });
      return row !== null && row.status !== 'running';
    };
    try {
      const result = await handle.result;
      await writing;
      // PostgreSQL may be away for a while: the finished result waits for it rather than being lost.
      await retrying(`storing run ${runId}`, storeRetryMs, async () => {
        if (newest) await saveCheckpoint(orm.em.fork(), runId, newest); // the state an extension starts from
        await storeResult(orm.em.fork(), runId, result);
      }, ended);
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
      // Waits for PostgreSQL like a result does: a failed job would be computed again only to fail again.
      await retrying(`marking run ${runId} failed`, storeRetryMs, () => markFailed(orm.em.fork(), runId, `The engine stopped with an error: ${reason}`), ended);
      return { status: 'failed' };
    } finally {
      clearInterval(poll);
      await job.clearLogs().catch(() => undefined); // the stored diagnostics take over
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
  // BullMQ fails a stalled-out job when a worker next takes it, through this handler.
  const stalledOut = err.message === GAVE_UP_STALLED;
  if (!stalledOut && job.attemptsMade < (job.opts.attempts ?? 1)) return;
  const tries = Math.max(1, job.attemptsMade);
  const error = stalledOut ? STALLED_OUT_ERROR : `The run failed for good after ${tries} attempt${tries === 1 ? '' : 's'}: ${err.message}`;
  await markFailed(orm.em.fork(), job.data.runId, error).catch((e) => console.error(`[worker] could not mark run ${job.data.runId} failed`, e));
}
