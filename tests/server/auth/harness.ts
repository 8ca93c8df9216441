// The whole server against real PostgreSQL and Redis, with the fake provider and
// mail sink of this test file on ports of its own, and the demo accounts seeded.
import { randomBytes } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import { config } from '../../../server/config';
import { migrate, type Orm } from '../../../server/db/orm';
import { seedAccounts, type SeededAccounts } from '../../../server/db/seed-accounts';
import { openTestStack, type TestStack } from '../../support/stack';
import { startAuthFakes, type AuthFakes } from '../../support/auth';

export interface AuthStack extends TestStack {
  fakes: AuthFakes;
  seeded: SeededAccounts;
  em(): EntityManager;
}

// Test files run side by side: only one of them applies the migrations at a time.
async function migrateExclusively(orm: Orm): Promise<void> {
  const knex = orm.em.getConnection().getKnex();
  await knex.transaction(async (trx) => {
    await trx.raw('select pg_advisory_xact_lock(73017301)');
    await migrate(orm);
  });
}

export async function openAuthStack(basePort: number): Promise<AuthStack> {
  config.sessionSecret = randomBytes(32).toString('base64url');
  const fakes = await startAuthFakes({ oauth: basePort, smtp: basePort + 1, outbox: basePort + 2 });
  const stack = await openTestStack();
  await migrateExclusively(stack.orm);
  const seeded = await seedAccounts(stack.orm.em.fork());
  return {
    ...stack,
    fakes,
    seeded,
    em: () => stack.orm.em.fork() as EntityManager,
    close: async () => {
      await stack.close();
      await fakes.close();
    },
  };
}
