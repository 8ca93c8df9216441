import { MikroORM } from '@mikro-orm/postgresql';
import ormConfig from '../../mikro-orm.config';

export type Orm = MikroORM;

export async function openOrm(opts: { longStatements?: boolean } = {}): Promise<Orm> {
  if (!opts.longStatements) return MikroORM.init(ormConfig);
  // Migrations and a worker's large result writes: no per-statement limit for them.
  const connection = { ...(ormConfig.driverOptions as { connection: object }).connection, query_timeout: undefined };
  return MikroORM.init({ ...ormConfig, driverOptions: { ...ormConfig.driverOptions, connection } });
}

/** Applies the committed migrations that the database has not seen yet. */
export async function migrate(orm: Orm): Promise<string[]> {
  const done = await orm.getMigrator().up();
  return done.map((m) => m.name);
}
