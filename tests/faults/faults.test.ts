// Faults injected into a real stack: worker processes killed with SIGKILL, PostgreSQL stopped
// and started, Redis restarted, the queue's copy of a run lost. Every accepted run must reach a
// final state with the right charge, and a run taken over must give the uninterrupted result.
import { openTestStack, uniqueLogin, type TestStack } from '../support/stack';
import { startProcess, killHard, killAll, postgres, redis, type Child } from '../support/processes';
import { User, Run, RunOutput, RunSnapshot, RunCheckpoint, UsageEntry } from '../../server/db/entities';
import { submitRuns } from '../../server/services/runs';
import { runSimulation, type RunResult } from '../../shared/engine';
import { defaultRunSpec, type RunSpec } from '../../shared/spec';
import { FINAL_STATUSES } from '../../shared/api/contract';
import { createToken } from '../../server/services/tokens';
import { RunEndAnnouncer } from '../../server/queue';
import { GAVE_UP_STALLED, STALLED_OUT_ERROR } from '../../worker/reconciler';
import http from 'node:http';
import net from 'node:net';
import type { Redis } from 'ioredis';

jest.setTimeout(240_000);

// Short locks and a fast reconciler, so a dead worker's run is taken over within seconds.
const WORKER_ENV = {
  INFALL_WORKER_THREADS: '1',
  INFALL_WORKER_LOCK_MS: '2000',
  INFALL_CHECKPOINT_SECONDS: '1',
  INFALL_CHECKPOINT_STEPS: '100',
  INFALL_RECONCILE_SECONDS: '2',
  INFALL_WORKER_MAX_STALLS: '2',
};

let stack: TestStack;
let user: User;

beforeAll(async () => {
  stack = await openTestStack();
  const em = stack.orm.em.fork();
  const login = uniqueLogin('faults');
  user = em.create(User, { providerId: login, login, name: 'Fault Test', role: 'researcher' });
  await em.flush();
});

afterEach(killAll);

afterAll(async () => {
  await killAll();
  await stack.queue.obliterate({ force: true }).catch(() => undefined);
  await stack.close();
});

const base = defaultRunSpec();
// 1000 steps of 800 particles: several seconds of integration, with a checkpoint every 100 steps.
const longSpec = (seed: number): RunSpec => ({ ...base, seed, model: { ...base.model, n: 800 } as RunSpec['model'], duration_Myr: 200, snapshotEvery: 50, diagnosticsEvery: 20 });

const sleep = (ms: number) => new Promise((r) => setTimeout(r, ms));

/** Reads through PostgreSQL outages: a query that fails is tried again. */
async function poll<T>(what: string, read: () => Promise<T>, ok: (v: T) => boolean, ms = 120_000): Promise<T> {
  const t0 = Date.now();
  for (;;) {
    const v = await read().catch(() => undefined);
    if (v !== undefined && ok(v)) return v;
    if (Date.now() - t0 > ms) throw new Error(`${what}: not reached within ${ms} ms (last: ${JSON.stringify(v)})`);
    await sleep(200);
  }
}

const runRow = (id: string) => stack.orm.em.fork().findOneOrFail(Run, { id }, { disableIdentityMap: true });
const checkpointAt = (id: string) => stack.orm.em.fork().findOne(RunCheckpoint, { run: id }, { fields: ['step'], disableIdentityMap: true }).then((c) => c?.step ?? 0);
const finalRun = (id: string) => poll(`run ${id} final`, () => runRow(id), (r) => FINAL_STATUSES.includes(r.status));

/** The user's ledger total; tests in this file run one after another, so a difference is one run's net charge. */
async function ledger(): Promise<number> {
  const rows = await stack.orm.em.fork().find(UsageEntry, { user: user.id });
  return rows.reduce((s, r) => s + r.interactions, 0);
}

function freePort(): Promise<number> {
  return new Promise((resolve) => {
    const s = net.createServer().listen(0, '127.0.0.1', () => {
      const { port } = s.address() as net.AddressInfo;
      s.close(() => resolve(port));
    });
  });
}

/** An event-stream client: the events it got (name and id), and a promise for the stream's close. */
function watch(port: number, token: string, runId: string, lastEventId?: string): { events: string[]; ids: number[]; closed: Promise<void> } {
  const events: string[] = [];
  const ids: number[] = [];
  const headers: Record<string, string> = { Authorization: `Bearer ${token}`, ...(lastEventId ? { 'Last-Event-ID': lastEventId } : {}) };
  const closed = new Promise<void>((resolve, reject) => {
    http
      .get({ host: '127.0.0.1', port, path: `/api/runs/${runId}/events`, headers }, (res) => {
        res.setEncoding('utf8');
        let buffer = '';
        res.on('data', (chunk: string) => {
          buffer += chunk;
          const blocks = buffer.split('\n\n');
          buffer = blocks.pop()!;
          for (const b of blocks) {
            const name = /^event: (\w+)$/m.exec(b)?.[1];
            if (name) events.push(name);
            const id = /^id: (\d+)$/m.exec(b)?.[1];
            if (id) ids.push(Number(id));
          }
        });
        res.on('end', resolve);
        res.on('error', resolve);
      })
      .on('error', reject);
  });
  return { events, ids, closed };
}

/** Submits as a client would after a fault: once the test's own queue connection is back (a Redis restart leaves it reconnecting for a while). */
async function submit(spec: RunSpec, name: string): Promise<string> {
  const client = (await stack.queue.getBackend().client) as unknown as Redis;
  await poll('queue connection ready', async () => client.status, (st) => st === 'ready', 30_000);
  const [s] = await submitRuns(stack.orm.em.fork(), stack.queue, user, { name, spec });
  return s.id;
}

/** The stored output and frames equal the uninterrupted run's, with every frame once. */
async function expectSameAsUninterrupted(runId: string, whole: RunResult): Promise<void> {
  const em = stack.orm.em.fork();
  const output = await em.findOneOrFail(RunOutput, { run: runId });
  expect(output.diagnostics).toEqual(JSON.parse(JSON.stringify(whole.diagnostics)));
  expect(output.summary).toEqual(JSON.parse(JSON.stringify(whole.summary)));
  const frames = await em.find(RunSnapshot, { run: runId }, { orderBy: { frame: 'asc' } });
  expect(frames.map((f) => f.step)).toEqual(whole.snapshots.map((s) => s.step));
  frames.forEach((f, k) => expect(Buffer.compare(f.positions as Buffer, Buffer.from(whole.snapshots[k].positions.buffer))).toBe(0));
}

test('a run whose worker is killed twice is taken over from its checkpoints and ends bit-identical to an uninterrupted run', async () => {
  const spec = longSpec(11);
  const before = await ledger();
  const id = await submit(spec, 'killed twice');
  let lastStep = 0;
  const workers: Child[] = [];
  for (let k = 0; k < 2; k++) {
    const w = startProcess('worker/index.ts', WORKER_ENV);
    workers.push(w);
    // Killed once it has stored a checkpoint beyond the one it started from.
    lastStep = await poll(`checkpoint past step ${lastStep}`, () => checkpointAt(id), (s) => s > lastStep, 90_000);
    await killHard(w);
    // A checkpoint write in flight at the kill may have landed after the poll read: the next
    // worker must get past the newest one, so it is read again once the worker is gone.
    lastStep = await checkpointAt(id);
  }
  const whole = runSimulation(spec); // computed here while the last worker runs
  const last = startProcess('worker/index.ts', WORKER_ENV);
  const run = await finalRun(id);
  expect(run.status).toBe('finished');
  // Each takeover started from a checkpoint, not from step 0.
  expect(workers[1].output()).toMatch(new RegExp(`run ${id} resumes from its checkpoint at step [1-9]`));
  expect(last.output()).toMatch(new RegExp(`run ${id} resumes from its checkpoint at step ${lastStep}`));
  await expectSameAsUninterrupted(id, whole);
  expect((await ledger()) - before).toBe(run.costInteractions); // finished: the whole charge, no refund
});

test('a run whose workers keep dying (kill -9 past maxStalledCount) is failed for good by the next worker, final in the database, with the uncomputed part refunded', async () => {
  const env = { ...WORKER_ENV, INFALL_WORKER_MAX_STALLS: '1' };
  const before = await ledger();
  // Some 70 times the work of the others (5x the steps of 3,000 particles): it must still be running
  // at each kill and is never computed to its end, even by the WebAssembly direct sum.
  const id = await submit({ ...longSpec(12), model: { ...base.model, n: 3000 } as RunSpec['model'], duration_Myr: 1000 }, 'keeps dying');
  let lastStep = 0;
  for (let k = 0; k < 2; k++) {
    const w = startProcess('worker/index.ts', env);
    lastStep = await poll(`checkpoint past step ${lastStep}`, () => checkpointAt(id), (s) => s > lastStep, 90_000);
    await killHard(w);
    expect((await runRow(id)).status).toBe('running');
  }
  const last = startProcess('worker/index.ts', env);
  const run = await finalRun(id);
  expect(run.status).toBe('failed');
  expect(run.error).toBe(STALLED_OUT_ERROR);
  expect(FINAL_STATUSES).toContain(run.status);
  // BullMQ hands the given-up job to this worker, which fails it for good at once.
  await last.waitFor(new RegExp(`job ${id} failed: ${GAVE_UP_STALLED}`), 10_000);
  // The job ends failed with BullMQ's reason (or is already gone, when a reconcile pass of the
  // starting worker cleared it first); it is never queued again.
  const job = await poll('the job to settle', async () => {
    const j = await stack.queue.getJob(id);
    return { state: j ? await j.getState() : 'gone', reason: j?.failedReason };
  }, (v) => v.state === 'failed' || v.state === 'gone' || v.state === 'unknown', 10_000);
  if (job.state === 'failed') expect(job.reason).toBe(GAVE_UP_STALLED);
  expect(run.progress).toBeGreaterThan(0);
  expect(run.progress).toBeLessThan(1);
  expect((await ledger()) - before).toBe(run.costInteractions - Math.floor(run.costInteractions * (1 - run.progress)));
});

test('a run the queue lost (Redis data gone) while the database says running is put back by the reconciler and finishes', async () => {
  const spec = { ...longSpec(13), duration_Myr: 20 };
  const before = await ledger();
  const id = await submit(spec, 'lost by the queue');
  await (await stack.queue.getJob(id))!.remove();
  // Older than the reconciler's grace for a fresh submission's job to reach Redis.
  await stack.orm.em.fork().nativeUpdate(Run, { id }, { status: 'running', startedAt: new Date(), createdAt: new Date(Date.now() - 60_000) });
  const w = startProcess('worker/index.ts', WORKER_ENV);
  const run = await finalRun(id);
  expect(run.status).toBe('finished');
  // Its job was gone, so only the reconciler can have put it back.
  expect(w.output()).toMatch(/reconciled: 1 requeued/);
  await expectSameAsUninterrupted(id, runSimulation(spec));
  expect((await ledger()) - before).toBe(run.costInteractions);
});

test('PostgreSQL stopped during a run and its result write: the run finishes once it is back, and a server with an event stream open stays up', async () => {
  const spec = longSpec(14);
  const before = await ledger();
  const id = await submit(spec, 'database outage');
  const { secret } = await createToken(stack.orm.em.fork(), user, { name: 'faults', expiresInDays: 1 });
  const port = await freePort();
  const server = startProcess('server/index.ts', { INFALL_PORT: String(port), INFALL_WEB_DIR: '/nonexistent' });
  await server.waitFor(/listening on/);
  const w = startProcess('worker/index.ts', WORKER_ENV);
  await poll('checkpoint', () => checkpointAt(id), (s) => s > 0, 90_000);
  const watcher = watch(port, secret, id);
  await poll('stream open', async () => watcher.events, (e) => e.includes('state'), 10_000);
  postgres.stop();
  const announcer = new RunEndAnnouncer();
  try {
    // An end announced while the database is away: the stream closes without an end (the client
    // would reconnect) and the server process lives on.
    await announcer.announce(id);
    await watcher.closed;
    expect(watcher.events).not.toContain('end');
    // The computation goes on without the database; its end lands while PostgreSQL is still away.
    await w.waitFor(new RegExp(`storing run ${id} failed`), 120_000);
    expect(server.proc.exitCode).toBeNull();
  } finally {
    await announcer.close();
    postgres.start();
  }
  const run = await finalRun(id);
  expect(run.status).toBe('finished');
  // A client that reconnects now is told the end.
  const again = watch(port, secret, id);
  await again.closed;
  expect(again.events).toEqual(['state', 'state', 'end']);
  expect(server.proc.exitCode).toBeNull();
  await expectSameAsUninterrupted(id, runSimulation(spec));
  expect((await ledger()) - before).toBe(run.costInteractions);
});

test('Redis restarted during a run: the worker reconnects and the run finishes bit-identical', async () => {
  const spec = longSpec(15);
  const before = await ledger();
  const id = await submit(spec, 'redis restart');
  startProcess('worker/index.ts', WORKER_ENV);
  await poll('checkpoint', () => checkpointAt(id), (s) => s > 0, 90_000);
  redis.stop();
  await sleep(3000); // longer than the worker's lock
  redis.start();
  const run = await finalRun(id);
  expect(run.status).toBe('finished');
  await expectSameAsUninterrupted(id, runSimulation(spec));
  expect((await ledger()) - before).toBe(run.costInteractions);
});

test('a server restarted while event streams are open: the client reconnects with Last-Event-ID, gets only newer progress, and sees the end', async () => {
  const spec = longSpec(16);
  const id = await submit(spec, 'server restart');
  const { secret } = await createToken(stack.orm.em.fork(), user, { name: 'restart', expiresInDays: 1 });
  const port = await freePort();
  const env = { INFALL_PORT: String(port), INFALL_WEB_DIR: '/nonexistent' };
  let server = startProcess('server/index.ts', env);
  await server.waitFor(/listening on/);
  startProcess('worker/index.ts', WORKER_ENV);
  const first = watch(port, secret, id);
  await poll('some progress', async () => first.ids.length, (n) => n >= 3, 60_000);
  await killHard(server); // the worst case: no goodbye to the clients
  await first.closed;
  expect(first.events).not.toContain('end');
  const last = first.ids[first.ids.length - 1];

  server = startProcess('server/index.ts', env);
  await server.waitFor(/listening on/);
  const again = watch(port, secret, id, String(last));
  await again.closed;
  expect(again.events[0]).toBe('state');
  expect(again.events[again.events.length - 1]).toBe('end');
  expect(again.ids.every((step) => step > last)).toBe(true);
  expect((await finalRun(id)).status).toBe('finished');
});

test('a run taken by a worker while PostgreSQL is down fails its job; once the database is back its retry (or the reconciler) takes it again and it finishes', async () => {
  const spec = { ...longSpec(17), duration_Myr: 20 };
  const w = startProcess('worker/index.ts', WORKER_ENV);
  await w.waitFor(/taking runs/);
  await stack.queue.pause(); // the job waits in Redis until the database is gone
  const before = await ledger();
  const id = await submit(spec, 'taken during an outage');
  postgres.stop();
  try {
    await stack.queue.resume();
    await w.waitFor(new RegExp(`job ${id} failed`), 60_000);
  } finally {
    postgres.start();
  }
  const run = await finalRun(id);
  expect(run.status).toBe('finished');
  // The run was taken again: by its job's next attempt (RUN_ATTEMPTS, with back-off) if the database
  // was back in time, by the same job once its lock lapsed if the worker stalled in the outage, or by
  // the reconciler once its attempts ran out. Started counts every taking, finished or not.
  const job = await stack.queue.getJob(id);
  const takenAgain = (job?.attemptsStarted ?? 0) >= 2 || /reconciled: 1 requeued/.test(w.output());
  expect(takenAgain ? 'taken again' : `attempts ${JSON.stringify({ started: job?.attemptsStarted, made: job?.attemptsMade })}; worker said:\n${w.output()}`).toBe('taken again');
  await expectSameAsUninterrupted(id, runSimulation(spec));
  expect((await ledger()) - before).toBe(run.costInteractions);
});

test('a run that fails while PostgreSQL is away is marked failed once it is back: computed once, its reason kept, the uncomputed part refunded', async () => {
  // 30,000 particles by direct sum: the set-up's force and energy sums take seconds, then the first
  // step, far too long, blows the run up (drift checked every step). The database goes in between.
  const spec: RunSpec = { ...base, seed: 18, model: { ...base.model, n: 30_000 } as RunSpec['model'], softening_kpc: 0.01, timestep_Myr: 500, duration_Myr: 5000, snapshotEvery: 10, diagnosticsEvery: 1 };
  const w = startProcess('worker/index.ts', WORKER_ENV);
  await w.waitFor(/taking runs/);
  const before = await ledger();
  const id = await submit(spec, 'fails during an outage');
  await poll('running', () => runRow(id), (r) => r.status === 'running', 60_000);
  postgres.stop();
  try {
    // The failure met the outage: the worker retries the write (or, failing the job, says so).
    await w.waitFor(new RegExp(`marking run ${id} failed failed|job ${id} failed`), 120_000);
  } finally {
    postgres.start();
  }
  const run = await finalRun(id);
  expect(run.status).toBe('failed');
  expect(run.error).toMatch(/^The engine stopped with an error: the run blew up: .* by step 1 /);
  // The job was started once: the failure waited for the database instead of failing the job.
  expect((await stack.queue.getJob(id))!.attemptsStarted).toBe(1);
  expect((await ledger()) - before).toBe(run.costInteractions - Math.floor(run.costInteractions * (1 - run.progress)));
});
