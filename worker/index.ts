// The worker process: takes runs off the BullMQ queue and hands each to a pool thread.
import { Worker } from 'bullmq';
import { config } from '../server/config';
import { openOrm } from '../server/db/orm';
import { redisConnection, type RunJobData } from '../server/queue';
import { RunPool } from './pool';
import { failForGood, runProcessor } from './processor';
import { startHeartbeat } from './heartbeat';
import { notifyRunEnded } from '../server/services/notifications';
import { runProcess } from '../server/process';

runProcess('worker', async () => {
  const orm = await openOrm();
  const pool = new RunPool(config.workerThreads);
  const worker = new Worker<RunJobData>(config.queueName, runProcessor({ orm, pool, onEnded: (runId) => notifyRunEnded(orm.em.fork(), runId).then(() => undefined) }), {
    connection: redisConnection,
    concurrency: config.workerThreads,
  });
  worker.on('failed', (job, err) => {
    console.error(`[worker] job ${job?.id} failed: ${err.message}`);
    if (job) void failForGood(orm, job, err);
  });
  await worker.waitUntilReady();
  const heartbeat = startHeartbeat(pool, config.workerThreads);
  console.log(`[worker] taking runs from "${config.queueName}" with ${config.workerThreads} thread(s)`);

  // Stopping ends the pool's threads first, so the runs they held go back to the queue at once
  // (the next worker starts them over) instead of holding the stop until they finish.
  return async () => {
    await heartbeat.stop();
    await pool.close();
    await worker.close();
    await orm.close();
  };
});
