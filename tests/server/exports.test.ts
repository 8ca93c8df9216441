// The snapshot download: a run goes through the worker, its HDF5 file comes back through the
// API and is read with h5wasm's reader; access follows the run's; older rows still export.
import { randomUUID } from 'node:crypto';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import request from 'supertest';
import { Worker } from 'bullmq';
import { openAuthStack, userWithToken, type AuthStack } from './auth/harness';
import { config } from '../../server/config';
import { redisConnection, type RunJobData } from '../../server/queue';
import { Run, RunOutput, RunSnapshot, type User } from '../../server/db/entities';
import { planSnapshotFile } from '../../server/services/exports';
import { RunPool } from '../../worker/pool';
import { runProcessor } from '../../worker/processor';
import { outputData } from '../../worker/store';
import { ENGINE_VERSION, runSimulation } from '../../shared/engine';
import { defaultRunSpec, parseRunSpec, type RunSpec } from '../../shared/spec';
import { SNAPSHOT_FILE } from '../../shared/api/snapshots';
import { readHdf5, type H5Dump } from '../support/hdf5';

jest.setTimeout(240_000); // the machine may be busy: the run itself takes about a second

let s: AuthStack;
let pool: RunPool;
let worker: Worker<RunJobData>;
let owner: { user: User; auth: { Authorization: string } };
let other: { auth: { Authorization: string } };
const tmp = fs.mkdtempSync(path.join(os.tmpdir(), 'infall-export-test-'));

// A disk with a bulge, so the file has two components; small enough to run in seconds.
const spec: RunSpec = (() => {
  const parsed = parseRunSpec({
    ...defaultRunSpec(),
    name: 'Export check (invented)',
    model: { kind: 'disk', n: 240, mass_Msun: 2e10, scaleLength_kpc: 2, scaleHeight_kpc: 0.2, bulge: { mass_Msun: 4e9, scale_kpc: 0.4 } },
    timestep_Myr: 0.5,
    duration_Myr: 10,
    softening_kpc: 0.1,
    snapshotEvery: 4,
  });
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.issues));
  return parsed.spec;
})();

beforeAll(async () => {
  s = await openAuthStack(55543);
  pool = new RunPool(1);
  worker = new Worker<RunJobData>(config.queueName, runProcessor({ orm: s.orm, pool }), { connection: redisConnection });
  owner = await userWithToken(s, 'researcher', 'export');
  other = await userWithToken(s, 'researcher', 'export-other');
});

afterAll(async () => {
  await worker.close();
  await pool.close();
  await s.queue.obliterate({ force: true });
  await s.close();
  fs.rmSync(tmp, { recursive: true, force: true });
});

async function finishedRun(): Promise<string> {
  const res = await request(s.app).post('/api/runs').set(owner.auth).send({ name: 'Export check (invented)', spec }).expect(201);
  const id = res.body.runs[0].id as string;
  for (const started = Date.now(); Date.now() - started < 200_000; ) {
    const run = (await request(s.app).get(`/api/runs/${id}`).set(owner.auth).expect(200)).body;
    if (run.status === 'finished') return id;
    if (run.status === 'failed' || run.status === 'cancelled') throw new Error(`run ended ${run.status}: ${run.error}`);
    await new Promise((r) => setTimeout(r, 100));
  }
  throw new Error('run did not finish in time');
}

const binary = (res: NodeJS.ReadableStream, done: (err: Error | null, body: Buffer) => void) => {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => done(null, Buffer.concat(chunks)));
};

async function download(id: string, auth: { Authorization: string }): Promise<{ dump: H5Dump; headers: Record<string, string> }> {
  const res = await request(s.app).get(`/api/runs/${id}/snapshots.h5`).set(auth).buffer(true).parse((r, done) => binary(r as unknown as NodeJS.ReadableStream, done)).expect(200);
  const file = path.join(tmp, `${id}.h5`);
  fs.writeFileSync(file, res.body as Buffer);
  return { dump: await readHdf5(file), headers: res.headers as Record<string, string> };
}

describe('the HDF5 snapshot file', () => {
  let id: string;
  let dump: H5Dump;
  let headers: Record<string, string>;
  const engine = runSimulation(spec, { snapshotVelocities: true }); // same spec, same numbers, bit for bit

  beforeAll(async () => {
    id = await finishedRun();
    ({ dump, headers } = await download(id, owner.auth));
  });

  test('is served as an HDF5 attachment named after the run', () => {
    expect(headers['content-type']).toMatch(/^application\/x-hdf5/);
    expect(headers['content-disposition']).toMatch(/^attachment; filename="?infall-export-check-invented-snapshots\.h5"?$/);
  });

  test('says what it is, which engine made it, and carries the spec, which round-trips', async () => {
    expect(dump.attrs).toMatchObject({
      format: SNAPSHOT_FILE.format,
      format_version: SNAPSHOT_FILE.version,
      run_id: id,
      run_status: 'finished',
      engine_version: ENGINE_VERSION,
      velocities_stored: 1,
      particles_in_run: 240,
      length_units: 'kpc',
      velocity_units: 'km/s',
      mass_units: 'Msun',
      time_units: 'Myr',
    });
    expect(dump.attrs.note).toBeUndefined();
    const stored = (await request(s.app).get(`/api/runs/${id}`).set(owner.auth).expect(200)).body.spec;
    const fromFile = JSON.parse(dump.attrs.spec as string);
    expect(fromFile).toEqual(stored);
    expect(parseRunSpec(fromFile)).toEqual({ ok: true, spec: stored });
  });

  test('holds every frame and particle in the documented shapes, each with units', () => {
    const F = engine.snapshots.length;
    const n = engine.snapshotParticles.length;
    expect(F).toBeGreaterThan(2);
    const d = dump.datasets;
    expect(d['frames/position'].shape).toEqual([F, n, 3]);
    expect(d['frames/velocity'].shape).toEqual([F, n, 3]);
    expect(d['frames/step'].shape).toEqual([F]);
    expect(d['frames/time'].shape).toEqual([F]);
    expect(d['particles/id'].shape).toEqual([n]);
    expect(d['particles/mass'].shape).toEqual([n]);
    expect(d['particles/component'].shape).toEqual([n]);
    for (const { path: p, units } of Object.values(SNAPSHOT_FILE.datasets)) {
      expect({ p, units: d[p].attrs.units, described: typeof d[p].attrs.description }).toEqual({ p, units, described: 'string' });
    }
    expect(d['frames/position'].attrs.units).toBe('kpc');
    expect(d['frames/velocity'].attrs.units).toBe('km/s');
    expect(d['particles/mass'].attrs.units).toBe('Msun');
    expect(d['frames/time'].attrs.units).toBe('Myr');
  });

  test("positions, velocities, masses and ids equal the engine's for the same spec", () => {
    const d = dump.datasets;
    // Typed arrays from the reader's thread are compared as plain arrays: exact float32 equality.
    const flat = (key: 'positions' | 'velocities') => engine.snapshots.flatMap((f) => Array.from(f[key]!));
    expect(Array.from(d['frames/velocity'].value as Float32Array)).toEqual(flat('velocities'));
    expect(Array.from(d['frames/position'].value as Float32Array)).toEqual(flat('positions'));
    expect(Array.from(d['frames/step'].value as Uint32Array)).toEqual(engine.snapshots.map((f) => f.step));
    expect(Array.from(d['frames/time'].value as Float64Array)).toEqual(engine.snapshots.map((f) => f.time_Myr));
    expect(Array.from(d['particles/id'].value as Uint32Array)).toEqual(engine.snapshotParticles);
    expect(Array.from(d['particles/mass'].value as Float64Array)).toEqual(engine.snapshotMasses);
    // The velocities move: the last frame differs from the first.
    const v = d['frames/velocity'].value as Float32Array;
    const per = engine.snapshotParticles.length * 3;
    expect(Array.from(v.subarray(0, per))).not.toEqual(Array.from(v.subarray(v.length - per)));
  });

  test('labels each particle with its component', () => {
    const comp = dump.datasets['particles/component'];
    expect(comp.attrs.labels).toEqual(['disk', 'bulge']);
    const ids = dump.datasets['particles/id'].value as Uint32Array;
    const codes = Array.from(comp.value as Uint8Array);
    const [disk, bulge] = engine.components;
    codes.forEach((c, k) => expect([k, c]).toEqual([k, ids[k] >= bulge.start && ids[k] < bulge.start + bulge.count ? 1 : 0]));
    expect(codes.filter((c) => c === 1)).toHaveLength(bulge.count);
    expect(codes.filter((c) => c === 0)).toHaveLength(disk.count);
  });

  test('is refused to another researcher and to anyone not signed in, as for the run itself', async () => {
    const res = await request(s.app).get(`/api/runs/${id}/snapshots.h5`).set(other.auth).expect(404);
    expect(res.body.error.code).toBe('NOT_FOUND');
    await request(s.app).get(`/api/runs/${id}/snapshots.h5`).expect(401);
  });

  test('larger than the size cap is refused with the sizes named', async () => {
    const run = await s.em().findOneOrFail(Run, { id });
    await expect(planSnapshotFile(s.em(), run, 10_000)).rejects.toMatchObject({ code: 'PAYLOAD_TOO_LARGE', message: expect.stringMatching(/MiB, over this server's 0 MiB limit/) });
    expect((await planSnapshotFile(s.em(), run, config.exportMaxBytes)).bytes).toBeGreaterThan(engine.snapshots.length * 240 * 24);
  });
});

describe('runs without a complete snapshot record', () => {
  test('a run stored before velocities were kept exports its positions and says what is missing', async () => {
    // Rows as the schema before velocities held them: positions only, no ids, masses or engine.
    const em = s.em();
    const legacy = em.create(Run, {
      id: randomUUID(), owner: owner.user.id, name: 'Old run (invented)', spec, modelKind: 'disk', lawKind: 'newton',
      particles: 240, steps: 20, costInteractions: 0, status: 'finished', progress: 1, finishedAt: new Date(),
    });
    em.create(RunOutput, { run: legacy.id, ...outputData(runSimulation(spec)), snapshotParticles: 2 });
    const frames = [new Float32Array([1, 2, 3, 4, 5, 6]), new Float32Array([1.5, 2.5, 3.5, 4.5, 5.5, 6.5])];
    frames.forEach((p, frame) => em.create(RunSnapshot, { run: legacy.id, frame, step: frame * 4, timeMyr: frame * 2, positions: Buffer.from(p.buffer) }));
    await em.flush();

    const { dump } = await download(legacy.id, owner.auth);
    expect(dump.attrs).toMatchObject({ velocities_stored: 0, engine_version: 'not recorded', particles_in_file: 2 });
    expect(dump.attrs.note).toMatch(/stored before Infall kept velocities/);
    expect(dump.datasets['frames/velocity']).toBeUndefined();
    expect(dump.datasets['particles/mass']).toBeUndefined();
    expect(dump.datasets['frames/position'].shape).toEqual([2, 2, 3]);
    expect(Array.from(dump.datasets['frames/position'].value as Float32Array)).toEqual([...frames[0], ...frames[1]]);
    expect(Array.from(dump.datasets['frames/step'].value as Uint32Array)).toEqual([0, 4]);
  });

  test('a queued run has nothing to export yet, and says so', async () => {
    const em = s.em();
    const queued = em.create(Run, {
      id: randomUUID(), owner: owner.user.id, name: 'Waiting (invented)', spec, modelKind: 'disk', lawKind: 'newton',
      particles: 240, steps: 20, costInteractions: 0,
    });
    await em.flush();
    const res = await request(s.app).get(`/api/runs/${queued.id}/snapshots.h5`).set(owner.auth).expect(409);
    expect(res.body.error).toMatchObject({ code: 'CONFLICT', message: expect.stringMatching(/no stored snapshots: it is queued/) });
  });
});
