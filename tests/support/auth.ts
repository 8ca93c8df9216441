// Signing in for tests: through the fake provider end to end, as a browser would.
import request from 'supertest';
import { config } from '../../server/config';
import { startFakeProvider, type FakeProvider } from '../../server/fakes/oauth-provider';
import { startMailSink, type MailSink } from '../../server/fakes/mail-sink';

export type Agent = ReturnType<typeof request.agent>;

/**
 * Signs the agent in as `login` (a demo identity, or any login of letters, digits and
 * hyphens, which the fake provider invents on the spot) and returns the session's
 * CSRF token for state-changing requests. Needs the fake provider at the configured
 * URLs: started by server/fakes/main.ts, or in the test with startAuthFakes.
 */
export async function signIn(agent: Agent, login: string, next = '/'): Promise<{ csrfToken: string }> {
  const start = await agent.get(`/api/auth/signin?next=${encodeURIComponent(next)}`);
  if (start.status !== 302) throw new Error(`sign-in did not redirect to the provider: ${start.status}`);
  const authorize = new URL(start.headers.location);
  const provider = request(authorize.origin);
  const pageRes = await provider.get(authorize.pathname + authorize.search);
  if (pageRes.status !== 200) throw new Error(`the provider's authorize page answered ${pageRes.status}: ${pageRes.text}`);
  const picked = await provider
    .post('/authorize')
    .type('form')
    .send({ ...Object.fromEntries(authorize.searchParams), login });
  if (picked.status !== 302) throw new Error(`the provider refused the login ${login}: ${picked.status} ${picked.text}`);
  const back = new URL(picked.headers.location);
  const done = await agent.get(back.pathname + back.search);
  if (done.status !== 302 || done.headers.location !== next) throw new Error(`the callback did not complete: ${done.status} → ${done.headers.location}`);
  const me = await agent.get('/api/auth/me');
  if (me.status !== 200) throw new Error(`signed in but /api/auth/me answered ${me.status}`);
  return { csrfToken: me.body.csrfToken };
}

export interface AuthFakes {
  provider: FakeProvider;
  sink: MailSink;
  close(): Promise<void>;
}

/**
 * Starts the fake provider and mail sink in this process on the given ports and
 * points the config at them. Call it before creating the app: the sign-in strategy
 * reads the provider URLs when it is mounted.
 */
export async function startAuthFakes(ports: { oauth: number; smtp: number; outbox: number }): Promise<AuthFakes> {
  const provider = await startFakeProvider({ port: ports.oauth });
  const sink = await startMailSink({ smtpPort: ports.smtp, httpPort: ports.outbox });
  Object.assign(config.auth, {
    fakePort: provider.port,
    authorizeUrl: `${provider.url}/authorize`,
    tokenUrl: `${provider.url}/token`,
    userUrl: `${provider.url}/user`,
  });
  config.mail.smtpPort = sink.smtpPort;
  config.mail.outboxPort = ports.outbox;
  return { provider, sink, close: async () => void (await Promise.all([provider.close(), sink.close()])) };
}
