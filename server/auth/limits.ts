import { rateLimit, type Options, type RateLimitRequestHandler } from 'express-rate-limit';
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

/** Requests whose token was refused (401); good tokens from the same address are not counted. */
export const badTokenLimiter = (limit = config.auth.badTokenLimit) =>
  limiter(limit, {
    requestWasSuccessful: (_req, res) => res.statusCode !== 401,
    skipSuccessfulRequests: true,
    handler: (_req, _res, next) => next(new ApiError('RATE_LIMITED', `Too many requests with an unknown, expired or revoked API token from this address; try again within ${minutes} minutes`)),
  });
