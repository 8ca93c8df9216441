import request from 'supertest';
import { openAuthStack, type AuthStack } from './harness';
import { signIn, type Agent } from '../../support/auth';
import { uniqueLogin } from '../../support/stack';
import { Cohort, CohortMember, CohortTemplate, Galaxy, Run, User } from '../../../server/db/entities';
import { parseRotationCurve } from '../../../shared/galaxy/table';
import { createCohort } from '../../../server/services/cohorts';
import { createToken } from '../../../server/services/tokens';
import { defaultRunSpec } from '../../../shared/spec';
import { ROLES, type Role } from '../../../shared/api/accounts';

// Who may call what: every route of the API for every role, table driven.

type Who = 'anonymous' | Role;
const WHO: Who[] = ['anonymous', ...ROLES];

interface Fixtures {
  cohort: number;
  template: number;
  run: string;
  user: number;
  galaxy: number;
}

interface Row {
  route: string; // "METHOD /path" with :cohort, :template, :run, :user, :galaxy, :token from the fixtures
  expected: Record<Who, number>;
  body?: (fx: Fixtures) => object;
  /** Ids made fresh for each call, for routes that use their target up. */
  fresh?: () => Promise<Partial<Fixtures & { token: number }>>;
  /** Sign in a throwaway session for each call (sign-out ends it). */
  ownSession?: boolean;
}

const e = (anonymous: number, student: number, instructor: number, researcher: number, admin: number) => ({ anonymous, student, instructor, researcher, admin });

let s: AuthStack;
let fx: Fixtures;
let studentId: number;
const agents = {} as Record<Role, { agent: Agent; csrf: string }>;
// Fresh people for every run, so reruns on one database don't pile up quota use.
const logins = Object.fromEntries(ROLES.map((r) => [r, uniqueLogin(`matrix-${r}`)])) as Record<Role, string>;
const ids = {} as Record<Role, number>;

async function queuedRunOfStudent(): Promise<string> {
  const em = s.em();
  const run = em.create(Run, { id: crypto.randomUUID(), owner: studentId, name: 'matrix fixture', spec: defaultRunSpec(), modelKind: 'plummer', lawKind: 'newton', particles: 500, steps: 200, costInteractions: 5e7 });
  await em.flush();
  return run.id;
}

async function templateOfCohort(): Promise<number> {
  const em = s.em();
  const t = em.create(CohortTemplate, { cohort: fx.cohort, name: 'matrix template', spec: defaultRunSpec(), pairLaw: null, createdBy: ids.instructor });
  await em.flush();
  return t.id;
}

/** A galaxy of the student's, shared with the matrix cohort (so its instructor sees it too). */
async function galaxyOfStudent(): Promise<number> {
  const em = s.em();
  const table = 'R,V,dV,Vdisk\n1,40,3,30\n2,60,3,40\n3,70,3,42\n4,74,3,40\n';
  const curve = parseRotationCurve(table, { maxBytes: 1000, maxRows: 10 });
  const g = em.create(Galaxy, { owner: studentId, name: 'Matrix galaxy (invented)', visibility: 'cohort', cohort: fx.cohort, fileName: 'm.csv', fileBytes: Buffer.from(table), fileSize: table.length, mapping: { columns: {}, radiusUnit: 'kpc' }, curve, points: 4 });
  await em.flush();
  return g.id;
}

const rows: Row[] = [
  // No worker beats in this file's stack, so health is 503 for everyone (its details go to admins only).
  { route: 'GET /api/health', expected: e(503, 503, 503, 503, 503) },
  { route: 'GET /api/nothing-here', expected: e(404, 404, 404, 404, 404) },

  { route: 'GET /api/auth/me', expected: e(401, 200, 200, 200, 200) },
  { route: 'GET /api/auth/signin?next=/runs', expected: e(302, 302, 302, 302, 302) },
  { route: 'GET /api/auth/callback?error=access_denied', expected: e(302, 302, 302, 302, 302) },
  { route: 'POST /api/auth/signout', expected: e(204, 204, 204, 204, 204), ownSession: true },

  { route: 'GET /api/account', expected: e(401, 200, 200, 200, 200) },
  { route: 'PATCH /api/account', expected: e(401, 200, 200, 200, 200), body: () => ({ notifyOnFinish: false }) },
  { route: 'GET /api/account/usage', expected: e(401, 200, 200, 200, 200) },

  { route: 'POST /api/tokens', expected: e(401, 201, 201, 201, 201), body: () => ({ name: 'matrix' }) },
  { route: 'GET /api/tokens', expected: e(401, 200, 200, 200, 200) },
  // The student's own token: only they can revoke it.
  {
    route: 'DELETE /api/tokens/:token',
    expected: e(401, 204, 404, 404, 404),
    fresh: async () => {
      const em = s.em();
      return { token: (await createToken(em, await em.findOneOrFail(User, { id: studentId }), { name: 'matrix', expiresInDays: 1 })).token.id };
    },
  },

  { route: 'POST /api/cohorts', expected: e(401, 403, 201, 403, 201), body: () => ({ name: 'Matrix cohort (invented)' }) },
  { route: 'GET /api/cohorts', expected: e(401, 200, 200, 200, 200) },
  { route: 'GET /api/cohorts/:cohort', expected: e(401, 200, 200, 404, 200) },
  { route: 'POST /api/cohorts/join', expected: e(401, 200, 403, 403, 403), body: () => ({ code: currentCode }) },
  { route: 'PUT /api/cohorts/:cohort/quota', expected: e(401, 403, 200, 404, 200), body: () => ({ maxParticles: 2000, maxSteps: 5000, maxConcurrentRuns: 3, dailyInteractions: 5e10 }) },
  { route: 'POST /api/cohorts/:cohort/code', expected: e(401, 403, 200, 404, 200) },
  { route: 'GET /api/cohorts/:cohort/members', expected: e(401, 403, 200, 404, 200) },
  { route: 'POST /api/cohorts/:cohort/invitations', expected: e(401, 403, 202, 404, 202), body: () => ({ emails: ['matrix.invitee@infall.example'] }) },
  { route: 'GET /api/cohorts/:cohort/templates', expected: e(401, 200, 200, 404, 200) },
  { route: 'POST /api/cohorts/:cohort/templates', expected: e(401, 403, 201, 404, 201), body: () => ({ name: 'Matrix template', spec: defaultRunSpec() }) },

  { route: 'GET /api/templates', expected: e(401, 200, 200, 200, 200) },
  { route: 'GET /api/templates/:template', expected: e(401, 200, 200, 404, 200) },
  { route: 'DELETE /api/templates/:template', expected: e(401, 403, 204, 404, 204), fresh: async () => ({ template: await templateOfCohort() }) },

  { route: 'GET /api/admin/users', expected: e(401, 403, 403, 403, 200) },
  { route: 'GET /api/admin/users/:user', expected: e(401, 403, 403, 403, 200) },
  { route: 'PATCH /api/admin/users/:user', expected: e(401, 403, 403, 403, 200), body: () => ({ role: 'researcher' }) },
  { route: 'PUT /api/admin/users/:user/allocation', expected: e(401, 403, 403, 403, 200), body: () => ({ maxParticles: 1000, dailyInteractions: null }) },

  { route: 'POST /api/runs', expected: e(401, 201, 201, 201, 201), body: () => ({ spec: defaultRunSpec() }) },
  { route: 'GET /api/runs', expected: e(401, 200, 200, 200, 200) },
  { route: 'GET /api/runs?cohort=:cohort', expected: e(401, 403, 200, 403, 200) },
  { route: 'GET /api/runs/:run', expected: e(401, 200, 200, 404, 200) },
  { route: 'GET /api/runs/:run/snapshots?format=2', expected: e(401, 200, 200, 404, 200) },
  // The run ended without output: whoever may read it is told there is nothing to download.
  { route: 'GET /api/runs/:run/snapshots.h5', expected: e(401, 409, 409, 404, 409) },
  { route: 'GET /api/runs/:run/events', expected: e(401, 200, 200, 404, 200) },
  // Instructors see their students' runs but may not cancel them.
  { route: 'POST /api/runs/:run/cancel', expected: e(401, 202, 403, 404, 202), fresh: async () => ({ run: await queuedRunOfStudent() }) },

  { route: 'GET /api/galaxies', expected: e(401, 200, 200, 200, 200) },
  { route: 'GET /api/galaxies/:galaxy', expected: e(401, 200, 200, 404, 200) },
  { route: 'GET /api/galaxies/:galaxy/file', expected: e(401, 200, 200, 404, 200) },
  // Anyone who sees a galaxy may fit it; only its owner (or an admin) changes or deletes it.
  { route: 'POST /api/galaxies/:galaxy/fits', expected: e(401, 201, 201, 404, 201), body: () => ({ laws: ['mond-simple'] }) },
  { route: 'PATCH /api/galaxies/:galaxy', expected: e(401, 200, 403, 404, 200), body: () => ({ name: 'Matrix galaxy, renamed (invented)' }) },
  { route: 'DELETE /api/galaxies/:galaxy', expected: e(401, 204, 403, 404, 204), fresh: async () => ({ galaxy: await galaxyOfStudent() }) },
];

let currentCode = '';

beforeAll(async () => {
  s = await openAuthStack(55517);
  const em = s.em();
  for (const role of ROLES) {
    const agent = request.agent(s.app);
    agents[role] = { agent, csrf: (await signIn(agent, logins[role])).csrfToken };
    // Roles are read on every request, so granting one after sign-in takes effect at once.
    await em.nativeUpdate(User, { login: logins[role] }, { role });
    ids[role] = (await em.findOneOrFail(User, { login: logins[role] })).id;
  }
  studentId = ids.student;
  // A cohort of the matrix's own, so other test files' counts stay put.
  const cohort = await createCohort(em, await em.findOneOrFail(User, { id: ids.instructor }), 'Matrix lab (invented)');
  em.create(CohortMember, { cohort: cohort.id, user: studentId });
  const target = em.create(User, { providerId: `test:${uniqueLogin('matrix-target')}`, login: uniqueLogin('matrix-target'), name: 'Matrix target' });
  await em.flush();
  fx = { cohort: cohort.id, template: 0, run: '', user: target.id, galaxy: 0 };
  fx.template = await templateOfCohort();
  const finished = await queuedRunOfStudent();
  await em.nativeUpdate(Run, { id: finished }, { status: 'finished', finishedAt: new Date() });
  fx.run = finished;
  fx.galaxy = await galaxyOfStudent();
});

afterAll(async () => {
  await s.close();
});

const cases = rows.flatMap((row) => WHO.map((who) => [row.route, who, row.expected[who], row] as const));

test.each(cases)('%s as %s → %i', async (route, who, status, row) => {
  const [method, pathTemplate] = route.split(' ');
  const ids = { ...fx, ...(row.fresh ? await row.fresh() : {}) } as Record<string, unknown>;
  currentCode = (await s.em().findOneOrFail(Cohort, { id: fx.cohort })).enrolmentCode;
  const path = pathTemplate.replace(/:(cohort|template|run|user|galaxy|token)\b/g, (_m, k: string) => String(ids[k]));

  let agent: Agent | ReturnType<typeof request>;
  let csrf: string | undefined;
  if (who === 'anonymous') agent = request(s.app);
  else if (row.ownSession) {
    agent = request.agent(s.app);
    csrf = (await signIn(agent, logins[who])).csrfToken;
  } else ({ agent, csrf } = agents[who]);

  let req = (agent as Agent)[method.toLowerCase() as 'get' | 'post' | 'put' | 'patch' | 'delete'](path);
  if (method !== 'GET' && csrf) req = req.set('X-CSRF-Token', csrf);
  if (row.body) req = req.send(row.body(fx));
  const res = await req;
  expect({ route, who, status: res.status, body: res.status >= 400 ? res.body : undefined }).toMatchObject({ route, who, status });
  if (status === 401) expect(res.body.error.code).toBe('UNAUTHENTICATED');
  if (status === 403) expect(res.body.error.code).toBe('FORBIDDEN');
});

describe('what the statuses mean in the data', () => {
  test('listing runs shows students their own, instructors their cohorts\' too, admins all', async () => {
    const ids = async (role: Role) => ((await agents[role].agent.get('/api/runs?limit=200').expect(200)).body.runs as { id: string }[]).map((r) => r.id);
    expect(await ids('student')).toContain(fx.run);
    expect(await ids('instructor')).toContain(fx.run);
    expect(await ids('admin')).toContain(fx.run);
    expect(await ids('researcher')).not.toContain(fx.run);
    const mine = ((await agents.researcher.agent.get('/api/runs?limit=200').expect(200)).body.runs as { owner: { login: string } }[]).map((r) => r.owner.login);
    expect(new Set(mine)).toEqual(new Set([logins.researcher]));
  });

  test('an admin grant changes what the user may run; an admin cannot drop their own role', async () => {
    const { agent, csrf } = agents.admin;
    await agent.put(`/api/admin/users/${studentId}/allocation`).set('X-CSRF-Token', csrf).send({ maxParticles: 7000 }).expect(200);
    expect((await agents.student.agent.get('/api/account/usage').expect(200)).body.limits.maxParticles).toBe(7000);
    await agent.put(`/api/admin/users/${studentId}/allocation`).set('X-CSRF-Token', csrf).send({ maxParticles: null }).expect(200);
    expect((await agents.student.agent.get('/api/account/usage').expect(200)).body.limits.maxParticles).toBe(2000);

    const self = (await agent.get('/api/auth/me').expect(200)).body.user.id;
    const res = await agent.patch(`/api/admin/users/${self}`).set('X-CSRF-Token', csrf).send({ role: 'student' }).expect(409);
    expect(res.body.error.code).toBe('CONFLICT');
    await agent.put(`/api/admin/users/${fx.user}/allocation`).set('X-CSRF-Token', csrf).send({ maxParticles: 10_000_000 }).expect(400);
  });

  test('a role granted by an admin takes effect on the next request of a signed-in user', async () => {
    const { agent, csrf } = agents.admin;
    const login = uniqueLogin('promoted');
    const them = request.agent(s.app);
    const theirs = await signIn(them, login);
    await them.post('/api/cohorts').set('X-CSRF-Token', theirs.csrfToken).send({ name: 'Not yet (invented)' }).expect(403);
    const id = (await them.get('/api/auth/me').expect(200)).body.user.id;
    await agent.patch(`/api/admin/users/${id}`).set('X-CSRF-Token', csrf).send({ role: 'instructor' }).expect(200);
    await them.post('/api/cohorts').set('X-CSRF-Token', theirs.csrfToken).send({ name: 'Now (invented)' }).expect(201);
  });
});

