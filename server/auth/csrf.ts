import { randomBytes, timingSafeEqual } from 'node:crypto';
import type { Request, RequestHandler } from 'express';
import { ApiError } from '../errors';

// Synchroniser tokens: one random token per session, handed out by GET /api/auth/me
// and expected back in X-CSRF-Token on every state-changing request the session
// cookie authenticates. Token-authenticated requests carry no ambient credential.
export const CSRF_HEADER = 'x-csrf-token';
const SAFE_METHODS = new Set(['GET', 'HEAD', 'OPTIONS']);

export function csrfTokenFor(req: Request): string {
  req.session.csrfToken ??= randomBytes(32).toString('base64url');
  return req.session.csrfToken;
}

function same(a: string, b: string): boolean {
  const x = Buffer.from(a);
  const y = Buffer.from(b);
  return x.length === y.length && timingSafeEqual(x, y);
}

export const csrfGuard: RequestHandler = (req, _res, next) => {
  if (SAFE_METHODS.has(req.method) || req.authVia !== 'session') return next();
  const expected = req.session.csrfToken;
  const sent = req.get(CSRF_HEADER);
  if (!expected || !sent || !same(expected, sent)) {
    return next(new ApiError('CSRF_REJECTED', 'Missing or wrong X-CSRF-Token header; get the token from GET /api/auth/me'));
  }
  next();
};
