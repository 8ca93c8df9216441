import type { RequestHandler } from 'express';
import { ApiError } from '../errors';
import type { User as UserEntity } from '../db/entities';

declare global {
  // eslint-disable-next-line @typescript-eslint/no-namespace
  namespace Express {
    // passport's req.user is our User entity, loaded in the request's context.
    interface User extends UserEntity {}
  }
}

export const requireUser: RequestHandler = (req, _res, next) => {
  if (!req.user) return next(new ApiError('UNAUTHENTICATED', 'Sign in first, or send a personal API token as "Authorization: Bearer <token>"'));
  next();
};
