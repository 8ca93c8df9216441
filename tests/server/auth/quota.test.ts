import request from 'supertest';
import { openAuthStack, userWithToken, type AuthStack } from './harness';
import { defaultRunSpec, estimateInteractions, type RunSpec } from '../../../shared/spec';
import { Run, UsageEntry } from '../../../server/db/entities';
import { setAllocation } from '../../../server/services/users';
import { budgetDay } from '../../../server/services/quotas';

let s: AuthStack;
beforeAll(async () => {
  s = await openAuthStack(55520);
});
afterAll(async () => {
  await s.close();
});

const spec = (over: Partial<RunSpec> & { n?: number } = {}): RunSpec => {
  const base = defaultRunSpec();
  const { n, ...rest } = over;
  return { ...base, ...rest, model: { ...base.model, ...(n ? { n } : {}) } as RunSpec['model'] };
};
const COST = estimateInteractions(defaultRunSpec()); // 500^2 x 250 steps = 6.25e7

async function ledger(userId: number) {
  const rows = await s.em().find(UsageEntry, { user: userId, day: budgetDay() });
  return { interactions: rows.reduce((a, r) => a + r.interactions, 0), runs: await s.em().count(Run, { owner: userId }) };
}

const submit = (auth: Record<string, string>, body: object) => request(s.app).post('/api/runs').set(auth).send(body);

describe('quota refusals say in a sentence, with units, what the run needs and what is left', () => {
  test('particles and steps beyond the role quota are refused with 403, and nothing is charged', async () => {
    const { user, auth } = await userWithToken(s);
    const big = await submit(auth, { spec: spec({ n: 5000 }) }).expect(403);
    expect(big.body.error).toMatchObject({ code: 'QUOTA_EXCEEDED', details: { limit: 'maxParticles', max: 2000, needed: 5000, remaining: 2000 } });
    expect(big.body.error.message).toBe('This run has 5\u2009000 particles; your limit is 2\u2009000 particles per run.');

    const long = await submit(auth, { spec: spec({ duration_Myr: 6000, timestep_Myr: 1, snapshotEvery: 100 }) }).expect(403);
    expect(long.body.error.details).toEqual({ limit: 'maxSteps', max: 5000, needed: 6000, remaining: 5000 });
    expect(long.body.error.message).toBe('This run takes 6\u2009000 steps (duration ÷ timestep); your limit is 5\u2009000 steps per run. Use a longer timestep or a shorter duration.');
    expect(await ledger(user.id)).toEqual({ interactions: 0, runs: 0 });
  });

  test('the daily budget: 429 while it would fit tomorrow, 403 when it never fits', async () => {
    const { user, auth } = await userWithToken(s);
    await setAllocation(s.em(), user, { dailyInteractions: 1.5 * COST });
    await submit(auth, { spec: spec() }).expect(201);
    const later = await submit(auth, { spec: spec() }).expect(429);
    expect(later.body.error.details).toEqual({ limit: 'dailyInteractions', max: 1.5 * COST, needed: COST, remaining: 0.5 * COST });
    // 6.25e7 interactions a run (500² × 250 steps), 9.375e7 a day: three significant digits.
    expect(later.body.error.message).toBe('This run needs 6.25e7 pair interactions; 3.13e7 of your 9.38e7 are left today. The budget resets at 00:00 UTC.');
    const never = await submit(auth, { spec: spec({ n: 1000 }) }).expect(403);
    expect(never.body.error.details).toMatchObject({ limit: 'dailyInteractions', needed: 4 * COST });
    expect(never.body.error.message).toBe('This run needs 2.5e8 pair interactions, more than your whole daily budget of 9.38e7. Use fewer particles or steps, or the tree solver.');

    const usage = await request(s.app).get('/api/account/usage').set(auth).expect(200);
    expect(usage.body).toMatchObject({
      limits: { maxParticles: 2000, maxSteps: 5000, maxConcurrentRuns: 2, dailyInteractions: 1.5 * COST },
      used: { interactionsToday: COST, activeRuns: 1 },
      remaining: { interactionsToday: 0.5 * COST, concurrentRuns: 1 },
      day: budgetDay(),
    });
    expect(await ledger(user.id)).toEqual({ interactions: COST, runs: 1 });
  });

  test('concurrent runs: a pair counts as two', async () => {
    const { auth } = await userWithToken(s);
    await submit(auth, { spec: spec() }).expect(201);
    const pair = await submit(auth, { spec: spec(), pairLaw: { kind: 'mond', interpolation: 'simple' } }).expect(429);
    expect(pair.body.error.details).toEqual({ limit: 'maxConcurrentRuns', max: 2, needed: 2, remaining: 1 });
    expect(pair.body.error.message).toBe('These 2 runs need 2 run slots; 1 of your 2 is free. Wait for a run to end, or cancel one.');
  });
});

describe('refusal wording for big numbers', () => {
  test('a daily budget in the hundreds of billions reads with powers of ten, and counts with digit groups', async () => {
    const { user, auth } = await userWithToken(s, 'researcher');
    // A 24 000-particle direct-sum run of 250 steps costs 24 000² × 250 = 1.44e11 pair interactions.
    await setAllocation(s.em(), user, { dailyInteractions: 9.96e10 });
    const big = spec({ n: 24_000, duration_Myr: 50, timestep_Myr: 0.2, snapshotEvery: 25 });
    expect(estimateInteractions(big)).toBe(1.44e11);
    const res = await submit(auth, { spec: big }).expect(403);
    expect(res.body.error.message).toBe('This run needs 1.44e11 pair interactions, more than your whole daily budget of 9.96e10. Use fewer particles or steps, or the tree solver.');
    const wide = await submit(auth, { spec: spec({ n: 60_000 }) }).expect(403);
    expect(wide.body.error.message).toBe('This run has 60\u2009000 particles; your limit is 50\u2009000 particles per run.');
    expect(await ledger(user.id)).toEqual({ interactions: 0, runs: 0 });
  });
});

describe('refunds', () => {
  test('a run cancelled before it starts gives its whole cost back, so the budget it held is free again', async () => {
    const { user, auth } = await userWithToken(s);
    await setAllocation(s.em(), user, { dailyInteractions: 1.5 * COST });
    const first = await submit(auth, { spec: spec() }).expect(201);
    await submit(auth, { spec: spec() }).expect(429);
    // No worker runs in this file, so the run is still queued when it is cancelled.
    await request(s.app).post(`/api/runs/${first.body.runs[0].id}/cancel`).set(auth).expect(202);
    expect((await ledger(user.id)).interactions).toBe(0);
    await submit(auth, { spec: spec() }).expect(201);
    expect((await ledger(user.id)).interactions).toBe(COST);
    // Cancelling again is refused and refunds nothing twice.
    await request(s.app).post(`/api/runs/${first.body.runs[0].id}/cancel`).set(auth).expect(409);
    expect((await ledger(user.id)).interactions).toBe(COST);
  });
});

describe('the ledger under concurrent submissions', () => {
  test('parallel submissions never spend more than the daily budget', async () => {
    const { user, auth } = await userWithToken(s);
    await setAllocation(s.em(), user, { dailyInteractions: 3.5 * COST, maxConcurrentRuns: 50 });
    const results = await Promise.all(Array.from({ length: 12 }, () => submit(auth, { spec: spec() })));
    const statuses = results.map((r) => r.status).sort();
    expect(statuses).toEqual([...Array(3).fill(201), ...Array(9).fill(429)]);
    for (const r of results.filter((x) => x.status === 429)) expect(r.body.error.details.limit).toBe('dailyInteractions');
    expect(await ledger(user.id)).toEqual({ interactions: 3 * COST, runs: 3 });
  });

  test('parallel submissions never start more runs than allowed at once', async () => {
    const { user, auth } = await userWithToken(s);
    await setAllocation(s.em(), user, { dailyInteractions: 100 * COST, maxConcurrentRuns: 2 });
    const results = await Promise.all(Array.from({ length: 8 }, () => submit(auth, { spec: spec() })));
    expect(results.filter((r) => r.status === 201)).toHaveLength(2);
    expect(results.filter((r) => r.status === 429).map((r) => r.body.error.details.limit)).toEqual(Array(6).fill('maxConcurrentRuns'));
    expect(await ledger(user.id)).toEqual({ interactions: 2 * COST, runs: 2 });
  });
});

describe('the 80 % warning', () => {
  test('is mailed once a day, when a charge crosses 80 % of the budget', async () => {
    const { user, auth } = await userWithToken(s);
    await setAllocation(s.em(), user, { dailyInteractions: 5 * COST, maxConcurrentRuns: 10 });
    const toUser = (m: { to: string[]; subject: string }) => m.to.includes(user.email!);
    for (let i = 0; i < 3; i++) await submit(auth, { spec: spec() }).expect(201); // 60 %
    await new Promise((r) => setTimeout(r, 300));
    expect(s.fakes.sink.messages().filter(toUser)).toHaveLength(0);

    await submit(auth, { spec: spec() }).expect(201); // 80 %
    const mail = await s.fakes.sink.waitFor(toUser);
    expect(mail.subject).toBe("You have used 80 % of today's compute budget");
    expect(mail.text).toContain(`${(4 * COST).toExponential(2).replace('e+', 'e')} of your ${(5 * COST).toExponential(2).replace('e+', 'e')} pair interactions`);
    expect(mail.html).toContain('<h1');

    await submit(auth, { spec: spec() }).expect(201); // 100 %, already warned today
    await new Promise((r) => setTimeout(r, 300));
    expect(s.fakes.sink.messages().filter(toUser)).toHaveLength(1);
  });
});
