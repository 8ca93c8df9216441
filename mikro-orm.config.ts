import { defineConfig } from '@mikro-orm/postgresql';
import { Migrator } from '@mikro-orm/migrations';
import { config } from './server/config';
import { entities } from './server/db/entities';

// Schema changes go through committed migration files, never through schema sync.
export default defineConfig({
  host: config.db.host,
  port: config.db.port,
  dbName: config.db.dbName,
  user: config.db.user,
  password: config.db.password,
  entities,
  // A request waits at most this long for a connection, then answers 503 (server/errors.ts).
  pool: { acquireTimeoutMillis: config.serviceTimeoutMs },
  // A statement on an open connection to a stopped server fails after queryTimeoutMs instead of hanging.
  driverOptions: { connection: { connectionTimeoutMillis: config.serviceTimeoutMs, query_timeout: config.queryTimeoutMs } },
  extensions: [Migrator],
  migrations: {
    path: './server/db/migrations',
    pathTs: './server/db/migrations',
    glob: '!(*.d).{js,ts}',
    transactional: true,
    snapshot: false,
  },
  debug: false,
  allowGlobalContext: false,
});
