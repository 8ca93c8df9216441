import { createHash } from 'node:crypto';
import request from 'supertest';
import { openAuthStack, type AuthStack } from './harness';
import { signIn, type Agent } from '../../support/auth';
import { ApiToken } from '../../../server/db/entities';
import { NAME_MAX_LENGTH } from '../../../shared/spec';

let s: AuthStack;
let agent: Agent;
let csrf: string;
beforeAll(async () => {
  s = await openAuthStack(55514);
  agent = request.agent(s.app);
  csrf = (await signIn(agent, 'teodora-vance')).csrfToken;
});
afterAll(async () => {
  await s.close();
});

const bearer = (secret: string) => ({ Authorization: `Bearer ${secret}` });

describe('personal API tokens', () => {
  test('are shown once, stored only as a hash, authenticate as their owner and stop working when revoked', async () => {
    const created = await agent.post('/api/tokens').set('X-CSRF-Token', csrf).send({ name: 'laptop script' }).expect(201);
    const { secret, token } = created.body;
    expect(secret).toMatch(/^infall_[\w-]{43}$/);
    expect(token).toMatchObject({ name: 'laptop script', prefix: secret.slice(0, 13), lastUsedAt: null });

    // Listed without the secret; the database has only its sha256.
    const list = await agent.get('/api/tokens').expect(200);
    expect(JSON.stringify(list.body)).not.toContain(secret);
    expect(list.body.tokens.map((t: { id: number }) => t.id)).toContain(token.id);
    const row = await s.em().findOneOrFail(ApiToken, { id: token.id });
    expect(row.hash).toBe(createHash('sha256').update(secret).digest('hex'));
    expect(JSON.stringify(row)).not.toContain(secret.slice(13));

    // A script with the token: no cookie, no CSRF token needed.
    const me = await request(s.app).get('/api/auth/me').set(bearer(secret)).expect(200);
    expect(me.body).toEqual({ user: expect.objectContaining({ login: 'teodora-vance', role: 'researcher' }), csrfToken: null });
    const patched = await request(s.app).patch('/api/account').set(bearer(secret)).send({ notifyOnFinish: true }).expect(200);
    expect(patched.body.notifyOnFinish).toBe(true);
    const usage = await request(s.app).get('/api/account/usage').set(bearer(secret)).expect(200);
    expect(usage.body.limits.maxParticles).toBe(50_000);
    expect((await s.em().findOneOrFail(ApiToken, { id: token.id })).lastUsedAt).toBeInstanceOf(Date);

    await agent.delete(`/api/tokens/${token.id}`).set('X-CSRF-Token', csrf).expect(204);
    const after = await request(s.app).get('/api/auth/me').set(bearer(secret)).expect(401);
    expect(after.body.error.code).toBe('UNAUTHENTICATED');
    await request(s.app).get('/api/runs').set(bearer(secret)).expect(401);
  });

  test('expire after the lifetime chosen (90 days unless asked), and a lifetime out of range is refused naming the field', async () => {
    const before = Date.now();
    const plain = (await agent.post('/api/tokens').set('X-CSRF-Token', csrf).send({ name: 'default life' }).expect(201)).body.token;
    const days90 = 90 * 86_400_000;
    expect(Date.parse(plain.expiresAt) - before).toBeGreaterThanOrEqual(days90 - 1000);
    expect(Date.parse(plain.expiresAt) - Date.now()).toBeLessThanOrEqual(days90);
    const week = (await agent.post('/api/tokens').set('X-CSRF-Token', csrf).send({ name: 'a week', expiresInDays: 7 }).expect(201)).body;
    expect(Math.round((Date.parse(week.token.expiresAt) - Date.now()) / 86_400_000)).toBe(7);
    await request(s.app).get('/api/auth/me').set(bearer(week.secret)).expect(200);

    // Past its expiry the same secret is refused, and the token stays listed for its owner to see.
    await s.em().nativeUpdate(ApiToken, { id: week.token.id }, { expiresAt: new Date(Date.now() - 1000) });
    const refused = await request(s.app).get('/api/auth/me').set(bearer(week.secret)).expect(401);
    expect(refused.body.error.code).toBe('UNAUTHENTICATED');
    const listed = (await agent.get('/api/tokens').expect(200)).body.tokens.find((t: { id: number }) => t.id === week.token.id);
    expect(Date.parse(listed.expiresAt)).toBeLessThan(Date.now());

    for (const expiresInDays of [0, 366, 1.5, '30']) {
      const bad = await agent.post('/api/tokens').set('X-CSRF-Token', csrf).send({ name: 'bad', expiresInDays }).expect(400);
      expect(JSON.stringify(bad.body.error)).toContain('expiresInDays');
    }
  });

  test('a token cannot create, list or revoke tokens', async () => {
    const { secret, token } = (await agent.post('/api/tokens').set('X-CSRF-Token', csrf).send({ name: 'ci' }).expect(201)).body;
    await request(s.app).post('/api/tokens').set(bearer(secret)).send({ name: 'more' }).expect(403);
    await request(s.app).get('/api/tokens').set(bearer(secret)).expect(403);
    await request(s.app).delete(`/api/tokens/${token.id}`).set(bearer(secret)).expect(403);
    await request(s.app).get('/api/auth/me').set(bearer(secret)).expect(200);
  });

  test('someone else cannot revoke my token', async () => {
    const { secret, token } = (await agent.post('/api/tokens').set('X-CSRF-Token', csrf).send({ name: 'mine' }).expect(201)).body;
    const other = request.agent(s.app);
    const theirs = await signIn(other, 'jonas-achterberg');
    await other.delete(`/api/tokens/${token.id}`).set('X-CSRF-Token', theirs.csrfToken).expect(404);
    await request(s.app).get('/api/auth/me').set(bearer(secret)).expect(200);
  });

  test.each([
    ['an unknown token', 'Bearer infall_AAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAAA'],
    ['a token of another format', 'Bearer ghp_1234'],
    ['another scheme', 'Basic dXNlcjpwYXNz'],
    ['an empty bearer', 'Bearer '],
  ])('%s is refused with 401, not treated as anonymous', async (_what, header) => {
    const res = await request(s.app).get('/api/auth/me').set('Authorization', header).expect(401);
    expect(res.body.error.code).toBe('UNAUTHENTICATED');
  });

  test('a bearer header wins over a session cookie, so a bad token cannot ride on a session', async () => {
    await agent.get('/api/auth/me').set('Authorization', 'Bearer infall_nope').expect(401);
  });

  test('names are checked, with the one name limit every name has', async () => {
    await agent.post('/api/tokens').set('X-CSRF-Token', csrf).send({ name: 'x'.repeat(NAME_MAX_LENGTH) }).expect(201);
    const res = await agent.post('/api/tokens').set('X-CSRF-Token', csrf).send({ name: 'x'.repeat(NAME_MAX_LENGTH + 1) }).expect(400);
    expect(res.body.error).toMatchObject({ code: 'BAD_REQUEST', field: 'name', message: `name: name is at most ${NAME_MAX_LENGTH} characters` });
    await agent.post('/api/tokens').set('X-CSRF-Token', csrf).send({ name: 'ok', extra: 1 }).expect(400);
  });
});
