// A hung run thread is terminated and the pool goes on; a job BullMQ gives up on fails
// its run for good with the reason. Real piscina threads, real BullMQ on Redis, real PostgreSQL.
import { execFileSync } from 'node:child_process';
import { Worker } from 'bullmq';
import { openTestStack, uniqueLogin, type TestStack } from '../support/stack';
import { config } from '../../server/config';
import { redisConnection, RUN_ATTEMPTS, type RunJobData } from '../../server/queue';
import { Run, User } from '../../server/db/entities';
import { submitRuns } from '../../server/services/runs';
import { defaultRunSpec, parseRunSpec, type RunSpec } from '../../shared/spec';
import { RunPool } from '../../worker/pool';
import { failForGood } from '../../worker/processor';

jest.setTimeout(90_000);

let stack: TestStack;
beforeAll(async () => {
  stack = await openTestStack();
});
afterAll(async () => {
  await stack.queue.obliterate({ force: true });
  await stack.close();
});

function plummer(n: number, steps: number): RunSpec {
  const r = parseRunSpec({ ...defaultRunSpec(), model: { kind: 'plummer', n, mass_Msun: 1e10, scale_kpc: 1 }, timestep_Myr: 0.1, duration_Myr: 0.1 * steps, snapshotEvery: steps });
  if (!r.ok) throw new Error(JSON.stringify(r.issues));
  return r.spec;
}

// This process's zombie children, by pid: other test files in the same Jest process may have left
// some already (threads of their own that loaded tsx), which are not this pool's.
const zombies = () =>
  execFileSync('ps', ['-o', 'pid=,stat=,args=', '--ppid', String(process.pid)], { encoding: 'utf8' })
    .trim()
    .split('\n')
    .filter((line) => /^\s*\d+\s+Z/.test(line));

test('a thread that sends no progress within its limit is terminated; the run fails with the reason, the pool takes the next run, and no ended thread leaves a zombie process', async () => {
  const before = new Set(zombies());
  const pool = new RunPool(1);
  try {
    // 30,000 particles: the first progress report waits for the initial energy, about 4.5e8
    // pair terms, far longer than the 1 s limit given here.
    const hung = pool.start(plummer(30_000, 1), () => undefined, undefined, { stallMs: 1000 });
    await expect(hung.result).rejects.toThrow('the run sent no progress for 1 s and its thread was terminated');
    expect(pool.watch.terminated).toBe(1);
    const next = await pool.start(plummer(50, 4), () => undefined).result;
    expect(next.cancelled).toBe(false);
    expect(next.summary.stepsCompleted).toBe(4);
  } finally {
    await pool.close();
  }
  // Neither the terminated thread nor the ones the close ended left a process behind: a thread
  // that loaded tsx left its esbuild service as a zombie each time (seen before threads ran the bundle).
  await new Promise((r) => setTimeout(r, 500));
  expect(zombies().filter((line) => !before.has(line))).toEqual([]);
});

test('a run cancelled while its huge model is still being set up stops by itself, before the first force sum, without the watchdog', async () => {
  const pool = new RunPool(1);
  try {
    // The largest model by direct sum: sampling takes well under a second, the first force sum and
    // initial diagnostics far longer than the 10 s a cancelled thread gets before it is terminated.
    const huge = pool.start(plummer(100_000, 1), () => undefined);
    huge.cancel(); // set before the thread has finished sampling
    await expect(huge.result).rejects.toThrow('the run was cancelled while its initial conditions were being set up');
    expect(pool.watch.terminated).toBe(0);
  } finally {
    await pool.close();
  }
});

test('a job that keeps throwing is retried, then its run is failed for good with the reason', async () => {
  const em = stack.orm.em.fork();
  const login = uniqueLogin('poison');
  const user = em.create(User, { providerId: login, login, name: 'Poison Test', role: 'researcher' });
  await em.flush();
  const [summary] = await submitRuns(em, stack.queue, user, { spec: plummer(50, 4) });
  // The queue's own retry policy applies: backing off 5 s, then 10 s.
  let tries = 0;
  const worker = new Worker<RunJobData>(
    config.queueName,
    async () => {
      tries++;
      throw new Error('the database went away while the result was written');
    },
    { connection: redisConnection },
  );
  worker.on('failed', (j, err) => j && void failForGood(stack.orm, j, err));
  try {
    await new Promise<void>((resolve) => {
      const check = async () => {
        const run = await stack.orm.em.fork().findOneOrFail(Run, { id: summary.id });
        if (run.status === 'failed') return resolve();
        setTimeout(check, 100);
      };
      void check();
    });
    const run = await stack.orm.em.fork().findOneOrFail(Run, { id: summary.id });
    expect(tries).toBe(RUN_ATTEMPTS);
    expect(run.error).toBe(`The run failed for good after ${RUN_ATTEMPTS} attempts: the database went away while the result was written`);
  } finally {
    await worker.close();
  }
});
