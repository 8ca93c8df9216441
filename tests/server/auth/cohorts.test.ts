import request from 'supertest';
import { openAuthStack, type AuthStack } from './harness';
import { signIn, type Agent } from '../../support/auth';
import { uniqueLogin } from '../../support/stack';
import { defaultRunSpec } from '../../../shared/spec';
import { ROLE_LIMITS } from '../../../shared/api/accounts';

const STUDENT_UPLOADS = { maxUploadBytes: ROLE_LIMITS.student.maxUploadBytes, maxUploadRows: ROLE_LIMITS.student.maxUploadRows };

let s: AuthStack;
let instructor: Agent;
let instructorCsrf: string;
beforeAll(async () => {
  s = await openAuthStack(55526);
  instructor = request.agent(s.app);
  instructorCsrf = (await signIn(instructor, 'ilse-varga')).csrfToken;
});
afterAll(async () => {
  await s.close();
});

async function newStudent() {
  const agent = request.agent(s.app);
  const login = uniqueLogin('cohort-student');
  const { csrfToken } = await signIn(agent, login);
  return { agent, csrf: csrfToken, login };
}

describe('a cohort from creation to a cloned template', () => {
  test('instructor creates, student joins with the code, quota applies, template is cloned and run', async () => {
    const created = await instructor
      .post('/api/cohorts')
      .set('X-CSRF-Token', instructorCsrf)
      .send({ name: 'Rotation curves seminar (invented)', quota: { maxParticles: 1500, maxSteps: 4000, maxConcurrentRuns: 1, dailyInteractions: 2e9 } })
      .expect(201);
    const cohort = created.body.cohort;
    expect(cohort.enrolmentCode).toMatch(/^[2-9A-HJKMNP-Z]{4}-[2-9A-HJKMNP-Z]{4}$/);
    expect(cohort).toMatchObject({ memberCount: 0, instructor: { login: 'ilse-varga' } });

    const student = await newStudent();
    // Codes are forgiving about case, spaces and the dash.
    const typed = cohort.enrolmentCode.toLowerCase().replace('-', ' ');
    const joined = await student.agent.post('/api/cohorts/join').set('X-CSRF-Token', student.csrf).send({ code: typed }).expect(200);
    expect(joined.body.cohort).toMatchObject({ id: cohort.id, memberCount: 1 });
    expect(joined.body.cohort.enrolmentCode).toBeUndefined(); // only the instructor sees it
    await student.agent.post('/api/cohorts/join').set('X-CSRF-Token', student.csrf).send({ code: cohort.enrolmentCode }).expect(200); // idempotent

    const usage = await student.agent.get('/api/account/usage').expect(200);
    // The cohort set no upload limits: its students keep the student default for them.
    expect(usage.body.limits).toEqual({ maxParticles: 1500, maxSteps: 4000, maxConcurrentRuns: 1, dailyInteractions: 2e9, ...STUDENT_UPLOADS });

    await instructor.put(`/api/cohorts/${cohort.id}/quota`).set('X-CSRF-Token', instructorCsrf).send({ maxParticles: 1800, maxSteps: 4000, maxConcurrentRuns: 2, dailyInteractions: 3e9 }).expect(200);
    expect((await student.agent.get('/api/account/usage').expect(200)).body.limits.maxParticles).toBe(1800);

    const bad = await instructor.post(`/api/cohorts/${cohort.id}/templates`).set('X-CSRF-Token', instructorCsrf).send({ name: 'Broken', spec: { ...defaultRunSpec(), timestep_Myr: -1 } }).expect(400);
    expect(bad.body.error).toMatchObject({ code: 'INVALID_SPEC', field: 'spec.timestep_Myr' });

    const published = await instructor
      .post(`/api/cohorts/${cohort.id}/templates`)
      .set('X-CSRF-Token', instructorCsrf)
      .send({ name: 'Plummer sphere, Newton vs MOND', description: 'Compare energy drift.', spec: defaultRunSpec(), pairLaw: { kind: 'mond', interpolation: 'simple' } })
      .expect(201);
    const template = published.body.template;
    expect(template).toMatchObject({ cohortId: cohort.id, modelKind: 'plummer', lawKind: 'newton', pairLawKind: 'mond' });

    const listed = await student.agent.get('/api/templates').expect(200);
    expect(listed.body.templates.map((t: { id: number }) => t.id)).toEqual([template.id]);
    const detail = await student.agent.get(`/api/templates/${template.id}`).expect(200);
    expect(detail.body.template.spec).toEqual(defaultRunSpec());

    // Cloning: submit the template's spec as the student's own run pair.
    const run = await student.agent.post('/api/runs').set('X-CSRF-Token', student.csrf).send({ spec: detail.body.template.spec, pairLaw: detail.body.template.pairLaw }).expect(201);
    expect(run.body.runs).toHaveLength(2);

    const members = await instructor.get(`/api/cohorts/${cohort.id}/members`).expect(200);
    expect(members.body.members).toHaveLength(1);
    expect(members.body.members[0]).toMatchObject({ user: { login: student.login }, usage: { used: { activeRuns: 2, interactionsToday: 2 * run.body.runs[0].costInteractions } } });

    // The instructor sees the students' runs, read-only.
    const runId = run.body.runs[0].id;
    await instructor.get(`/api/runs/${runId}`).expect(200);
    const byCohort = await instructor.get(`/api/runs?cohort=${cohort.id}`).expect(200);
    expect(byCohort.body.runs.map((r: { id: string }) => r.id).sort()).toEqual(run.body.runs.map((r: { id: string }) => r.id).sort());
    await instructor.post(`/api/runs/${runId}/cancel`).set('X-CSRF-Token', instructorCsrf).expect(403);

    // Students outside the cohort see none of it.
    const outsider = await newStudent();
    await outsider.agent.get(`/api/runs/${runId}`).expect(404);
    await outsider.agent.get(`/api/templates/${template.id}`).expect(404);
    await outsider.agent.get(`/api/cohorts/${cohort.id}`).expect(404);
    expect((await outsider.agent.get('/api/templates').expect(200)).body.templates).toEqual([]);
  });

  test('a rotated code stops the old one from working', async () => {
    const { cohort } = (await instructor.post('/api/cohorts').set('X-CSRF-Token', instructorCsrf).send({ name: 'Short course (invented)' }).expect(201)).body;
    const rotated = (await instructor.post(`/api/cohorts/${cohort.id}/code`).set('X-CSRF-Token', instructorCsrf).expect(200)).body.cohort;
    expect(rotated.enrolmentCode).not.toBe(cohort.enrolmentCode);
    const student = await newStudent();
    const res = await student.agent.post('/api/cohorts/join').set('X-CSRF-Token', student.csrf).send({ code: cohort.enrolmentCode }).expect(404);
    expect(res.body.error.field).toBe('code');
    await student.agent.post('/api/cohorts/join').set('X-CSRF-Token', student.csrf).send({ code: rotated.enrolmentCode }).expect(200);
  });

  test('inputs are checked: a cohort quota may not exceed what instructors have, codes have a shape', async () => {
    const res = await instructor
      .post('/api/cohorts')
      .set('X-CSRF-Token', instructorCsrf)
      .send({ name: 'Greedy (invented)', quota: { maxParticles: 50_000, maxSteps: 1000, maxConcurrentRuns: 1, dailyInteractions: 1e9 } })
      .expect(400);
    expect(res.body.error.field).toBe('quota.maxParticles');
    await instructor.post('/api/cohorts').set('X-CSRF-Token', instructorCsrf).send({ name: '' }).expect(400);
    const student = await newStudent();
    const malformed = await student.agent.post('/api/cohorts/join').set('X-CSRF-Token', student.csrf).send({ code: 'ABC' }).expect(400);
    expect(malformed.body.error.field).toBe('code');
  });

  test('a cohort quota can never exceed the engine\'s limits or what instructors have, and nothing is stored when refused', async () => {
    const created = await instructor.post('/api/cohorts').set('X-CSRF-Token', instructorCsrf).send({ name: 'Capped (invented)' }).expect(201);
    const id = created.body.cohort.id;
    const before = created.body.cohort.quota;
    const put = (quota: object) => instructor.put(`/api/cohorts/${id}/quota`).set('X-CSRF-Token', instructorCsrf).send({ ...before, ...quota });

    // Above the engine's limits (100 000 particles, 200 000 steps per run).
    const engine = await put({ maxParticles: 150_000 }).expect(400);
    expect(engine.body.error.field).toBe('maxParticles');
    expect(engine.body.error.message).toContain('particles per run can be at most 10\u2009000 (what instructors have themselves)');
    const steps = await put({ maxSteps: 1e6 }).expect(400);
    expect(steps.body.error.message).toContain('steps per run can be at most 20\u2009000');
    // Within the engine's limits but above an instructor's own.
    await put({ maxParticles: 10_001 }).expect(400);
    const daily = await put({ dailyInteractions: 2e12 }).expect(400);
    expect(daily.body.error.message).toContain('pair interactions a day can be at most 1e12');
    const fraction = await put({ maxConcurrentRuns: 1.5 }).expect(400);
    expect(fraction.body.error.message).toContain('runs at a time must be a whole number');

    expect((await instructor.get(`/api/cohorts/${id}`).expect(200)).body.cohort.quota).toEqual(before);

    await put({ maxParticles: 10_000, maxSteps: 20_000 }).expect(200);
    const listed = await instructor.get('/api/cohorts').expect(200);
    expect(listed.body.cohorts.find((c: { id: number }) => c.id === id).quota).toEqual({ ...before, maxParticles: 10_000, maxSteps: 20_000 });
  });

  test('the seeded demo cohort has its three invented students and its quota', async () => {
    const { cohort } = s.seeded;
    const members = await instructor.get(`/api/cohorts/${cohort.id}/members`).expect(200);
    expect(members.body.members.map((m: { user: { login: string } }) => m.user.login).sort()).toEqual(['amira-solberg', 'jonas-achterberg', 'priya-ndlovu']);
    const amira = request.agent(s.app);
    await signIn(amira, 'amira-solberg');
    expect((await amira.get('/api/account/usage').expect(200)).body.limits).toEqual({ maxParticles: 3000, maxSteps: 8000, maxConcurrentRuns: 2, dailyInteractions: 1e11, ...STUDENT_UPLOADS });
  });
});
