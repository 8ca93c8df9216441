import { Router } from 'express';
import { RequestContext } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { requireUser } from '../auth/guards';
import { ApiError } from '../errors';
import { listRunsQuerySchema } from '../../shared/api/requests';
import { FINAL_STATUSES, type RunEventName } from '../../shared/api/contract';
import { Run } from '../db/entities';
import { submitRuns, listRuns, findVisibleRun, runDetail, snapshotBytes, cancelRun, toSummary } from '../services/runs';
import type { Deps } from '../app';

const em = () => RequestContext.getEntityManager() as EntityManager;

export function runsRouter({ queue, signals, orm }: Deps): Router {
  const r = Router();
  r.use(requireUser);

  r.post('/', async (req, res) => {
    const runs = await submitRuns(em(), queue, req.user!, req.body);
    res.status(201).json({ runs });
  });

  r.get('/', async (req, res) => {
    const q = listRunsQuerySchema.safeParse(req.query);
    if (!q.success) {
      const issue = q.error.issues[0];
      throw new ApiError('BAD_REQUEST', `${issue.path.join('.')}: ${issue.message}`, { field: issue.path.join('.') });
    }
    res.json({ runs: await listRuns(em(), req.user!, q.data) });
  });

  r.get('/:id', async (req, res) => {
    const run = await findVisibleRun(em(), req.user!, req.params.id);
    res.json(await runDetail(em(), run));
  });

  r.get('/:id/snapshots', async (req, res) => {
    const run = await findVisibleRun(em(), req.user!, req.params.id);
    res.type('application/octet-stream').send(Buffer.from(await snapshotBytes(em(), run)));
  });

  r.post('/:id/cancel', async (req, res) => {
    const run = await findVisibleRun(em(), req.user!, req.params.id);
    const { endedNow } = await cancelRun(em(), queue, req.user!, run);
    if (endedNow) signals.announceEnd(run.id);
    res.status(202).json(toSummary(run));
  });

  // Live progress as server-sent events: `state` first, `progress` while it runs, `end` last.
  r.get('/:id/events', async (req, res) => {
    const user = req.user!;
    const run = await findVisibleRun(em(), user, req.params.id);
    res.writeHead(200, { 'Content-Type': 'text/event-stream', 'Cache-Control': 'no-cache, no-transform', Connection: 'keep-alive', 'X-Accel-Buffering': 'no' });
    const send = (event: RunEventName, data: unknown) => res.write(`event: ${event}\ndata: ${JSON.stringify(data)}\n\n`);
    let closed = false;
    const finish = async () => {
      if (closed) return;
      closed = true;
      unsubscribe();
      clearInterval(heartbeat);
      // With the database away the stream still ends, with the status it last knew.
      const fresh = await orm.em.fork().findOne(Run, { id: run.id }, { populate: ['owner'] }).catch(() => null);
      if (fresh) send('state', toSummary(fresh));
      send('end', { status: fresh?.status ?? run.status });
      res.end();
    };
    // Subscribe before reading the state so an end in between is not missed.
    const unsubscribe = signals.subscribe(run.id, (s) => {
      if (s.kind === 'progress') send('progress', s.progress);
      else void finish();
    });
    const heartbeat = setInterval(() => res.write(': still here\n\n'), 15000);
    req.on('close', () => {
      closed = true;
      unsubscribe();
      clearInterval(heartbeat);
    });
    send('state', toSummary(run));
    if (FINAL_STATUSES.includes(run.status)) await finish();
  });

  return r;
}
