// The worker process: takes runs off the BullMQ queue and hands each to a pool thread.
import { hostname } from 'node:os';
import { Worker } from 'bullmq';
import { config } from '../server/config';
import { applyDirectKernelSetting, directKernelInUse } from '../shared/engine';
import { openOrm } from '../server/db/orm';
import { openRunQueue, redisConnection, RunEndAnnouncer, type RunJobData } from '../server/queue';
import { RunPool } from './pool';
import { failForGood, runProcessor } from './processor';
import { startHeartbeat } from './heartbeat';
import { notifyRunEnded } from '../server/services/notifications';
import { reconcile } from './reconciler';
import { runProcess } from '../server/process';

runProcess('worker', async () => {
  // A bad setting stops the worker here with its message rather than failing every run in a thread.
  applyDirectKernelSetting(process.env.INFALL_DIRECT_KERNEL);
  // A worker's result writes can carry many megabytes of frames: no per-statement limit here.
  const orm = await openOrm({ longStatements: true });
  const pool = new RunPool(config.workerThreads);
  const r = config.resilience;
  const worker = new Worker<RunJobData>(
    config.queueName,
    runProcessor({
      orm,
      pool,
      onEnded: (runId) => notifyRunEnded(orm.em.fork(), runId).then(() => undefined),
      checkpointEvery: { steps: r.checkpointSteps, ms: 1000 * r.checkpointSeconds },
      storeRetryMs: 1000 * r.storeRetrySeconds,
    }),
    {
      connection: redisConnection,
      concurrency: config.workerThreads,
      name: `${hostname()}:${process.pid}`, // recorded on each job it takes
      // A killed worker's runs are handed out again once their lock lapses; after maxStalls deaths, failed.
      lockDuration: r.lockMs,
      stalledInterval: r.lockMs,
      maxStalledCount: r.maxStalls,
    },
  );
  worker.on('failed', (job, err) => {
    console.error(`[worker] job ${job?.id} failed: ${err.message}`);
    if (job) void failForGood(orm, job, err);
  });
  // Redis or PostgreSQL away for a while is waited out, not a reason to stop.
  worker.on('error', (err) => console.error(`[worker] ${err.message}`));
  await worker.waitUntilReady();
  const heartbeat = startHeartbeat(pool, config.workerThreads);
  console.log(`[worker] taking runs from "${config.queueName}" with ${config.workerThreads} thread(s), direct sum in ${directKernelInUse() === 'wasm' ? 'WebAssembly SIMD' : 'JS'}`);

  // At start and then periodically: runs the database and the queue disagree on are requeued or failed.
  const queue = openRunQueue();
  const announcer = new RunEndAnnouncer();
  const pass = () =>
    reconcile(orm, queue, { announceEnd: (id) => announcer.announce(id) }).then(
      ({ requeued, failed }) => (requeued.length || failed.length) && console.log(`[worker] reconciled: ${requeued.length} requeued, ${failed.length} failed`),
      (err) => console.error(`[worker] reconcile pass failed: ${err.message}`),
    );
  void pass();
  const timer = setInterval(() => void pass(), 1000 * r.reconcileSeconds);

  // Stopping ends the pool's threads first, so the runs they held go back to the queue at once
  // (the next worker resumes them) instead of holding the stop until they finish.
  return async () => {
    clearInterval(timer);
    await heartbeat.stop();
    await pool.close();
    await worker.close();
    await Promise.allSettled([queue.close(), announcer.close()]);
    await orm.close();
  };
});
