import request from 'supertest';
import { openAuthStack, type AuthStack } from './harness';
import { signIn } from '../../support/auth';
import { Session, User } from '../../../server/db/entities';

let s: AuthStack;
beforeAll(async () => {
  s = await openAuthStack(55511);
});
afterAll(async () => {
  await s.close();
});

// The first two legs of the flow by hand: our redirect, then the provider's page.
async function toProvider(agent: ReturnType<typeof request.agent>, next: string) {
  const start = await agent.get(`/api/auth/signin?next=${encodeURIComponent(next)}`).expect(302);
  const authorize = new URL(start.headers.location);
  return { authorize, params: Object.fromEntries(authorize.searchParams) };
}

async function pick(params: Record<string, string>, fields: Record<string, string>) {
  const res = await request(s.fakes.provider.url).post('/authorize').type('form').send({ ...params, ...fields }).expect(302);
  const back = new URL(res.headers.location);
  return back.pathname + back.search;
}

describe('sign-in through the OAuth provider', () => {
  test('signs a demo identity in end to end and returns to the page it came from', async () => {
    const agent = request.agent(s.app);
    const { authorize, params } = await toProvider(agent, '/runs/compare?pair=1');
    expect(authorize.origin).toBe(s.fakes.provider.url);
    expect(params).toMatchObject({ response_type: 'code', client_id: 'infall-local', code_challenge_method: 'S256' });
    expect(params.state).toMatch(/^[\w-]{16,}$/);
    expect(params.code_challenge).toMatch(/^[\w-]{43}$/);

    const page = await request(s.fakes.provider.url).get(authorize.pathname + authorize.search).expect(200);
    expect(page.text).toContain('aria-label="Sign in as Amira Solberg, invented student"');
    expect(page.text).toContain('aria-label="Sign in as Ilse Varga, invented instructor"');

    const callback = await pick(params, { login: 'amira-solberg' });
    expect(callback).toMatch(/^\/api\/auth\/callback\?/);
    const done = await agent.get(callback).expect(302);
    expect(done.headers.location).toBe('/runs/compare?pair=1');
    const cookie = String(done.headers['set-cookie']);
    expect(cookie).toMatch(/infall\.sid=/);
    expect(cookie).toMatch(/HttpOnly/);
    expect(cookie).toMatch(/SameSite=Lax/);
    expect(cookie).not.toMatch(/Secure/); // development: plain http

    const me = await agent.get('/api/auth/me').expect(200);
    expect(me.body.user).toEqual({ id: s.seeded.users['amira-solberg'].id, login: 'amira-solberg', name: 'Amira Solberg', role: 'student', email: 'amira.solberg@infall.example' });
    expect(me.body.csrfToken).toMatch(/^[\w-]{43}$/);

    // The session lives in PostgreSQL.
    const sid = decodeURIComponent(/infall\.sid=([^;]+)/.exec(cookie)![1]).slice(2).split('.')[0];
    const row = await s.em().findOne(Session, { sid });
    expect((row!.sess as { passport: { user: number } }).passport.user).toBe(me.body.user.id);
  });

  test('creates a student account for a login seen for the first time', async () => {
    const agent = request.agent(s.app);
    const login = `newcomer-${Date.now().toString(36)}`;
    await signIn(agent, login);
    const me = await agent.get('/api/auth/me').expect(200);
    expect(me.body.user).toMatchObject({ login, role: 'student', email: `${login}@infall.example` });
    const stored = await s.em().findOneOrFail(User, { login });
    expect(stored.lastSignInAt).toBeInstanceOf(Date);
  });

  test.each([
    '//evil.example/x',
    'https://evil.example/',
    '/\\evil.example',
    '/runs/\\..\\\\evil.example',
    '/\t/evil.example',
    '/\n/evil.example',
    'javascript:alert(1)',
    'http:/evil.example',
    'runs',
    '/sign-in?next=/runs',
    `/${'a'.repeat(600)}`,
  ])('never redirects off-site after sign-in (next=%j)', async (next) => {
    const agent = request.agent(s.app);
    const { params } = await toProvider(agent, next);
    const done = await agent.get(await pick(params, { login: 'teodora-vance' })).expect(302);
    expect(done.headers.location).toBe('/');
  });

  test('a deep link with a query comes back whole after sign-in', async () => {
    for (const next of ['/cohorts/join?code=ABCD-2345', '/compare?pair=4b0e2c1a-8d6f-4e0b-9a7c-2f1d3e5b6a70', '/runs/4b0e2c1a-8d6f-4e0b-9a7c-2f1d3e5b6a70']) {
      const agent = request.agent(s.app);
      const { params } = await toProvider(agent, next);
      const done = await agent.get(await pick(params, { login: 'amira-solberg' })).expect(302);
      expect(done.headers.location).toBe(next);
    }
  });

  test('two next values (an array) are refused, not joined', async () => {
    const agent = request.agent(s.app);
    const start = await agent.get('/api/auth/signin?next=/runs&next=//evil.example').expect(302);
    const params = Object.fromEntries(new URL(start.headers.location).searchParams);
    const done = await agent.get(await pick(params, { login: 'amira-solberg' })).expect(302);
    expect(done.headers.location).toBe('/');
  });

  test('the session probe answers 200 signed out (user null) and signed in (user and CSRF token)', async () => {
    const out = await request(s.app).get('/api/auth/session').expect(200);
    expect(out.body).toEqual({ user: null, csrfToken: null });
    expect(out.headers['cache-control']).toBe('no-store');
    const agent = request.agent(s.app);
    const { csrfToken } = await signIn(agent, 'amira-solberg');
    const signedIn = await agent.get('/api/auth/session').expect(200);
    expect(signedIn.body.user).toMatchObject({ login: 'amira-solberg', role: 'student' });
    expect(signedIn.body.csrfToken).toBe(csrfToken);
    // A script's token gets no CSRF token; a bad token is still refused.
    await request(s.app).get('/api/auth/session').set('Authorization', 'Bearer infall_nope').expect(401);
  });

  test('refuses a callback whose state is not the one this browser was given', async () => {
    const victim = request.agent(s.app);
    const attacker = request.agent(s.app);
    const { params } = await toProvider(attacker, '/');
    await toProvider(victim, '/');
    // The attacker's code, replayed into the victim's browser (login CSRF).
    const done = await victim.get(await pick(params, { login: 'rafael-okoye' })).expect(302);
    expect(done.headers.location).toBe('/sign-in?error=denied');
    await victim.get('/api/auth/me').expect(401);
  });

  test('a cancelled sign-in comes back as denied and signs nobody in', async () => {
    const agent = request.agent(s.app);
    const { params } = await toProvider(agent, '/');
    const done = await agent.get(await pick(params, { cancel: '1' })).expect(302);
    expect(done.headers.location).toBe('/sign-in?error=denied');
    await agent.get('/api/auth/me').expect(401);
  });

  test('a code taken from the callback is useless without the browser\'s PKCE verifier', async () => {
    const agent = request.agent(s.app);
    const { params } = await toProvider(agent, '/');
    const callback = await pick(params, { login: 'priya-ndlovu' });
    // Someone else replays the code with a state of their own.
    const thief = request.agent(s.app);
    const theirs = await toProvider(thief, '/');
    const stolen = callback.replace(/state=[^&]+/, `state=${theirs.params.state}`);
    const logged = jest.spyOn(console, 'error').mockImplementation(() => undefined);
    expect((await thief.get(stolen).expect(302)).headers.location).toBe('/sign-in?error=provider');
    expect(logged).toHaveBeenCalledWith('[auth] sign-in failed', expect.objectContaining({ message: 'code_verifier does not match' }));
    logged.mockRestore();
    await thief.get('/api/auth/me').expect(401);
  });

  test('the provider redeems an authorization code only once', async () => {
    const provider = request(s.fakes.provider.url);
    const redirect_uri = 'http://127.0.0.1:1/cb';
    const back = await provider.post('/authorize').type('form').send({ client_id: 'infall-local', response_type: 'code', redirect_uri, state: 'st', login: 'amira-solberg' }).expect(302);
    const code = new URL(back.headers.location).searchParams.get('code')!;
    const redeem = () => provider.post('/token').type('form').send({ grant_type: 'authorization_code', code, client_id: 'infall-local', client_secret: 'infall-local-not-a-secret', redirect_uri });
    const first = await redeem().expect(200);
    expect(first.body.access_token).toBeTruthy();
    expect((await redeem().expect(400)).body.error).toBe('invalid_grant');
    const user = await provider.get('/user').set('Authorization', `Bearer ${first.body.access_token}`).expect(200);
    expect(user.body).toEqual({ id: 730102, login: 'amira-solberg', name: 'Amira Solberg', email: 'amira.solberg@infall.example' });
    await provider.get('/user').set('Authorization', 'Bearer nope').expect(401);
  });

  test('the provider refuses an unknown client and a wrong PKCE verifier', async () => {
    const agent = request.agent(s.app);
    const { params } = await toProvider(agent, '/');
    await request(s.fakes.provider.url).get('/authorize').query({ ...params, client_id: 'someone-else' }).expect(400);
    const code = new URLSearchParams((await pick(params, { login: 'amira-solberg' })).split('?')[1]).get('code')!;
    const res = await request(s.fakes.provider.url)
      .post('/token')
      .type('form')
      .send({ grant_type: 'authorization_code', code, client_id: 'infall-local', client_secret: 'infall-local-not-a-secret', redirect_uri: params.redirect_uri, code_verifier: 'x'.repeat(43) })
      .expect(400);
    expect(res.body.error).toBe('invalid_grant');
  });
});

describe('CSRF protection and sign-out', () => {
  test('state-changing requests need the session token in X-CSRF-Token', async () => {
    const agent = request.agent(s.app);
    const { csrfToken } = await signIn(agent, 'teodora-vance');
    const missing = await agent.patch('/api/account').send({ notifyOnFinish: true }).expect(403);
    expect(missing.body.error.code).toBe('CSRF_REJECTED');
    const wrong = await agent.patch('/api/account').set('X-CSRF-Token', csrfToken.replace(/^./, (c) => (c === 'a' ? 'b' : 'a'))).send({ notifyOnFinish: true }).expect(403);
    expect(wrong.body.error.code).toBe('CSRF_REJECTED');
    // Someone else's valid token is no good either.
    const other = request.agent(s.app);
    const theirs = await signIn(other, 'jonas-achterberg');
    await agent.patch('/api/account').set('X-CSRF-Token', theirs.csrfToken).send({ notifyOnFinish: true }).expect(403);
    const ok = await agent.patch('/api/account').set('X-CSRF-Token', csrfToken).send({ notifyOnFinish: true }).expect(200);
    expect(ok.body.notifyOnFinish).toBe(true);
  });

  test('signing in again gives a new session and a new CSRF token', async () => {
    const agent = request.agent(s.app);
    const first = await signIn(agent, 'teodora-vance');
    const second = await signIn(agent, 'teodora-vance');
    expect(second.csrfToken).not.toBe(first.csrfToken);
  });

  test('sign-out ends the session on the server, not only in the browser', async () => {
    const agent = request.agent(s.app);
    const { csrfToken } = await signIn(agent, 'ilse-varga');
    const before = await agent.get('/api/auth/me').expect(200);
    const cookie = String((before as unknown as { req: { getHeader(n: string): unknown } }).req.getHeader('cookie'));
    expect(cookie).toMatch(/^infall\.sid=s%3A/);
    await agent.post('/api/auth/signout').expect(403); // without the token
    await agent.post('/api/auth/signout').set('X-CSRF-Token', csrfToken).expect(204);
    await agent.get('/api/auth/me').expect(401);
    // The old cookie, replayed, no longer works.
    const stale = await request(s.app).get('/api/auth/me').set('Cookie', cookie);
    expect(stale.status).toBe(401);
  });
});
