import { Router, type RequestHandler } from 'express';
import type { Deps } from '../app';
import { withTimeout } from '../errors';
import { liveBeats } from '../services/heartbeat';
import { Run } from '../db/entities';

/** Each check gets this long; the whole answer leaves within HEALTH_DEADLINE_MS whatever is down. */
export const HEALTH_CHECK_MS = 700;
export const HEALTH_DEADLINE_MS = 950;
/** Runs the database holds as queued or running this long without a live job count as stuck. */
const STUCK_AFTER_MS = 5 * 60_000;
/** Jobs that failed within this window (a worker or infrastructure fault; a run's own error is not a job failure) mark the queue unhealthy. */
const RECENT_FAILURE_MS = 15 * 60_000;

type Part = 'database' | 'queue' | 'workers' | 'jobs';

/** Answers 503 with the status alone if the full check has not answered in time (for instance, a session store that hangs). */
export const healthDeadline: RequestHandler = (_req, res, next) => {
  const timer = setTimeout(() => {
    if (!res.headersSent) res.status(503).json({ status: 'unavailable' });
  }, HEALTH_DEADLINE_MS);
  res.on('close', () => clearTimeout(timer));
  res.on('finish', () => clearTimeout(timer));
  next();
};

const settle = <T>(p: Promise<T>, service: 'The database' | 'The queue') =>
  withTimeout(p, service, HEALTH_CHECK_MS).then(
    (value) => ({ ok: true as const, value }),
    (e: Error) => ({ ok: false as const, error: e.message }),
  );

/**
 * Whether the database, the queue and the workers answer, and how the work is going.
 * Anyone gets the status (200 ok, or 503 unavailable); admins also get which part is
 * down, worker beats, job counts and stuck runs.
 */
export function healthRouter({ orm, queue }: Deps): Router {
  const r = Router();
  r.get('/', async (req, res) => {
    const em = orm.em.fork();
    const since = new Date(Date.now() - STUCK_AFTER_MS);
    const [database, counts, beats, failed, stale] = await Promise.all([
      settle(em.getConnection().execute('select 1 as ok'), 'The database'),
      settle(queue.getJobCounts('waiting', 'active', 'delayed', 'failed', 'completed'), 'The queue'),
      settle(queue.getBackend().client.then((c) => liveBeats(c)), 'The queue'),
      settle(queue.getFailed(0, 19), 'The queue'),
      settle(
        em.find(Run, { $or: [{ status: 'queued', createdAt: { $lt: since } }, { status: 'running', startedAt: { $lt: since } }] }, { fields: ['id'], limit: 50, orderBy: { createdAt: 'asc' } }),
        'The database',
      ),
    ]);
    // A run is stuck when the database says it waits or runs but the queue holds no live job for it.
    let stuck: number | null = null;
    if (stale.ok && counts.ok) {
      const states = await settle(Promise.all(stale.value.map((run) => queue.getJobState(run.id))), 'The queue');
      stuck = states.ok ? states.value.filter((s) => !['waiting', 'active', 'delayed', 'prioritized', 'waiting-children'].includes(s)).length : null;
    }
    const recentFailures = failed.ok ? failed.value.filter((j) => (j.finishedOn ?? 0) > Date.now() - RECENT_FAILURE_MS).length : null;
    const workers = beats.ok ? beats.value : [];
    const quietRuns = workers.reduce((n, b) => n + b.quietRuns, 0);

    const down: Part[] = [];
    if (!database.ok) down.push('database');
    if (!counts.ok || !beats.ok) down.push('queue');
    else if (workers.length === 0 || quietRuns > 0) down.push('workers');
    if (recentFailures) down.push('jobs');
    const status = down.length === 0 ? 'ok' : 'unavailable';
    if (res.headersSent) return; // the deadline answered first
    res.set('Cache-Control', 'no-store');
    if (req.user?.role !== 'admin') return void res.status(status === 'ok' ? 200 : 503).json({ status });
    res.status(status === 'ok' ? 200 : 503).json({
      status,
      down,
      database: database.ok ? { ok: true } : { ok: false, error: database.error },
      queue: counts.ok ? { ok: true, counts: counts.value } : { ok: false, error: counts.error },
      workers: { count: workers.length, threads: workers.reduce((n, b) => n + b.threads, 0), quietRuns, beats: workers.map((b) => ({ ...b, ageMs: Date.now() - b.at })) },
      jobs: { failed: counts.ok ? counts.value.failed : null, failedLast15Minutes: recentFailures },
      runs: { stuck },
    });
  });
  return r;
}
