import { Router, type Request } from 'express';
import type { PassportStatic } from 'passport';
import { ApiError } from '../errors';
import { requireUser } from '../auth/guards';
import { csrfTokenFor } from '../auth/csrf';
import { SESSION_COOKIE } from '../auth/session';
import { STRATEGY } from '../auth/passport';
import { toAccountUser } from '../services/users';
import type { MeResponse, SessionResponse } from '../../shared/api/accounts';
import { safeNext } from '../../shared/api/redirect';

function needSession(req: Request): void {
  if (!req.session) throw new ApiError('BAD_REQUEST', 'Sign-in happens in a browser; requests with an API token need none');
}

export function authRouter(auth: PassportStatic): Router {
  const r = Router();

  r.get('/me', requireUser, (req, res) => {
    const body: MeResponse = { user: toAccountUser(req.user!), csrfToken: req.authVia === 'session' ? csrfTokenFor(req) : null };
    res.set('Cache-Control', 'no-store').json(body);
  });

  // The app's probe: who is signed in, if anyone. Signed out is an answer (200, user null),
  // not an error, so a signed-out page load logs no failed request.
  r.get('/session', (req, res) => {
    const body: SessionResponse = req.user
      ? { user: toAccountUser(req.user), csrfToken: req.authVia === 'session' ? csrfTokenFor(req) : null }
      : { user: null, csrfToken: null };
    res.set('Cache-Control', 'no-store').json(body);
  });

  r.get('/signin', (req, res, next) => {
    needSession(req);
    // passport-oauth2 keeps an object state in its session store and hands it back to
    // the callback; its types only know string states.
    auth.authenticate(STRATEGY, { state: { next: safeNext(req.query.next) } } as object)(req, res, next);
  });

  // Failures come back to the app's sign-in page with a reason it can show.
  r.get('/callback', (req, res, next) => {
    needSession(req);
    auth.authenticate(STRATEGY, (err: unknown, user: Express.User | false, info?: { state?: { next?: unknown } }) => {
      if (err) {
        console.error('[auth] sign-in failed', err);
        return res.redirect(302, '/sign-in?error=provider');
      }
      if (!user) return res.redirect(302, '/sign-in?error=denied');
      const to = safeNext(info?.state?.next);
      req.logIn(user, (loginErr) => (loginErr ? next(loginErr) : res.redirect(302, to)));
    })(req, res, next);
  });

  r.post('/signout', async (req, res) => {
    if (req.session) await new Promise<void>((resolve, reject) => req.session.destroy((e) => (e ? reject(e) : resolve())));
    res.clearCookie(SESSION_COOKIE, { path: '/' });
    res.status(204).end();
  });

  return r;
}
