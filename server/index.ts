// The server process: owns the ORM, the queue and the event fan-out, serves API and web app.
import { config } from './config';
import { openOrm } from './db/orm';
import { openRunQueue, RunSignals } from './queue';
import { createApp } from './app';
import { runProcess } from './process';

runProcess('server', async () => {
  const orm = await openOrm();
  const queue = openRunQueue();
  const signals = new RunSignals();
  await signals.ready();
  const app = createApp({ orm, queue, signals }, { webDir: config.webDir });
  const server = app.listen(config.port, config.host, () => {
    console.log(`[server] listening on ${config.publicUrl}`);
  });
  return async () => {
    server.close();
    server.closeAllConnections();
    await Promise.allSettled([signals.close(), queue.close(), orm.close()]);
  };
});
