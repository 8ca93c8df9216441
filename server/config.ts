// Every port, address and folder the stack uses, read once from the environment.
// Defaults are for one developer's machine; README lists them.
const env = process.env;

function count(name: string, fallback: number, max = Number.MAX_SAFE_INTEGER, what = 'a whole number above 0'): number {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  const v = Number(raw);
  if (!Number.isInteger(v) || v <= 0 || v > max) throw new Error(`${name} must be ${what}, got "${raw}"`);
  return v;
}

const int = (name: string, fallback: number) => count(name, fallback, 65535, 'a port number');

const host = '127.0.0.1'; // services never listen on other addresses
const port = int('INFALL_PORT', 8080);

export const config = {
  host,
  port,
  publicUrl: env.INFALL_PUBLIC_URL ?? `http://${host}:${port}`,
  db: {
    // Other hosts' workers reach the database and Redis by these (README "Workers on several hosts").
    host: env.INFALL_PG_HOST || host,
    password: env.INFALL_PG_PASSWORD || undefined,
    port: int('INFALL_PG_PORT', 54329),
    dbName: env.INFALL_PG_DB ?? 'infall',
    user: env.INFALL_PG_USER ?? 'infall',
  },
  redis: { host: env.INFALL_REDIS_HOST || host, port: int('INFALL_REDIS_PORT', 63799), password: env.INFALL_REDIS_PASSWORD || undefined },
  queueName: env.INFALL_QUEUE ?? 'infall-runs',
  /** How long a request waits on PostgreSQL (connecting) or Redis before it answers 503. */
  serviceTimeoutMs: count('INFALL_SERVICE_TIMEOUT_MS', 3000, 60_000),
  /**
   * How long one of the server's database statements may go unanswered before it fails (a
   * PostgreSQL that stopped mid-request, its connections still open). Workers and migrations
   * open their ORM without it (see openOrm).
   */
  queryTimeoutMs: count('INFALL_QUERY_TIMEOUT_MS', 15_000, 600_000),
  workerThreads: Math.max(1, Number(env.INFALL_WORKER_THREADS ?? 2) | 0),
  resilience: resilienceConfig(),
  webDir: env.INFALL_WEB_DIR ?? 'dist',
  // One snapshot download at most this large (the largest run the limits allow needs about 115 MiB).
  exportMaxBytes: count('INFALL_EXPORT_MAX_MB', 160) * 2 ** 20,
  sessionSecret: env.INFALL_SESSION_SECRET ?? '',
  production: env.NODE_ENV === 'production',
  auth: authConfig(),
  mail: {
    smtpHost: env.INFALL_SMTP_HOST ?? host,
    smtpPort: int('INFALL_SMTP_PORT', 2525),
    outboxPort: int('INFALL_OUTBOX_PORT', 8092),
    from: env.INFALL_MAIL_FROM ?? 'Infall <noreply@infall.localhost>',
  },
};

// The OAuth 2 provider. Defaults point at the local fake (server/fakes/oauth-provider.ts).
function authConfig() {
  const fakePort = int('INFALL_OAUTH_PORT', 8091);
  const fake = `http://${host}:${fakePort}`;
  return {
    fakePort,
    clientId: env.INFALL_OAUTH_CLIENT_ID ?? 'infall-local',
    clientSecret: env.INFALL_OAUTH_CLIENT_SECRET ?? 'infall-local-not-a-secret',
    authorizeUrl: env.INFALL_OAUTH_AUTHORIZE_URL ?? `${fake}/authorize`,
    tokenUrl: env.INFALL_OAUTH_TOKEN_URL ?? `${fake}/token`,
    userUrl: env.INFALL_OAUTH_USER_URL ?? `${fake}/user`,
    // Logins made admin at sign-in, so a real provider's first admin needs no SQL.
    adminLogins: (env.INFALL_ADMIN_LOGINS ?? '').split(',').map((s) => s.trim()).filter(Boolean),
    // Per client address and 10 minutes. A classroom behind one address signs in together, hence the room.
    signInLimit: count('INFALL_SIGNIN_LIMIT', 120),
    badTokenLimit: count('INFALL_BAD_TOKEN_LIMIT', 30),
    // E-mails one person's requests may send per hour (cohort invitations).
    mailLimit: count('INFALL_MAIL_LIMIT', 100),
  };
}

// How runs survive faults; README "Faults and checkpoints" explains each number.
function resilienceConfig() {
  return {
    // A running run's state goes to PostgreSQL every this many steps or seconds, whichever comes first.
    checkpointSteps: count('INFALL_CHECKPOINT_STEPS', 5000),
    checkpointSeconds: count('INFALL_CHECKPOINT_SECONDS', 30),
    // A worker holds a run's lock this long between renewals; a killed worker's run is taken over after it lapses.
    lockMs: count('INFALL_WORKER_LOCK_MS', 30_000),
    // A run whose worker died this many times is failed (and refunded) instead of handed out again.
    maxStalls: count('INFALL_WORKER_MAX_STALLS', 2),
    // The reconciler's period; it also runs when a worker starts.
    reconcileSeconds: count('INFALL_RECONCILE_SECONDS', 60),
    // How long a worker keeps retrying a run's end (its results, or its failure) while PostgreSQL is away.
    storeRetrySeconds: count('INFALL_STORE_RETRY_SECONDS', 120),
  };
}

export type Config = typeof config;
