// The worker process: takes runs off the BullMQ queue and hands each to a pool thread.
import { Worker } from 'bullmq';
import { config } from '../server/config';
import { applyDirectKernelSetting, directKernelInUse } from '../shared/engine';
import { openOrm } from '../server/db/orm';
import { redisConnection, type RunJobData } from '../server/queue';
import { RunPool } from './pool';
import { runProcessor } from './processor';
import { notifyRunEnded } from '../server/services/notifications';
import { runProcess } from '../server/process';

runProcess('worker', async () => {
  // A bad setting stops the worker here with its message rather than failing every run in a thread.
  applyDirectKernelSetting(process.env.INFALL_DIRECT_KERNEL);
  const orm = await openOrm();
  const pool = new RunPool(config.workerThreads);
  const worker = new Worker<RunJobData>(config.queueName, runProcessor({ orm, pool, onEnded: (runId) => notifyRunEnded(orm.em.fork(), runId).then(() => undefined) }), {
    connection: redisConnection,
    concurrency: config.workerThreads,
  });
  worker.on('failed', (job, err) => console.error(`[worker] job ${job?.id} failed: ${err.message}`));
  await worker.waitUntilReady();
  console.log(`[worker] taking runs from "${config.queueName}" with ${config.workerThreads} thread(s), direct sum in ${directKernelInUse() === 'wasm' ? 'WebAssembly SIMD' : 'JS'}`);

  // Stopping ends the pool's threads first, so the runs they held go back to the queue at once
  // (the next worker starts them over) instead of holding the stop until they finish.
  return async () => {
    await pool.close();
    await worker.close();
    await orm.close();
  };
});
