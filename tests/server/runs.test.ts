// The run API through supertest against real PostgreSQL and Redis, with a worker
// in this process so a run goes all the way from submit to stored results.
import request from 'supertest';
import { Worker } from 'bullmq';
import { openAuthStack, userWithToken, type AuthStack } from './auth/harness';
import { config } from '../../server/config';
import { redisConnection, RunEndAnnouncer, type RunJobData } from '../../server/queue';
import { Run } from '../../server/db/entities';
import { RunPool } from '../../worker/pool';
import { runProcessor } from '../../worker/processor';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { startHeartbeat } from '../../worker/heartbeat';
import { defaultRunSpec, NAME_MAX_LENGTH } from '../../shared/spec';
import { decodeSnapshots } from '../../shared/api/snapshots';
import * as runsService from '../../server/services/runs';

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

describe('naming runs', () => {
  // Runs made here are cancelled at once, so the worker of the last test never takes them.
  async function submit(body: object, expected: number) {
    const res = await request(s.app).post('/api/runs').set(auth).send(body).expect(expected);
    if (expected === 201) for (const r of res.body.runs) await request(s.app).post(`/api/runs/${r.id}/cancel`).set(auth).expect(202);
    return res;
  }

  test('the README example, submitted as its curl line sends it, is stored under its own name', async () => {
    const readme = readFileSync(join(__dirname, '../../README.md'), 'utf8');
    const example = JSON.parse(/```json\n([\s\S]*?)```/.exec(readme)![1]);
    expect(typeof example.name).toBe('string');
    const res = await submit({ spec: example }, 201);
    expect(res.body.runs[0].name).toBe(example.name);
    const detail = await request(s.app).get(`/api/runs/${res.body.runs[0].id}`).set(auth).expect(200);
    expect(detail.body.name).toBe(example.name);
    expect(detail.body.spec.name).toBe(example.name);
  });

  test('a name beside the spec is kept in the stored spec too; a pair adds each law to it', async () => {
    const res = await submit({ name: '  Wren pair (invented)  ', spec: small(), pairLaw: { kind: 'mond' } }, 201);
    expect(res.body.runs.map((r: { name: string }) => r.name)).toEqual(['Wren pair (invented) · Newton', 'Wren pair (invented) · MOND (algebraic)']);
    const detail = await request(s.app).get(`/api/runs/${res.body.runs[1].id}`).set(auth).expect(200);
    expect(detail.body.spec.name).toBe('Wren pair (invented)');
  });

  test('the same name in both places is accepted; two different names are a 400 and nothing is stored', async () => {
    const same = await submit({ name: 'Ashfall check', spec: { ...small(), name: 'Ashfall check' } }, 201);
    expect(same.body.runs[0].name).toBe('Ashfall check');
    const before = await s.em().count('Run', {});
    const res = await submit({ name: 'Ashfall check', spec: { ...small(), name: 'Ashfall recheck' } }, 400);
    expect(res.body.error).toMatchObject({ code: 'BAD_REQUEST', field: 'name' });
    expect(res.body.error.message).toContain('spec.name');
    expect(await s.em().count('Run', {})).toBe(before);
  });

  test('one length limit for names, in the spec and beside it', async () => {
    const longest = 'n'.repeat(NAME_MAX_LENGTH);
    expect((await submit({ spec: { ...small(), name: longest } }, 201)).body.runs[0].name).toBe(longest);
    const inSpec = await submit({ spec: { ...small(), name: `${longest}x` } }, 400);
    expect(inSpec.body.error).toMatchObject({ code: 'INVALID_SPEC', field: 'spec.name' });
    expect(inSpec.body.error.message).toContain(`at most ${NAME_MAX_LENGTH} characters`);
    const beside = await submit({ name: `${longest}x`, spec: small() }, 400);
    expect(beside.body.error.field).toBe('name');
    expect(beside.body.error.message).toContain(`at most ${NAME_MAX_LENGTH} characters`);
    const blank = await submit({ spec: { ...small(), name: '   ' } }, 400);
    expect(blank.body.error.field).toBe('spec.name');
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

    // A client that names no wire format (one written for format 1) is told what changed.
    const old = await request(s.app).get(`/api/runs/${id}/snapshots`).set(auth).expect(406);
    expect(old.body.error.message).toMatch(/wire format 2 only \(asked for 1\): reload the page, or add \?format=2/);
    await request(s.app).get(`/api/runs/${id}/snapshots?format=3`).set(auth).expect(406);

    const snap = await request(s.app).get(`/api/runs/${id}/snapshots?format=2`).set(auth).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    }).expect(200);
    const decoded = decodeSnapshots(new Uint8Array(snap.body as Buffer));
    expect(decoded.frames.map((f) => f.step)).toEqual(frames.map((f: { step: number }) => f.step));
    expect(decoded.labels).toEqual(['Plummer sphere']);
    expect(decoded.component.every((c) => c === 0)).toBe(true);

    // A finished run's stream answers at once with its state and end.
    const late = await request(s.app).get(`/api/runs/${id}/events`).set(auth).expect(200);
    expect(parseEvents(late.text).map((e) => e.event)).toEqual(['state', 'state', 'end']);
  });

  test('a stream opened mid-run starts with the progress so far, from step 0', async () => {
    const res = await request(s.app).post('/api/runs').set(auth).send({ spec: { ...small(), duration_Myr: 400 } }).expect(201);
    const id: string = res.body.runs[0].id;
    // Wait until the worker (from the test above) has reported a few samples.
    for (let k = 0; k < 400 && (await s.queue.getJobLogs(id)).count < 3; k++) await new Promise((r) => setTimeout(r, 25));
    const events = parseEvents((await request(s.app).get(`/api/runs/${id}/events`).set(auth).expect(200)).text);
    expect(events[0]).toMatchObject({ event: 'state', data: { status: 'running' } });
    const history = events.find((e) => e.event === 'history')!.data as { step: number; time_Myr: number; energyDrift: number }[];
    expect(history.length).toBeGreaterThanOrEqual(3);
    expect(history[0]).toMatchObject({ step: 0, time_Myr: 0, energyDrift: 0 });
    expect(history.every((p, i) => i === 0 || p.step > history[i - 1].step)).toBe(true);
    // History and live samples together reach the end of the run.
    const live = events.filter((e) => e.event === 'progress').map((e) => e.data);
    expect(Math.max(...[...history, ...live].map((p) => p.step))).toBe(2000);
    expect(events.at(-1)).toMatchObject({ event: 'end', data: { status: 'finished' } });
    // The samples were kept only while the run ran; its stored diagnostics take over.
    expect((await s.queue.getJobLogs(id)).count).toBe(0);
  });

  test('a run that ends while its stream is being opened still closes the stream with its end', async () => {
    // Seen under load (300 watchers): a stream that read the run just before it ended, and began
    // listening just after the end was heard, waited for good. Here the run ends in that moment,
    // between the stream's read of the run and the rest of its opening: another process (a worker,
    // the reconciler) stores its end and announces it once through Redis, and this server hears it.
    await s.queue.pause();
    const announcer = new RunEndAnnouncer();
    try {
      const res = await request(s.app).post('/api/runs').set(auth).send({ name: 'ends while watched', spec: small() }).expect(201);
      const id: string = res.body.runs[0].id;
      const read = runsService.findVisibleRun;
      jest.spyOn(runsService, 'findVisibleRun').mockImplementationOnce(async (em, user, runId) => {
        const run = await read(em, user, runId);
        await s.em().nativeUpdate(Run, { id }, { status: 'failed', error: 'ended elsewhere', finishedAt: new Date() });
        const heard = new Promise<void>((resolve) => {
          const off = s.signals.subscribe(id, (signal) => signal.kind === 'end' && (off(), resolve()));
        });
        await announcer.announce(id);
        await heard;
        return run;
      });
      const events = parseEvents((await request(s.app).get(`/api/runs/${id}/events`).set(auth).timeout(15_000).expect(200)).text);
      expect(events.map((e) => e.event)).toEqual(['state', 'state', 'end']);
      expect(events[0].data.status).toBe('queued');
      expect(events.at(-1)).toMatchObject({ event: 'end', data: { status: 'failed' } });
    } finally {
      await announcer.close();
      jest.restoreAllMocks();
      await s.queue.resume();
    }
  });
});
