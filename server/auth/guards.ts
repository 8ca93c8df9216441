import type { RequestHandler } from 'express';
import { ApiError } from '../errors';
import type { User as UserEntity } from '../db/entities';
import type { Role } from '../../shared/api/accounts';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    // passport's req.user is our User entity, loaded in the request's context.
    interface User extends UserEntity {}
    interface Request {
      /** How req.user was established: a browser session cookie or a personal API token. */
      authVia?: 'session' | 'token';
    }
  }
}

export const requireUser: RequestHandler = (req, _res, next) => {
  if (!req.user) return next(new ApiError('UNAUTHENTICATED', 'Sign in first, or send a personal API token as "Authorization: Bearer <token>"'));
  next();
};

/** Signed in, with one of these roles. */
export function requireRole(...roles: Role[]): RequestHandler {
  return (req, res, next) =>
    requireUser(req, res, (err?: unknown) => {
      if (err) return next(err);
      if (!roles.includes(req.user!.role)) return next(new ApiError('FORBIDDEN', `This needs the role ${roles.join(' or ')}; you are ${req.user!.role}`));
      next();
    });
}

/** Signed in through the browser, not with a token: a leaked token must not mint more tokens. */
export const requireSession: RequestHandler = (req, res, next) =>
  requireUser(req, res, (err?: unknown) => {
    if (err) return next(err);
    if (req.authVia !== 'session') return next(new ApiError('FORBIDDEN', 'Manage API tokens from a signed-in browser session, not with a token'));
    next();
  });
