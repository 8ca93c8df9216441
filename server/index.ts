// The server process: owns the ORM, the queue and the event fan-out, serves API and web app.
import { config } from './config';
import { openOrm } from './db/orm';
import { openRunQueue, RunSignals } from './queue';
import { createApp } from './app';

async function main() {
  const orm = await openOrm();
  const queue = openRunQueue();
  const signals = new RunSignals();
  await signals.ready();
  const app = createApp({ orm, queue, signals }, { webDir: config.webDir });
  const server = app.listen(config.port, config.host, () => {
    console.log(`[server] listening on ${config.publicUrl}`);
  });
  const stop = async () => {
    server.close();
    server.closeAllConnections();
    await Promise.allSettled([signals.close(), queue.close(), orm.close()]);
    process.exit(0);
  };
  process.once('SIGINT', stop);
  process.once('SIGTERM', stop);
}

main().catch((err) => {
  console.error('[server] could not start:', err);
  process.exit(1);
});
