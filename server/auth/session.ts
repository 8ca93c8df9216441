import { randomBytes } from 'node:crypto';
import session from 'express-session';
import connectPgSimple from 'connect-pg-simple';
import type { RequestHandler } from 'express';
import { config } from '../config';

export const SESSION_COOKIE = 'infall.sid';
const WEEK_MS = 7 * 24 * 3600 * 1000;

declare module 'express-session' {
  interface SessionData {
    csrfToken?: string;
  }
}

function sessionSecret(): string {
  if (config.sessionSecret) return config.sessionSecret;
  if (config.production) throw new Error('INFALL_SESSION_SECRET must be set in production');
  // Development only: sessions then last as long as this process.
  console.warn('[auth] INFALL_SESSION_SECRET is not set; using a random one for this process');
  return randomBytes(32).toString('base64url');
}

/** Cookie sessions kept in PostgreSQL's `session` table (created by a migration). */
export function sessionMiddleware(): RequestHandler {
  const PgStore = connectPgSimple(session);
  const store = new PgStore({
    conObject: {
      host: config.db.host,
      port: config.db.port,
      database: config.db.dbName,
      user: config.db.user,
      // As many as the ORM's pool: each cookie request reads its session here (see `npm run load`).
      max: 10,
      connectionTimeoutMillis: config.serviceTimeoutMs,
      query_timeout: config.queryTimeoutMs,
      // Idle connections don't keep a finished process (or test) alive.
      allowExitOnIdle: true,
    },
    tableName: 'session',
    createTableIfMissing: false,
    // No write on every read: the cookie's own expiry is fixed at sign-in (no rolling), so
    // pushing the stored expiry forward on each request bought nothing and cost an UPDATE.
    disableTouch: true,
  });
  return session({
    name: SESSION_COOKIE,
    secret: sessionSecret(),
    store,
    resave: false,
    saveUninitialized: false,
    cookie: { httpOnly: true, sameSite: 'lax', secure: config.production, maxAge: WEEK_MS },
  });
}
