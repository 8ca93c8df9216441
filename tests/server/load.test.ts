// A few seconds of `npm run load` against this process's server and worker: every section runs,
// nothing errs, every accepted run ends. No timing is asserted (speed is for `npm run load`).
import type { AddressInfo } from 'node:net';
import type { Server } from 'node:http';
import { Worker } from 'bullmq';
import { openAuthStack, type AuthStack } from './auth/harness';
import { config } from '../../server/config';
import { redisConnection, type RunJobData } from '../../server/queue';
import { RunPool } from '../../worker/pool';
import { runProcessor } from '../../worker/processor';
import request from 'supertest';
import { formatReport, runLoad } from '../load/load';
import { signIn } from '../support/auth';
import { uniqueLogin } from '../support/stack';
import { Session } from '../../server/db/entities';

jest.setTimeout(120_000);

let s: AuthStack;
let server: Server;
let pool: RunPool;
let worker: Worker<RunJobData>;

beforeAll(async () => {
  s = await openAuthStack(55537);
  server = s.app.listen(0, '127.0.0.1');
  await new Promise((resolve) => server.once('listening', resolve));
  pool = new RunPool(1);
  worker = new Worker<RunJobData>(config.queueName, runProcessor({ orm: s.orm, pool }), { connection: redisConnection, concurrency: 1 });
});

afterAll(async () => {
  await worker.close();
  await pool.close();
  server.closeAllConnections();
  await new Promise((resolve) => server.close(resolve));
  await s.queue.obliterate({ force: true });
  await s.close();
});

test('a small load run: cookie and token reads, event-stream watchers and parallel submissions all answer, and every accepted run ends', async () => {
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const report = await runLoad({ url, orm: s.orm, seconds: 2, connections: 8, watchers: 12, submissions: 12, people: 3, settleSeconds: 90 });
  expect(formatReport(report)).toMatch(/cookie p50 \/ token p50/);
  for (const list of [report.runsListCookie, report.runsListToken]) {
    expect(list.errors).toBe(0);
    expect(list.non2xx).toBe(0);
    expect(list.requestsPerSecond).toBeGreaterThan(0);
    // Percentiles of the answers' own times, in order (no figure stands in for another).
    expect(Number.isFinite(list.p50)).toBe(true);
    expect(list.p50).toBeLessThanOrEqual(list.p95);
    expect(list.p95).toBeLessThanOrEqual(list.p99);
  }
  expect(report.watchers).toMatchObject({ opened: 12, errors: 0, sawEnd: 12 });
  expect(report.submissions).toMatchObject({ accepted: 12, refused: 0, errors: 0, notFinal: 0 });
  expect(report.submissions.finalWithin).toBeGreaterThanOrEqual(12);
});

test('a cookie-session read writes nothing to the session table (no touch on every request)', async () => {
  const agent = request.agent(s.app);
  await signIn(agent, uniqueLogin('touch'));
  const expiries = async () => (await s.em().find(Session, {}, { fields: ['sid', 'expire'], disableIdentityMap: true })).map((r) => `${r.sid}:${r.expire.toISOString()}`).sort();
  const before = await expiries();
  await new Promise((r) => setTimeout(r, 1100)); // a touch would move an expiry by at least this
  await agent.get('/api/runs').expect(200);
  await agent.get('/api/runs').expect(200);
  expect(await expiries()).toEqual(before);
});
