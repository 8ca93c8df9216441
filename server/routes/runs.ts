import { Router } from 'express';
import { RequestContext } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { requireUser } from '../auth/guards';
import { ApiError } from '../errors';
import { listRunsQuerySchema } from '../../shared/api/requests';
import { issuePath } from '../../shared/spec';
import { FINAL_STATUSES, type RunEventName } from '../../shared/api/contract';
import { Run } from '../db/entities';
import { SNAPSHOT_WIRE_FORMAT } from '../../shared/api/snapshots';
import { submitRuns, listRuns, findVisibleRun, runDetail, snapshotBytes, cancelRun, toSummary, progressSoFar } from '../services/runs';
import { extendRun } from '../services/extend';
import type { Deps } from '../app';
import type { RunSignal } from '../queue';

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
      throw new ApiError('BAD_REQUEST', `${issuePath(issue)}: ${issue.message}`, { field: issuePath(issue) });
    }
    res.json({ runs: await listRuns(em(), req.user!, q.data) });
  });

  r.get('/:id', async (req, res) => {
    const run = await findVisibleRun(em(), req.user!, req.params.id);
    res.json(await runDetail(em(), run));
  });

  // The frames' byte layout is versioned (README "Exports"): a client names the format it reads,
  // and one written for an older format is told so instead of getting bytes it cannot read.
  r.get('/:id/snapshots', async (req, res) => {
    const run = await findVisibleRun(em(), req.user!, req.params.id);
    const asked = typeof req.query.format === 'string' ? req.query.format : '1';
    if (asked !== String(SNAPSHOT_WIRE_FORMAT)) {
      throw new ApiError('BAD_REQUEST', `Snapshot frames are served in wire format ${SNAPSHOT_WIRE_FORMAT} only (asked for ${asked.slice(0, 20)}): reload the page, or add ?format=${SNAPSHOT_WIRE_FORMAT} and read the layout in README "Exports"`, { status: 406 });
    }
    res.type('application/octet-stream').send(Buffer.from(await snapshotBytes(em(), run)));
  });

  r.post('/:id/cancel', async (req, res) => {
    const run = await findVisibleRun(em(), req.user!, req.params.id);
    const { endedNow } = await cancelRun(em(), queue, req.user!, run);
    if (endedNow) signals.announceEnd(run.id);
    res.status(202).json(toSummary(run));
  });

  r.post('/:id/extend', async (req, res) => {
    const run = await findVisibleRun(em(), req.user!, req.params.id);
    res.status(202).json(toSummary(await extendRun(em(), queue, req.user!, run, req.body)));
  });

  // Live progress as server-sent events: `state` first, then for a running run the `history`
  // of its progress so far, `progress` while it runs, `end` last.
  r.get('/:id/events', async (req, res) => {
    const user = req.user!;
    // Listen before the run is read: an end that lands while it is read (the run finishing or
    // cancelled in that moment) would otherwise be missed, and the stream would stay open for good.
    let endHeard = false;
    let listener: (s: RunSignal) => void = (s) => void (endHeard ||= s.kind === 'end');
    const unsubscribe = signals.subscribe(req.params.id, (s) => listener(s));
    let run: Run;
    try {
      run = await findVisibleRun(em(), user, req.params.id);
    } catch (err) {
      unsubscribe();
      throw err;
    }
    res.writeHead(200, { 'Content-Type': 'text/event-stream', 'Cache-Control': 'no-cache, no-transform', Connection: 'keep-alive', 'X-Accel-Buffering': 'no' });
    const send = (event: RunEventName, data: unknown, id?: number) => res.write(`${id === undefined ? '' : `id: ${id}\n`}event: ${event}\ndata: ${JSON.stringify(data)}\n\n`);
    // Progress events carry their step as the event id: a client that reconnects (after a server
    // restart, say) sends it back as Last-Event-ID and gets only newer progress, never an older step.
    const lastEventId = Number(req.get('Last-Event-ID'));
    let lastStep = Number.isSafeInteger(lastEventId) && lastEventId >= 0 ? lastEventId : -1;
    let closed = false;
    const finish = async () => {
      if (closed) return;
      closed = true;
      unsubscribe();
      clearInterval(heartbeat);
      try {
        const fresh = await orm.em.fork().findOne(Run, { id: run.id }, { populate: ['owner'] });
        if (fresh) send('state', toSummary(fresh));
        // The queue may say a job ended before the database does (a write still retrying, or the
        // reconciler about to act): then the stream closes with no end and the client reconnects.
        if (!fresh || FINAL_STATUSES.includes(fresh.status)) send('end', { status: fresh?.status ?? run.status });
      } catch (err) {
        // PostgreSQL away: no end can be told; closing makes the client reconnect and resume.
        console.error(`[server] event stream of run ${run.id}: ${err instanceof Error ? err.message : String(err)}`);
      }
      res.end();
    };
    listener = (s) => {
      if (s.kind === 'progress') {
        if (s.progress.step <= lastStep) return;
        lastStep = s.progress.step;
        send('progress', s.progress, lastStep);
      }
      else void finish();
    };
    const heartbeat = setInterval(() => res.write(': still here\n\n'), 15000);
    req.on('close', () => {
      closed = true;
      unsubscribe();
      clearInterval(heartbeat);
    });
    send('state', toSummary(run));
    if (endHeard || FINAL_STATUSES.includes(run.status)) await finish();
    else if (run.status === 'running') {
      // Samples may also arrive as `progress` meanwhile; clients merge the two by step.
      const history = await progressSoFar(queue, run.id).catch(() => []);
      if (!closed) send('history', history);
    }
  });

  return r;
}
