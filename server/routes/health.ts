import { Router } from 'express';
import type { Deps } from '../app';

// Reports whether the database and the queue answer, and how busy the queue is.
export function healthRouter({ orm, queue }: Deps): Router {
  const r = Router();
  r.get('/', async (_req, res) => {
    const [database, queueState] = await Promise.all([
      orm.em
        .fork()
        .getConnection()
        .execute('select 1 as ok')
        .then(() => ({ ok: true as const }), (e: Error) => ({ ok: false as const, error: e.message })),
      queue
        .getJobCounts('waiting', 'active', 'completed', 'failed', 'delayed')
        .then((counts) => ({ ok: true as const, counts }), (e: Error) => ({ ok: false as const, error: e.message })),
    ]);
    const workers = queueState.ok ? await queue.getWorkersCount().catch(() => 0) : 0;
    const ok = database.ok && queueState.ok;
    res.status(ok ? 200 : 503).json({ ok, database, queue: { ...queueState, workers } });
  });
  return r;
}
