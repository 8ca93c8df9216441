// The worker path of a run: queue -> BullMQ worker -> piscina thread -> engine -> PostgreSQL.
import { Worker, QueueEvents } from 'bullmq';
import { openTestStack, uniqueLogin, type TestStack } from '../support/stack';
import { config } from '../../server/config';
import { redisConnection, type RunJobData } from '../../server/queue';
import { User, Run, RunOutput, RunSnapshot, UsageEntry } from '../../server/db/entities';
import { submitRuns, snapshotBytes } from '../../server/services/runs';
import { decodeSnapshots, quantisationError } from '../../shared/api/snapshots';
import type { DiagnosticSample } from '../../shared/engine';
import { defaultRunSpec, type RunSpec } from '../../shared/spec';
import { RunPool } from '../../worker/pool';
import { runProcessor } from '../../worker/processor';

jest.setTimeout(60_000);

let stack: TestStack;
let pool: RunPool;
let worker: Worker<RunJobData>;
let events: QueueEvents;
let user: User;

beforeAll(async () => {
  stack = await openTestStack();
  pool = new RunPool(1);
  events = new QueueEvents(config.queueName, { connection: redisConnection, lastEventId: '0-0' });
  await events.waitUntilReady();
  worker = new Worker<RunJobData>(config.queueName, runProcessor({ orm: stack.orm, pool }), { connection: redisConnection });
  const em = stack.orm.em.fork();
  const login = uniqueLogin('worker');
  user = em.create(User, { providerId: login, login, name: 'Worker Test', role: 'researcher' });
  await em.flush();
});

afterAll(async () => {
  await worker.close();
  await events.close();
  await pool.close();
  await stack.queue.obliterate({ force: true });
  await stack.close();
});

async function ledgerTotal(): Promise<number> {
  const rows = await stack.orm.em.fork().find(UsageEntry, { user: user.id });
  return rows.reduce((sum, r) => sum + r.interactions, 0);
}

function waitForEnd(runId: string): Promise<void> {
  return new Promise((resolve) => {
    const done = ({ jobId }: { jobId: string }) => jobId === runId && resolve();
    events.on('completed', done);
    events.on('failed', done);
  });
}

test('a submitted run is integrated in a pool thread and lands whole in PostgreSQL', async () => {
  const spec = { ...defaultRunSpec(), snapshotEvery: 10 };
  const progress: number[] = [];
  const em = stack.orm.em.fork();
  const [summary] = await submitRuns(em, stack.queue, user, { name: 'worker path', spec });
  events.on('progress', ({ jobId, data }) => {
    if (jobId === summary.id) progress.push((data as { percent: number }).percent);
  });
  await waitForEnd(summary.id);

  const check = stack.orm.em.fork();
  const run = await check.findOneOrFail(Run, { id: summary.id });
  expect(run.status).toBe('finished');
  expect(run.progress).toBe(1);
  expect(run.startedAt).toBeInstanceOf(Date);
  expect(run.finishedAt!.getTime()).toBeGreaterThanOrEqual(run.startedAt!.getTime());

  const output = await check.findOneOrFail(RunOutput, { run: summary.id });
  expect((output.diagnostics as unknown[]).length).toBeGreaterThan(1);
  // Every stored sample carries the centre series; an isolated Newtonian sphere's centre of mass stays at rest:
  // within 1e-6 km/s, as the direct sum's float32 pair terms are equal and opposite only to rounding
  // (momentum held to about 1e-9 of the sum of m|v|, tests/engine/run.test.ts), against ~100 km/s speeds.
  const rows = output.diagnostics as DiagnosticSample[];
  expect(rows.every((d) => Math.hypot(d.centreOfMassVelocity.x, d.centreOfMassVelocity.y, d.centreOfMassVelocity.z) < 1e-6)).toBe(true);
  expect(rows.every((d) => [d.centreOfMass.x, d.densityCentre.x, d.densityCentre.y, d.densityCentre.z].every(Number.isFinite))).toBe(true);
  const frames = await check.count(RunSnapshot, { run: summary.id });
  expect(frames).toBeGreaterThan(1);

  // Frames read back through the wire format hold finite positions of every particle kept.
  const { frames: decoded } = decodeSnapshots(await snapshotBytes(check, run));
  expect(decoded).toHaveLength(frames);
  expect(decoded[0].positions.length).toBe(output.snapshotParticles * 3);
  expect(decoded.every((f) => f.positions.every(Number.isFinite))).toBe(true);
  // The wire rounds each coordinate to 16 bits of its frame's extent; what is stored keeps float32.
  const last = await check.findOneOrFail(RunSnapshot, { run: summary.id }, { orderBy: { frame: 'desc' } });
  const b = last.positions as Uint8Array;
  const stored = new Float32Array(Uint8Array.from(b).buffer);
  const sent = decoded[decoded.length - 1].positions;
  for (let a = 0; a < 3; a++) {
    const axis = stored.filter((_, i) => i % 3 === a);
    const bound = quantisationError(Math.max(...axis) - Math.min(...axis)) * (1 + 1e-6) + 1e-6 * Math.max(...axis.map(Math.abs));
    expect(Math.max(...Array.from(axis, (c, i) => Math.abs(sent[3 * i + a] - c)))).toBeLessThanOrEqual(bound);
  }

  // Progress reached the queue's event stream and climbed to 100 %.
  expect(progress.length).toBeGreaterThan(0);
  expect(Math.max(...progress)).toBe(100);
});

test('a cancel request stops a running run and marks it cancelled', async () => {
  const spec = { ...defaultRunSpec(), duration_Myr: defaultRunSpec().duration_Myr * 200, snapshotEvery: 400 };
  const em = stack.orm.em.fork();
  const charged = await ledgerTotal(); // nothing else runs in this file meanwhile
  const [summary] = await submitRuns(em, stack.queue, user, { name: 'to cancel', spec });
  const started = new Promise<void>((resolve) =>
    events.on('progress', ({ jobId }) => jobId === summary.id && resolve()),
  );
  const ended = waitForEnd(summary.id);
  await started;
  await stack.orm.em.fork().nativeUpdate(Run, { id: summary.id }, { cancelRequested: true });
  await ended;
  const run = await stack.orm.em.fork().findOneOrFail(Run, { id: summary.id });
  expect(run.status).toBe('cancelled');
  expect(run.progress).toBeLessThan(1);
  // The ledger keeps the charge for the steps computed and gets the rest back.
  const net = (await ledgerTotal()) - charged;
  expect(net).toBe(run.costInteractions - Math.floor(run.costInteractions * (1 - run.progress)));
  expect(net).toBeGreaterThan(0);
  expect(net).toBeLessThan(run.costInteractions);
});

test('a run that blows up is stored failed with the engine\'s named cause (not finished), no results, and the steps it did not compute refunded', async () => {
  // A Kepler pair at eccentricity 0.99 and a step of a fifth of its period: leapfrog throws the
  // bodies apart at pericentre within a few steps (common practice: ~100 steps per period at least).
  const spec: RunSpec = {
    ...defaultRunSpec(),
    model: { kind: 'kepler', mass1_Msun: 1e10, mass2_Msun: 1e10, semiMajorAxis_kpc: 1, eccentricity: 0.99 },
    softening_kpc: 0,
    timestep_Myr: 1,
    duration_Myr: 200,
    snapshotEvery: 10,
    diagnosticsEvery: 1,
  } as RunSpec;
  const charged = await ledgerTotal();
  const [summary] = await submitRuns(stack.orm.em.fork(), stack.queue, user, { name: 'blows up', spec });
  await waitForEnd(summary.id);
  const check = stack.orm.em.fork();
  const run = await check.findOneOrFail(Run, { id: summary.id });
  expect(run.status).toBe('failed');
  // The cause named is the step (the spec earned the coarse-step warning). Under Jest the thread's
  // error comes from another realm and reads with its class name in front.
  expect(run.error).toMatch(/^The engine stopped with an error: (Error: )?the run blew up: the energy changed by .* by step \d+ .*; timestep_Myr is too long/);
  expect(await check.count(RunOutput, { run: summary.id })).toBe(0);
  expect((await ledgerTotal()) - charged).toBe(run.costInteractions - Math.floor(run.costInteractions * (1 - run.progress)));
  expect(run.progress).toBeLessThan(1);
});

test('a worker that stops hands its running run back to the queue at once, and the next worker runs it from the start to the end', async () => {
  await worker.close(); // this test brings its own two workers, one after the other
  const base = defaultRunSpec();
  // A few seconds of integration: the stop comes within milliseconds of the start.
  const spec = { ...base, model: { ...base.model, n: 1000 }, duration_Myr: base.duration_Myr * 3, snapshotEvery: 100 } as RunSpec;
  const [summary] = await submitRuns(stack.orm.em.fork(), stack.queue, user, { name: 'handed back', spec });

  const firstPool = new RunPool(1);
  const first = new Worker<RunJobData>(config.queueName, runProcessor({ orm: stack.orm, pool: firstPool }), { connection: redisConnection });
  // Read from the database, not the queue's event stream, which can lag behind by seconds under load.
  for (const t0 = Date.now(); (await stack.orm.em.fork().findOneOrFail(Run, { id: summary.id })).status !== 'running'; ) {
    if (Date.now() - t0 > 30_000) throw new Error('the first worker never took the run');
    await new Promise((r) => setTimeout(r, 50));
  }
  // The worker process's stop: pool first, then the queue worker.
  await firstPool.close();
  await first.close();
  const handedBack = await stack.orm.em.fork().findOneOrFail(Run, { id: summary.id });
  expect({ status: handedBack.status, progress: handedBack.progress, startedAt: handedBack.startedAt }).toEqual({ status: 'queued', progress: 0, startedAt: null });
  // Had the stop waited for the run, it would read finished here.
  expect(await (await stack.queue.getJob(summary.id))!.getState()).toBe('waiting');

  const nextPool = new RunPool(1);
  const ended = waitForEnd(summary.id);
  const next = new Worker<RunJobData>(config.queueName, runProcessor({ orm: stack.orm, pool: nextPool }), { connection: redisConnection });
  try {
    await ended;
    const run = await stack.orm.em.fork().findOneOrFail(Run, { id: summary.id });
    expect(run.status).toBe('finished');
    expect(run.progress).toBe(1);
  } finally {
    await next.close();
    await nextPool.close();
  }
}, 120_000);
