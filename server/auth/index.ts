import { Router, type Express, type Request, type RequestHandler } from 'express';
import { RequestContext } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import type { Deps } from '../app';
import { ApiError } from '../errors';
import { userForToken } from '../services/tokens';
import { installAfterCommit } from '../services/after-commit';
import { createPassport } from './passport';
import { sessionMiddleware } from './session';
import { csrfGuard } from './csrf';
import { jsonBodies } from '../http/body';
import { badTokenLimiter, signInLimiter } from './limits';
import { authRouter } from '../routes/auth';
import { accountRouter } from '../routes/account';
import { tokensRouter } from '../routes/tokens';
import { cohortsRouter } from '../routes/cohorts';
import { templatesRouter } from '../routes/templates';
import { adminRouter } from '../routes/admin';

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
 * Sign-in, sessions, tokens, CSRF and the account-side routes, mounted on the API
 * router before the run routes so every one of them sees req.user.
 */
export function mountAuth(_app: Express, api: Router, deps: Deps): void {
  installAfterCommit(deps.orm);
  const auth = createPassport();
  const sessionChain = Router();
  sessionChain.use(sessionMiddleware(), auth.initialize(), auth.session(), (req, _res, next) => {
    if (req.user) req.authVia = 'session';
    next();
  });
  const tokenChain = Router();
  const tokenLimit = badTokenLimiter(deps.queue);
  tokenChain.use(tokenLimit.guard, tokenAuth(tokenLimit.refused));
  api.use((req, res, next) => (req.get('authorization') !== undefined ? tokenChain(req, res, next) : sessionChain(req, res, next)));
  api.use(csrfGuard);
  api.use(jsonBodies());

  api.use(['/auth/signin', '/auth/callback'], signInLimiter());
  api.use('/auth', authRouter(auth));
  api.use('/account', accountRouter());
  api.use('/tokens', tokensRouter());
  api.use('/cohorts', cohortsRouter(deps.queue));
  api.use('/templates', templatesRouter());
  api.use('/admin', adminRouter());
}
