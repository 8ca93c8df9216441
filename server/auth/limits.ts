import { ipKeyGenerator, MemoryStore, rateLimit, type Options, type RateLimitRequestHandler } from 'express-rate-limit';
import type { Request, RequestHandler } from 'express';
import { config } from '../config';
import { ApiError } from '../errors';

// Limits per client address on the two doors a stranger can knock on: starting a
// sign-in, and presenting an API token. Counts live in the server's memory (one
// server process per stack), so a restart forgets them.
export const LIMIT_WINDOW_MS = 10 * 60_000;

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
export function badTokenLimiter(limit = config.auth.badTokenLimit): { guard: RequestHandler; refused(req: Request): Promise<void> } {
  const store = new MemoryStore();
  store.init({ windowMs: LIMIT_WINDOW_MS } as Options);
  const key = (req: Request) => ipKeyGenerator(req.ip ?? 'unknown');
  return {
    guard: async (req, _res, next) => {
      const hits = (await store.get(key(req)))?.totalHits ?? 0;
      if (hits >= limit) return next(new ApiError('RATE_LIMITED', `Too many requests with an unknown, expired or revoked API token from this address; try again within ${minutes} minutes`));
      next();
    },
    refused: async (req) => void (await store.increment(key(req))),
  };
}

/** The window of the per-person mail limit. */
export const MAIL_WINDOW_MS = 60 * 60_000;

/**
 * Mail a person's request sends (cohort invitations), counted per person and hour, so one
 * account cannot turn the service into a mailer. A request that would pass the limit sends nothing.
 */
export function mailLimiter(limit = config.auth.mailLimit): { take(userId: number, mails: number): Promise<void> } {
  const store = new MemoryStore();
  store.init({ windowMs: MAIL_WINDOW_MS } as Options);
  return {
    take: async (userId, mails) => {
      const key = `user:${userId}`;
      const used = (await store.get(key))?.totalHits ?? 0;
      if (used + mails > limit) {
        throw new ApiError('RATE_LIMITED', `At most ${limit} e-mails an hour per person; ${Math.max(0, limit - used)} left this hour, this request would send ${mails}`);
      }
      for (let i = 0; i < mails; i++) await store.increment(key);
    },
  };
}
