import request from 'supertest';
import { openAuthStack, userWithToken, type AuthStack } from './harness';
import { signIn } from '../../support/auth';
import { Run, User } from '../../../server/db/entities';
import { notifyRunEnded } from '../../../server/services/notifications';
import { defaultRunSpec } from '../../../shared/spec';
import { lawName } from '../../../shared/engine';
import { config } from '../../../server/config';

let s: AuthStack;
beforeAll(async () => {
  s = await openAuthStack(55523);
});
afterAll(async () => {
  await s.close();
});

type Status = 'finished' | 'failed' | 'running' | 'cancelled' | 'queued';
async function runOf(user: User, status: Status, error: string | null = null, pair?: { id: string; lawKind: string }): Promise<Run> {
  const em = s.em();
  const spec = defaultRunSpec();
  const name = pair ? `Invented pair test · ${lawName(pair.lawKind)}` : 'Invented disk test';
  const run = em.create(Run, { id: crypto.randomUUID(), owner: user.id, name, spec, modelKind: 'plummer', lawKind: pair?.lawKind ?? 'newton', particles: 500, steps: 200, costInteractions: 5e7, status, error, pairId: pair?.id ?? null });
  await em.flush();
  return run;
}

describe('mail through the local sink', () => {
  test('an opted-in owner gets a plain-text and an HTML part when a run finishes', async () => {
    const { user, auth } = await userWithToken(s, 'researcher', 'mail');
    await request(s.app).patch('/api/account').set(auth).send({ notifyOnFinish: true }).expect(200);
    const run = await runOf(user, 'finished');
    expect(await notifyRunEnded(s.em(), run.id)).toBe('sent');

    // Read back through the outbox URL, as a developer would.
    const outbox = await request(s.fakes.sink.outboxUrl.replace(/\/messages$/, '')).get('/messages').expect(200);
    const mail = outbox.body.messages.find((m: { to: string[] }) => m.to.includes(user.email!));
    expect(mail.subject).toBe('Run finished: Invented disk test');
    expect(mail.from).toBe('noreply@infall.localhost');
    expect(mail.text).toContain('has finished');
    expect(mail.text).toContain(`/runs/${run.id}`);
    expect(mail.html).toContain(`href="${config.publicUrl}/runs/${run.id}"`);
    expect(mail.html).toMatch(/<h1[^>]*>Run finished: Invented disk test<\/h1>/);
  });

  test('a failure says why; nothing is sent to those who did not opt in, or for runs still going', async () => {
    const { user } = await userWithToken(s, 'researcher', 'mail');
    const failed = await runOf(user, 'failed', 'energy <blew up>');
    expect(await notifyRunEnded(s.em(), failed.id)).toBe('skipped');

    const em = s.em();
    await em.nativeUpdate(User, { id: user.id }, { notifyOnFinish: true });
    expect(await notifyRunEnded(s.em(), (await runOf(user, 'running')).id)).toBe('skipped');
    expect(await notifyRunEnded(s.em(), failed.id)).toBe('sent');
    const mail = await s.fakes.sink.waitFor((m) => m.to.includes(user.email!));
    expect(mail.subject).toBe('Run failed: Invented disk test');
    expect(mail.text).toContain('failed: energy <blew up>.');
    expect(mail.html).toContain('energy &#60;blew up&#62;'); // escaped, never markup
    expect(s.fakes.sink.messages().filter((m) => m.to.includes(user.email!))).toHaveLength(1);
  });

  test('a mail relay that is down does not make notifyRunEnded throw', async () => {
    const { user } = await userWithToken(s, 'researcher', 'mail');
    await s.em().nativeUpdate(User, { id: user.id }, { notifyOnFinish: true });
    const run = await runOf(user, 'finished');
    const port = config.mail.smtpPort;
    config.mail.smtpPort = 1; // nothing listens there
    const quiet = jest.spyOn(console, 'error').mockImplementation(() => undefined);
    try {
      expect(await notifyRunEnded(s.em(), run.id)).toBe('failed');
    } finally {
      config.mail.smtpPort = port;
      quiet.mockRestore();
    }
  });

  test('a pair sends one mail, once both runs have ended, that links to its comparison', async () => {
    const { user } = await userWithToken(s, 'researcher', 'mail');
    await s.em().nativeUpdate(User, { id: user.id }, { notifyOnFinish: true });
    const pairId = crypto.randomUUID();
    const newton = await runOf(user, 'finished', null, { id: pairId, lawKind: 'newton' });
    const mond = await runOf(user, 'running', null, { id: pairId, lawKind: 'mond' });
    // The first to end waits for its twin.
    expect(await notifyRunEnded(s.em(), newton.id)).toBe('skipped');
    await s.em().nativeUpdate(Run, { id: mond.id }, { status: 'failed', error: 'energy ran away' });
    expect(await notifyRunEnded(s.em(), mond.id)).toBe('sent');
    // A retried hook, from either run, sends nothing more.
    expect(await notifyRunEnded(s.em(), newton.id)).toBe('skipped');
    expect(await notifyRunEnded(s.em(), mond.id)).toBe('skipped');

    const mail = await s.fakes.sink.waitFor((m) => m.to.includes(user.email!));
    expect(mail.subject).toBe('Pair ended: Invented pair test');
    expect(mail.text).toContain('Newton: finished; MOND (algebraic): failed: energy ran away.');
    expect(mail.text).toContain(`${config.publicUrl}/compare?pair=${pairId}`);
    expect(mail.html).toContain(`href="${config.publicUrl}/compare?pair=${pairId}"`);
    expect(mail.text).not.toContain('/runs/');
    await new Promise((r) => setTimeout(r, 300));
    expect(s.fakes.sink.messages().filter((m) => m.to.includes(user.email!))).toHaveLength(1);
  });

  test('two halves of a pair ending at the same moment send exactly one mail between them', async () => {
    const { user } = await userWithToken(s, 'researcher', 'mail');
    await s.em().nativeUpdate(User, { id: user.id }, { notifyOnFinish: true });
    const pairId = crypto.randomUUID();
    const a = await runOf(user, 'finished', null, { id: pairId, lawKind: 'newton' });
    const b = await runOf(user, 'finished', null, { id: pairId, lawKind: 'emergent' });
    // Each on its own entity manager, as two worker processes would.
    const outcomes = await Promise.all([notifyRunEnded(s.em(), a.id), notifyRunEnded(s.em(), b.id)]);
    expect(outcomes.sort()).toEqual(['sent', 'skipped']);
    const mail = await s.fakes.sink.waitFor((m) => m.to.includes(user.email!));
    expect(mail.subject).toBe('Pair finished: Invented pair test');
    await new Promise((r) => setTimeout(r, 300));
    expect(s.fakes.sink.messages().filter((m) => m.to.includes(user.email!))).toHaveLength(1);
  });

  test('a pair whose runs were both cancelled sends nothing; one cancelled beside a finished one still mails', async () => {
    const { user } = await userWithToken(s, 'researcher', 'mail');
    await s.em().nativeUpdate(User, { id: user.id }, { notifyOnFinish: true });
    const both = crypto.randomUUID();
    const c1 = await runOf(user, 'cancelled', null, { id: both, lawKind: 'newton' });
    await runOf(user, 'cancelled', null, { id: both, lawKind: 'mond' });
    expect(await notifyRunEnded(s.em(), c1.id)).toBe('skipped');
    const mixed = crypto.randomUUID();
    await runOf(user, 'finished', null, { id: mixed, lawKind: 'newton' });
    const cancelled = await runOf(user, 'cancelled', null, { id: mixed, lawKind: 'yukawa' });
    expect(await notifyRunEnded(s.em(), cancelled.id)).toBe('sent');
    const mail = await s.fakes.sink.waitFor((m) => m.to.includes(user.email!));
    expect(mail.text).toContain('Newton: finished; Yukawa: cancelled.');
    expect(mail.text).toContain(`/compare?pair=${mixed}`);
  });

  test('cancelling the queued half of a pair whose other half finished sends the pair mail', async () => {
    const { user, auth } = await userWithToken(s, 'researcher', 'mail');
    await s.em().nativeUpdate(User, { id: user.id }, { notifyOnFinish: true });
    const pairId = crypto.randomUUID();
    await runOf(user, 'finished', null, { id: pairId, lawKind: 'newton' });
    const queued = await runOf(user, 'queued', null, { id: pairId, lawKind: 'mond' });
    await request(s.app).post(`/api/runs/${queued.id}/cancel`).set(auth).expect(202);
    const mail = await s.fakes.sink.waitFor((m) => m.to.includes(user.email!));
    expect(mail.text).toContain('Newton: finished; MOND (algebraic): cancelled.');
    expect(mail.text).toContain(`/compare?pair=${pairId}`);
  });

  test('an instructor invites students by mail with the enrolment code', async () => {
    const agent = request.agent(s.app);
    const { csrfToken } = await signIn(agent, 'ilse-varga');
    const { cohort } = s.seeded;
    const res = await agent
      .post(`/api/cohorts/${cohort.id}/invitations`)
      .set('X-CSRF-Token', csrfToken)
      .send({ emails: ['new.student@infall.example', 'NEW.student@infall.example', 'other@infall.example'] })
      .expect(202);
    expect(res.body.sent).toBe(2);
    const mail = await s.fakes.sink.waitFor((m) => m.to.includes('new.student@infall.example'));
    expect(mail.subject).toBe(`Join ${cohort.name} on Infall`);
    expect(mail.text).toContain(cohort.enrolmentCode);
    expect(mail.html).toContain(`code=${cohort.enrolmentCode}`);
    expect(mail.to).toEqual(['new.student@infall.example']); // one message each
    await agent.post(`/api/cohorts/${cohort.id}/invitations`).set('X-CSRF-Token', csrfToken).send({ emails: ['not an address'] }).expect(400);
  });
});
