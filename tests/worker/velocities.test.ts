// A run's frames keep velocities, and its output says who the frame particles are: through a
// pool thread (as the worker runs it) and into PostgreSQL, equal to the engine's own numbers.
import { randomUUID } from 'node:crypto';
import { openTestStack, uniqueLogin, type TestStack } from '../support/stack';
import { Run, RunOutput, RunSnapshot, User } from '../../server/db/entities';
import { storeResult } from '../../worker/store';
import { ENGINE_VERSION, runSimulation } from '../../shared/engine';
import { defaultRunSpec, particleCount, stepCount, type RunSpec } from '../../shared/spec';
import { RunPool } from '../../worker/pool';

jest.setTimeout(60_000);

let stack: TestStack;
let pool: RunPool;

beforeAll(async () => {
  stack = await openTestStack();
  pool = new RunPool(1);
});

afterAll(async () => {
  await pool.close();
  await stack.close();
});

// An encounter of two spheres, so the frames hold two labelled components.
const spec: RunSpec = {
  ...defaultRunSpec(),
  model: {
    kind: 'encounter',
    primary: { kind: 'plummer', n: 120, mass_Msun: 1e10, scale_kpc: 1 },
    secondary: { kind: 'hernquist', n: 60, mass_Msun: 5e9, scale_kpc: 0.8 },
    pericentre_kpc: 5,
    initialSeparation_kpc: 20,
    primaryTilt_deg: 0,
    secondaryTilt_deg: 30,
  },
  duration_Myr: 6,
  snapshotEvery: 5,
} as RunSpec;

const plain = (a: ArrayLike<number> | undefined) => (a ? Array.from(a) : a);

test('frames from a pool thread carry velocities equal to the engine run in this process', async () => {
  const fromThread = await pool.start(spec, () => undefined).result;
  const here = runSimulation(spec, { snapshotVelocities: true });
  expect(fromThread.snapshots.length).toBeGreaterThan(2);
  expect(fromThread.snapshots.length).toBe(here.snapshots.length);
  fromThread.snapshots.forEach((f, k) => {
    expect(f.velocities).toHaveLength(3 * fromThread.snapshotParticles.length);
    expect(plain(f.velocities)).toEqual(plain(here.snapshots[k].velocities));
  });
  expect(plain(fromThread.snapshotMasses)).toEqual(plain(here.snapshotMasses));

  // Stored, the bytes read back as the same velocities, with ids, masses and components beside them.
  const em = stack.orm.em.fork();
  const login = uniqueLogin('velocities');
  const owner = em.create(User, { providerId: login, login, name: 'Velocity Test', role: 'researcher' });
  const run = em.create(Run, {
    id: randomUUID(), owner, name: 'velocities (invented)', spec, modelKind: spec.model.kind, lawKind: spec.law.kind,
    particles: particleCount(spec), steps: stepCount(spec), costInteractions: 0, status: 'running',
  });
  await em.flush();
  await storeResult(stack.orm.em.fork(), run.id, fromThread);

  const check = stack.orm.em.fork();
  const rows = await check.find(RunSnapshot, { run: run.id }, { orderBy: { frame: 'asc' } });
  expect(rows).toHaveLength(here.snapshots.length);
  const float32 = (b: unknown) => Array.from(new Float32Array(Uint8Array.from(b as Uint8Array).buffer));
  rows.forEach((r, k) => expect(float32(r.velocities)).toEqual(plain(here.snapshots[k].velocities)));
  const output = await check.findOneOrFail(RunOutput, { run: run.id });
  expect(Array.from(new Uint32Array(Uint8Array.from(output.particleIds as Uint8Array).buffer))).toEqual(here.snapshotParticles);
  expect(Array.from(new Float64Array(Uint8Array.from(output.masses as Uint8Array).buffer))).toEqual(plain(here.snapshotMasses));
  expect(output.components).toEqual(here.components);
  expect((output.components as { label: string }[]).map((c) => c.label)).toEqual(['primary Plummer sphere', 'secondary Hernquist sphere']);
  expect(output.engineVersion).toBe(ENGINE_VERSION);
});
