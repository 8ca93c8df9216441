// The server's resources against the test run's real PostgreSQL and Redis
// (tests/run.sh starts both and applies the migrations).
import { openOrm, type Orm } from '../../server/db/orm';
import { openRunQueue, RunSignals } from '../../server/queue';
import { createApp } from '../../server/app';
import type { Express } from 'express';

export interface TestStack {
  orm: Orm;
  app: Express;
  queue: ReturnType<typeof openRunQueue>;
  signals: RunSignals;
  close(): Promise<void>;
}

export async function openTestStack(): Promise<TestStack> {
  const orm = await openOrm();
  const queue = openRunQueue();
  const signals = new RunSignals();
  await signals.ready();
  const app = createApp({ orm, queue, signals });
  return {
    orm,
    app,
    queue,
    signals,
    close: async () => {
      await signals.close();
      await queue.close();
      await orm.close();
    },
  };
}

let counter = 0;
/** A login no other test uses, so tests can share one database. */
export function uniqueLogin(prefix: string): string {
  counter += 1;
  return `${prefix}-${process.pid}-${Date.now().toString(36)}-${counter}`;
}
