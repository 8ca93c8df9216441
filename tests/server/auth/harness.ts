// The whole server against real PostgreSQL and Redis, with the fake provider and
// mail sink of this test file on ports of its own, and the demo accounts seeded.
import { randomBytes } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import { config } from '../../../server/config';
import { migrate, type Orm } from '../../../server/db/orm';
import { seedAccounts, type SeededAccounts } from '../../../server/db/seed-accounts';
import { User } from '../../../server/db/entities';
import { createToken } from '../../../server/services/tokens';
import { uniqueLogin } from '../../support/stack';
import type { Role } from '../../../shared/api/accounts';
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

export async function openAuthStack(filePort: number): Promise<AuthStack> {
  // A second copy of the suite (a fresh clone beside a working tree) shifts every file's fakes.
  const basePort = filePort + Number(process.env.INFALL_TEST_AUTH_PORT_SHIFT ?? 0);
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

/** A fresh user of the given role with a personal API token, for tests that don't need a browser. */
export async function userWithToken(s: AuthStack, role: Role = 'student', prefix = 'quota'): Promise<{ user: User; auth: { Authorization: string } }> {
  const em = s.em();
  const login = uniqueLogin(prefix);
  const user = em.create(User, { providerId: `test:${login}`, login, name: `Test ${prefix}`, email: `${login}@infall.example`, role });
  await em.flush();
  const { secret } = await createToken(em, user, { name: 'test', expiresInDays: 1 });
  return { user, auth: { Authorization: `Bearer ${secret}` } };
}
