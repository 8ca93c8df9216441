// The run API through supertest against real PostgreSQL and Redis, with a worker
// in this process so a run goes all the way from submit to stored results.
import request from 'supertest';
import { Worker } from 'bullmq';
import { openAuthStack, userWithToken, type AuthStack } from './auth/harness';
import { config } from '../../server/config';
import { redisConnection, type RunJobData } from '../../server/queue';
import { RunPool } from '../../worker/pool';
import { runProcessor } from '../../worker/processor';
import { startHeartbeat } from '../../worker/heartbeat';
import { defaultRunSpec } from '../../shared/spec';
import { decodeSnapshots } from '../../shared/api/snapshots';

jest.setTimeout(90_000);

let s: AuthStack;
let pool: RunPool;
let heartbeat: { stop(): Promise<void> };
let worker: Worker<RunJobData> | null = null;
let auth: { Authorization: string };
let otherAuth: { Authorization: string };

beforeAll(async () => {
  s = await openAuthStack(55531);
  pool = new RunPool(1);
  heartbeat = startHeartbeat(pool, 1);
  auth = (await userWithToken(s, 'researcher', 'runs')).auth;
  otherAuth = (await userWithToken(s, 'researcher', 'runs-other')).auth;
});

afterAll(async () => {
  await heartbeat.stop();
  await worker?.close();
  await pool.close();
  await s.queue.obliterate({ force: true });
  await s.close();
});

const small = () => ({ ...defaultRunSpec(), duration_Myr: 20, snapshotEvery: 5 });

function parseEvents(text: string): { event: string; data: any }[] {
  return text
    .split('\n\n')
    .map((block) => {
      const event = /^event: (.+)$/m.exec(block)?.[1];
      const data = /^data: (.+)$/m.exec(block)?.[1];
      return event && data ? { event, data: JSON.parse(data) } : null;
    })
    .filter((e): e is { event: string; data: any } => e !== null);
}

describe('submitting runs', () => {
  test('a malformed spec gets 400 naming the bad field, and nothing is stored', async () => {
    const before = await s.em().count('Run', {});
    const bad = { ...small(), model: { ...small().model, n: -5 } };
    const res = await request(s.app).post('/api/runs').set(auth).send({ spec: bad }).expect(400);
    expect(res.body.error.code).toBe('INVALID_SPEC');
    expect(res.body.error.field).toBe('spec.model.n');
    expect(res.body.error.message).toMatch(/spec\.model\.n/);
    expect(await s.em().count('Run', {})).toBe(before);
  });

  test('an unknown force law is named in the error', async () => {
    const res = await request(s.app).post('/api/runs').set(auth).send({ spec: { ...small(), law: { kind: 'phlogiston' } } }).expect(400);
    expect(res.body.error.field).toMatch(/^spec\.law/);
  });

  test('a body that is not JSON, or has unknown keys, gets 400 with a code, never a 500', async () => {
    const notJson = await request(s.app).post('/api/runs').set(auth).set('Content-Type', 'application/json').send('{"spec": ').expect(400);
    expect(notJson.body.error.code).toBe('BAD_REQUEST');
    const extra = await request(s.app).post('/api/runs').set(auth).send({ spec: small(), priority: 'high' }).expect(400);
    expect(extra.body.error.code).toBe('BAD_REQUEST');
  });

  test('without sign-in the API answers 401 in JSON', async () => {
    const res = await request(s.app).post('/api/runs').send({ spec: small() }).expect(401);
    expect(res.body.error.code).toBe('UNAUTHENTICATED');
  });

  test('a pair shares one pair id, keeps the initial conditions and differs only in the law', async () => {
    const res = await request(s.app)
      .post('/api/runs')
      .set(auth)
      .send({ name: 'pair check', spec: small(), pairLaw: { kind: 'mond', interpolation: 'simple' } })
      .expect(201);
    const [a, b] = res.body.runs;
    expect(a.pairId).toBeTruthy();
    expect(b.pairId).toBe(a.pairId);
    expect([a.lawKind, b.lawKind]).toEqual(['newton', 'mond']);
    const [da, db] = await Promise.all([a, b].map((r) => request(s.app).get(`/api/runs/${r.id}`).set(auth).expect(200)));
    expect(da.body.spec.model).toEqual(db.body.spec.model);
    expect(da.body.spec.seed).toBe(db.body.spec.seed);
    // Cancel them while queued: the queue has no worker yet.
    for (const r of [a, b]) {
      const c = await request(s.app).post(`/api/runs/${r.id}/cancel`).set(auth).expect(202);
      expect(c.body.status).toBe('cancelled');
    }
  });

  test('a pair under the same law twice is refused', async () => {
    const res = await request(s.app).post('/api/runs').set(auth).send({ spec: small(), pairLaw: { kind: 'newton' } }).expect(400);
    expect(res.body.error.field).toBe('pairLaw');
  });
});

describe('reading runs', () => {
  test("another user's run reads as missing, and a malformed id too", async () => {
    const res = await request(s.app).post('/api/runs').set(auth).send({ spec: small() }).expect(201);
    const id = res.body.runs[0].id;
    await request(s.app).get(`/api/runs/${id}`).set(otherAuth).expect(404);
    const bad = await request(s.app).get('/api/runs/not-a-uuid').set(auth).expect(404);
    expect(bad.body.error.code).toBe('NOT_FOUND');
    await request(s.app).post(`/api/runs/${id}/cancel`).set(auth).expect(202);
    const again = await request(s.app).post(`/api/runs/${id}/cancel`).set(auth).expect(409);
    expect(again.body.error.code).toBe('CONFLICT');
  });

  test('a bad list filter is a 400 naming the query field', async () => {
    const res = await request(s.app).get('/api/runs?status=sleeping').set(auth).expect(400);
    expect(res.body.error.field).toBe('status');
  });

  test('unknown API paths answer 404 in JSON; health reports database and queue', async () => {
    const res = await request(s.app).get('/api/nothing-here').expect(404);
    expect(res.body.error.code).toBe('NOT_FOUND');
    // Anonymous callers get the status alone; this file's worker beats, so all is well.
    const health = await request(s.app).get('/api/health').expect(200);
    expect(health.body).toEqual({ status: 'ok' });
  });
});

describe('a run from submit to results', () => {
  test('progress streams as server-sent events and the results come back from the API', async () => {
    const res = await request(s.app).post('/api/runs').set(auth).send({ name: 'whole path', spec: small() }).expect(201);
    const id: string = res.body.runs[0].id;

    // The stream opens before any worker exists, so it sees the run from queued to finished.
    const stream = request(s.app).get(`/api/runs/${id}/events`).set(auth).buffer(true).parse((r, cb) => {
      let text = '';
      r.on('data', (c: Buffer) => (text += c.toString()));
      r.on('end', () => cb(null, text));
    });
    const streamed = stream.then((r) => r.body as string);
    await new Promise((r) => setTimeout(r, 300));
    worker = new Worker<RunJobData>(config.queueName, runProcessor({ orm: s.orm, pool }), { connection: redisConnection });

    const events = parseEvents(await streamed);
    expect(events[0]).toMatchObject({ event: 'state', data: { id, status: 'queued' } });
    const progress = events.filter((e) => e.event === 'progress').map((e) => e.data);
    expect(progress.length).toBeGreaterThan(1);
    expect(progress.at(-1).percent).toBe(100);
    expect(progress.every((p, i) => i === 0 || p.step >= progress[i - 1].step)).toBe(true);
    expect(events.at(-2)).toMatchObject({ event: 'state', data: { status: 'finished' } });
    expect(events.at(-1)).toMatchObject({ event: 'end', data: { status: 'finished' } });

    const detail = await request(s.app).get(`/api/runs/${id}`).set(auth).expect(200);
    expect(detail.body.status).toBe('finished');
    expect(detail.body.spec.model.kind).toBe('plummer');
    expect(detail.body.output.diagnostics.length).toBeGreaterThan(2);
    const frames = detail.body.output.frames;
    expect(frames.length).toBeGreaterThan(1);

    const snap = await request(s.app).get(`/api/runs/${id}/snapshots`).set(auth).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    }).expect(200);
    const decoded = decodeSnapshots(new Uint8Array(snap.body as Buffer));
    expect(decoded.map((f) => f.step)).toEqual(frames.map((f: { step: number }) => f.step));

    // A finished run's stream answers at once with its state and end.
    const late = await request(s.app).get(`/api/runs/${id}/events`).set(auth).expect(200);
    expect(parseEvents(late.text).map((e) => e.event)).toEqual(['state', 'state', 'end']);
  });
});
