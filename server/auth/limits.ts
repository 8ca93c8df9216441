import { ipKeyGenerator, rateLimit, type Options, type RateLimitRequestHandler } from 'express-rate-limit';
import { RedisStore } from 'rate-limit-redis';
import type { Queue } from 'bullmq';
import type { Redis } from 'ioredis';
import type { Request, RequestHandler } from 'express';
import { config } from '../config';
import { ApiError } from '../errors';
import { queueCall } from '../queue';

// Limits per client address on the two doors a stranger can knock on: starting a
// sign-in, and presenting an API token. The sign-in limit lives in the server's memory;
// refused tokens and mail are counted in Redis, so every server process shares one count.
export const LIMIT_WINDOW_MS = 10 * 60_000;

/** KEYS[1] the count; ARGV n, limit, window (ms). The window starts with the first hit, as RedisStore's. */
const TAKE_SCRIPT = `
local used = tonumber(redis.call('GET', KEYS[1]) or '0')
if used + tonumber(ARGV[1]) > tonumber(ARGV[2]) then return {0, used} end
redis.call('INCRBY', KEYS[1], ARGV[1])
if redis.call('PTTL', KEYS[1]) < 0 then redis.call('PEXPIRE', KEYS[1], ARGV[3]) end
return {1, used}`;

/**
 * A count in Redis over the queue's own connection, each key forgotten a window after its
 * first hit. The store is set up on first use and again after a failure, so a server
 * started while Redis is away counts once it is back. While the connection is down a count
 * fails at once (503 naming the queue) rather than waiting out the service timeout.
 */
function redisCounter(queue: Queue, name: string, windowMs: number) {
  const prefix = `infall:${config.queueName}:limit:${name}:`;
  let ready: Promise<RedisStore> | null = null;
  const store = (client: Redis) =>
    (ready ??= (async () => {
      const s = new RedisStore({ prefix, sendCommand: (command, ...args) => client.call(command, ...args) as Promise<never> });
      await s.init({ windowMs } as Options);
      return s;
    })()).catch((e: unknown) => {
      ready = null;
      throw e;
    });
  const bounded = <T>(work: (s: RedisStore, client: Redis) => Promise<T>) =>
    queueCall(queue, (client) => store(client).then((s) => work(s, client))).catch((e: unknown) => {
      throw e instanceof ApiError ? e : new ApiError('UNAVAILABLE', 'The queue is not answering; try again shortly');
    });
  return {
    hits: (key: string) => bounded((s) => s.get(key)).then((info) => info?.totalHits ?? 0),
    add: (key: string) => bounded((s) => s.increment(key)).then(() => undefined),
    /**
     * Adds `n` hits in one step if the count stays within `limit`, else none; resolves with the
     * count found and whether they were added. One script, so side-by-side takers (at any
     * server) cannot each see room that only one of them has.
     */
    take: (key: string, n: number, limit: number) =>
      bounded(async (_s, client) => {
        const [added, used] = (await client.eval(TAKE_SCRIPT, 1, `${prefix}${key}`, n, limit, windowMs)) as [number, number];
        return { added: added === 1, used };
      }),
  };
}

const minutes = Math.round(LIMIT_WINDOW_MS / 60_000);

const limiter = (limit: number, options: Partial<Options>): RateLimitRequestHandler =>
  rateLimit({ windowMs: LIMIT_WINDOW_MS, limit, standardHeaders: 'draft-7', legacyHeaders: false, ...options });

/** Sign-in starts and provider callbacks; over the limit the browser goes back to the sign-in page with a reason. */
export const signInLimiter = (limit = config.auth.signInLimit) => limiter(limit, { handler: (_req, res) => res.redirect(302, '/sign-in?error=busy') });

/**
 * Refused API tokens per address. Only a refusal counts, once it is known (requests in
 * flight and open event streams with a good token never do); past the limit every
 * token from the address is turned away before it is checked, so guessing stops.
 */
export function badTokenLimiter(queue: Queue, limit = config.auth.badTokenLimit): { guard: RequestHandler; refused(req: Request): Promise<void> } {
  const count = redisCounter(queue, 'token', LIMIT_WINDOW_MS);
  const key = (req: Request) => ipKeyGenerator(req.ip ?? 'unknown');
  return {
    // With Redis away the count is unknown and the token is checked as usual (reads of runs
    // need only the database); each refusal still costs the caller a database lookup.
    guard: async (req, _res, next) => {
      const hits = await count.hits(key(req)).catch(() => 0);
      if (hits >= limit) return next(new ApiError('RATE_LIMITED', `Too many requests with an unknown, expired or revoked API token from this address; try again within ${minutes} minutes`));
      next();
    },
    refused: (req) => count.add(key(req)).catch(() => undefined),
  };
}

/** The window of the per-person mail limit. */
export const MAIL_WINDOW_MS = 60 * 60_000;

/**
 * Mail a person's request sends (cohort invitations), counted per person and hour, so one
 * account cannot turn the service into a mailer. A request that would pass the limit sends nothing.
 */
export function mailLimiter(queue: Queue, limit = config.auth.mailLimit): { take(userId: number, mails: number): Promise<void> } {
  const count = redisCounter(queue, 'mail', MAIL_WINDOW_MS);
  return {
    // With Redis away the count is unknown and nothing is sent: 503 naming the queue.
    take: async (userId, mails) => {
      const { added, used } = await count.take(`user:${userId}`, mails, limit);
      if (!added) {
        throw new ApiError('RATE_LIMITED', `At most ${limit} e-mails an hour per person; ${Math.max(0, limit - used)} left this hour, this request would send ${mails}`);
      }
    },
  };
}
