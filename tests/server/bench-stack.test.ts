// Smoke test of the bench's stack sections (tests/bench/stack.ts) at tiny sizes,
// against this process's server and worker on the test run's PostgreSQL and Redis.
// The client-animation section needs the web export and Chromium, so it is left
// to `npm run bench` itself.
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { Worker } from 'bullmq';
import { openTestStack, uniqueLogin, type TestStack } from '../support/stack';
import { config } from '../../server/config';
import { redisConnection, type RunJobData } from '../../server/queue';
import { User } from '../../server/db/entities';
import { createToken } from '../../server/services/tokens';
import { RunPool } from '../../worker/pool';
import { runProcessor } from '../../worker/processor';
import { benchStackSections } from '../bench/bench';

jest.setTimeout(120_000);

let stack: TestStack;
let server: Server;
let pool: RunPool;
let worker: Worker<RunJobData>;

beforeAll(async () => {
  stack = await openTestStack();
  server = stack.app.listen(0, '127.0.0.1');
  await new Promise((resolve) => server.once('listening', resolve));
  pool = new RunPool(1);
  worker = new Worker<RunJobData>(config.queueName, runProcessor({ orm: stack.orm, pool }), { connection: redisConnection });
});

afterAll(async () => {
  await worker.close();
  await pool.close();
  await new Promise((resolve) => server.close(resolve));
  await stack.queue.obliterate({ force: true });
  await stack.close();
});

test('end-to-end and snapshot sections give finite figures through a token-authenticated API', async () => {
  const em = stack.orm.em.fork();
  const login = uniqueLogin('bench');
  const user = em.create(User, { providerId: login, login, name: 'Bench smoke', role: 'researcher' });
  await em.flush();
  const { secret } = await createToken(em, user, { name: 'bench', expiresInDays: 1 });
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;

  const { e2e, snapshot } = await benchStackSections({ url, token: secret }, { particles: 150, steps: 20, bigParticles: 300, bigSteps: 10 });
  expect(e2e.firstProgressMs).toBeGreaterThan(0);
  expect(e2e.diskRunSeconds * 1000).toBeGreaterThanOrEqual(e2e.firstProgressMs);
  expect(Number.isFinite(e2e.diskRunSeconds)).toBe(true);
  expect(e2e.bigDiskRunSeconds).toBeGreaterThan(0);
  expect(Number.isFinite(e2e.bigDiskRunSeconds)).toBe(true);
  // uint16 x, y, z: 6 bytes a particle, plus the component list and the frame and file headers spread over them.
  expect(snapshot.particles).toBe(150);
  expect(snapshot.bytesPerParticle).toBeGreaterThan(6);
  expect(snapshot.bytesPerParticle).toBeLessThanOrEqual(8);
});
