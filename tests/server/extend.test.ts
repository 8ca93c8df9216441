// Extending a finished run by more time: it carries on from the state kept at its last step,
// is charged for the extra steps only, and keeps each earlier frame once.
import request from 'supertest';
import { Worker, QueueEvents } from 'bullmq';
import { openTestStack, uniqueLogin, type TestStack } from '../support/stack';
import { config } from '../../server/config';
import { redisConnection, type RunJobData } from '../../server/queue';
import { User, Run, RunSnapshot, UsageEntry } from '../../server/db/entities';
import { createToken } from '../../server/services/tokens';
import { RunPool } from '../../worker/pool';
import { runProcessor } from '../../worker/processor';
import { runSimulation } from '../../shared/engine';
import { defaultRunSpec, estimateInteractions, parseRunSpec, type RunSpec } from '../../shared/spec';

jest.setTimeout(90_000);

let stack: TestStack;
let pool: RunPool;
let worker: Worker<RunJobData>;
let events: QueueEvents;
let user: User;
let auth: { Authorization: string };
let otherAuth: { Authorization: string };

async function tokenFor(role: 'researcher', prefix: string): Promise<{ user: User; auth: { Authorization: string } }> {
  const em = stack.orm.em.fork();
  const login = uniqueLogin(prefix);
  const u = em.create(User, { providerId: login, login, name: 'Extend Test', role });
  await em.flush();
  const { secret } = await createToken(em, u, { name: 'extend', expiresInDays: 1 });
  return { user: u, auth: { Authorization: `Bearer ${secret}` } };
}

beforeAll(async () => {
  stack = await openTestStack();
  pool = new RunPool(1);
  events = new QueueEvents(config.queueName, { connection: redisConnection, lastEventId: '0-0' });
  await events.waitUntilReady();
  worker = new Worker<RunJobData>(config.queueName, runProcessor({ orm: stack.orm, pool, checkpointEvery: { steps: 1000, ms: 60_000 } }), { connection: redisConnection });
  ({ user, auth } = await tokenFor('researcher', 'extend'));
  ({ auth: otherAuth } = await tokenFor('researcher', 'extend-other'));
});

afterAll(async () => {
  await worker.close();
  await events.close();
  await pool.close();
  await stack.queue.obliterate({ force: true });
  await stack.close();
});

async function ledger(): Promise<number> {
  const rows = await stack.orm.em.fork().find(UsageEntry, { user: user.id });
  return rows.reduce((s, r) => s + r.interactions, 0);
}

async function finished(id: string): Promise<Run> {
  for (const t0 = Date.now(); Date.now() - t0 < 60_000; await new Promise((r) => setTimeout(r, 100))) {
    const run = await stack.orm.em.fork().findOneOrFail(Run, { id }, { disableIdentityMap: true });
    if (run.status === 'finished') return run;
    if (run.status === 'failed' || run.status === 'cancelled') throw new Error(`run ${id} ${run.status}: ${run.error}`);
  }
  throw new Error(`run ${id} did not finish`);
}

test('a finished run extended by more time resumes from its last state, is charged for the extra steps, and keeps each frame once', async () => {
  const base = defaultRunSpec();
  const spec: RunSpec = { ...base, model: { ...base.model, n: 200 } as RunSpec['model'], duration_Myr: 20, snapshotEvery: 10 };
  const before = await ledger();
  const submitted = await request(stack.app).post('/api/runs').set(auth).send({ spec }).expect(201);
  const id: string = submitted.body.runs[0].id;
  const first = await finished(id);
  expect(first.steps).toBe(100);

  // Wrong input and wrong people are refused before anything changes.
  expect((await request(stack.app).post(`/api/runs/${id}/extend`).set(auth).send({ more_Myr: -1 }).expect(400)).body.error.field).toBe('more_Myr');
  await request(stack.app).post(`/api/runs/${id}/extend`).set(auth).send({ more_Myr: 10, extra: 1 }).expect(400);
  await request(stack.app).post(`/api/runs/${id}/extend`).set(otherAuth).send({ more_Myr: 10 }).expect(404);

  const res = await request(stack.app).post(`/api/runs/${id}/extend`).set(auth).send({ more_Myr: 10 }).expect(202);
  expect(res.body.status).toBe('queued');
  expect(res.body.steps).toBe(150);
  // While it runs again it cannot be extended a second time.
  await request(stack.app).post(`/api/runs/${id}/extend`).set(auth).send({ more_Myr: 10 }).expect(409);

  const run = await finished(id);
  expect(run.steps).toBe(150);
  expect(run.spec.duration_Myr).toBe(30);
  const frames = await stack.orm.em.fork().find(RunSnapshot, { run: id }, { orderBy: { frame: 'asc' } });
  const steps = frames.map((f) => f.step);
  expect(steps).toEqual([0, 10, 20, 30, 40, 50, 60, 70, 80, 90, 100, 110, 120, 130, 140, 150]);
  // The extended run's last frame is the one an uninterrupted 30 Myr run ends with (leapfrog's
  // state is a function of the step alone).
  const longer = parseRunSpec({ ...spec, duration_Myr: 30 });
  if (!longer.ok) throw new Error('spec');
  const whole = runSimulation(longer.spec);
  expect(Buffer.compare(frames[frames.length - 1].positions as Buffer, Buffer.from(whole.snapshots[whole.snapshots.length - 1].positions.buffer))).toBe(0);
  // Charged once for the first 100 steps and once for the 50 more: the cost of the longer run.
  expect((await ledger()) - before).toBe(estimateInteractions(longer.spec));
  expect(run.costInteractions).toBe(estimateInteractions(longer.spec));
});
