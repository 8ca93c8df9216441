import { Router, type Request, type RequestHandler } from 'express';
import { RequestContext } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import type { Deps } from '../app';
import { ApiError } from '../errors';
import { userForToken } from '../services/tokens';
import { createPassport } from './passport';
import { sessionMiddleware } from './session';
import { csrfGuard } from './csrf';
import { badTokenLimiter, signInLimiter } from './limits';
import { authRouter } from '../routes/auth';

// A request is authenticated either by "Authorization: Bearer <personal token>" or
// by the session cookie, never both: with the header present the session is not read.
// Each refused token counts against the address (see badTokenLimiter).
function tokenAuth(refused: (req: Request) => Promise<void>): RequestHandler {
  return async (req, _res, next) => {
    const [scheme, secret] = (req.get('authorization') ?? '').split(' ');
    const user = scheme?.toLowerCase() === 'bearer' && secret ? await userForToken(RequestContext.getEntityManager() as EntityManager, secret.trim()) : null;
    if (!user) {
      await refused(req);
      if (scheme?.toLowerCase() !== 'bearer' || !secret) throw new ApiError('UNAUTHENTICATED', 'Authorization must be "Bearer <personal API token>"');
      throw new ApiError('UNAUTHENTICATED', 'That API token is unknown, expired or revoked');
    }
    req.user = user;
    req.authVia = 'token';
    next();
  };
}

/**
 * The auth module: `authenticate` sets req.user from the bearer token or the session
 * cookie (never both) and holds session requests that change state to their CSRF token;
 * `routes` are sign-in, sign-out and who-am-I, mounted by the app at /auth.
 */
export function createAuth({ queue }: Pick<Deps, 'queue'>): { authenticate: Router; routes: Router } {
  const auth = createPassport();
  const sessionChain = Router();
  sessionChain.use(sessionMiddleware(), auth.initialize(), auth.session(), (req, _res, next) => {
    if (req.user) req.authVia = 'session';
    next();
  });
  const tokenChain = Router();
  const tokenLimit = badTokenLimiter(queue);
  tokenChain.use(tokenLimit.guard, tokenAuth(tokenLimit.refused));
  const authenticate = Router();
  authenticate.use((req, res, next) => (req.get('authorization') !== undefined ? tokenChain(req, res, next) : sessionChain(req, res, next)));
  authenticate.use(csrfGuard);

  const routes = Router();
  routes.use(['/signin', '/callback'], signInLimiter());
  routes.use(authRouter(auth));
  return { authenticate, routes };
}
