import passport from 'passport';
import { Strategy as OAuth2Strategy, type StrategyOptions, type VerifyCallback } from 'passport-oauth2';
import { RequestContext } from '@mikro-orm/core';
import type { EntityManager } from '@mikro-orm/postgresql';
import { z } from 'zod';
import { config } from '../config';
import { User } from '../db/entities';
import { upsertFromProfile, type ProviderProfile } from '../services/users';

export const STRATEGY = 'infall-oauth';

const em = () => RequestContext.getEntityManager() as EntityManager;

// GitHub-style user endpoint: numeric id, login, and optional name and email.
const providerUserSchema = z.object({
  id: z.union([z.number().int(), z.string().min(1).max(100)]),
  login: z.string().min(1).max(100),
  name: z.string().max(200).nullish(),
  email: z.string().max(254).nullish(),
});

export function toProfile(body: unknown): ProviderProfile {
  const u = providerUserSchema.parse(body);
  return { id: String(u.id), login: u.login, name: u.name || u.login, email: u.email || null };
}

// passport-oauth2's default profile is empty: this one asks the provider's user
// endpoint, with the access token in the Authorization header.
class ProviderStrategy extends OAuth2Strategy {
  constructor(
    private readonly userUrl: string,
    options: StrategyOptions,
    verify: (accessToken: string, refreshToken: string, profile: ProviderProfile, done: VerifyCallback) => void,
  ) {
    super(options, verify);
    this._oauth2.useAuthorizationHeaderforGET(true);
  }

  override userProfile(accessToken: string, done: (err?: unknown, profile?: ProviderProfile) => void): void {
    this._oauth2.get(this.userUrl, accessToken, (err, body) => {
      if (err) return done(new Error(`The sign-in provider's user endpoint answered ${err.statusCode ?? 'nothing'}`));
      try {
        done(null, toProfile(JSON.parse(String(body))));
      } catch (e) {
        done(e);
      }
    });
  }
}

/** A passport instance of its own (not the module singleton), so apps in one process don't share strategies. */
export function createPassport(): passport.PassportStatic {
  const auth = new passport.Passport() as passport.PassportStatic;
  const { clientId, clientSecret, authorizeUrl, tokenUrl, userUrl } = config.auth;
  const options: StrategyOptions = {
    authorizationURL: authorizeUrl,
    tokenURL: tokenUrl,
    clientID: clientId,
    clientSecret,
    callbackURL: `${config.publicUrl}/api/auth/callback`,
    // PKCE, with the state kept in the session; the state also carries where to go next.
    pkce: true,
    state: true,
  };
  auth.use(
    STRATEGY,
    new ProviderStrategy(userUrl, options, (_accessToken, _refreshToken, profile, done) => {
      upsertFromProfile(em(), profile).then((u) => done(null, u), done);
    }),
  );
  auth.serializeUser((user, done) => done(null, user.id));
  auth.deserializeUser((id: number, done) => {
    // A deleted user simply ends the session.
    em().findOne(User, { id }).then((u) => done(null, u ?? false), done);
  });
  return auth;
}
