import { MikroORM } from '@mikro-orm/postgresql';
import ormConfig from '../../mikro-orm.config';

export type Orm = MikroORM;

export async function openOrm(): Promise<Orm> {
  return MikroORM.init(ormConfig);
}

/** Applies the committed migrations that the database has not seen yet. */
export async function migrate(orm: Orm): Promise<string[]> {
  const done = await orm.getMigrator().up();
  return done.map((m) => m.name);
}
