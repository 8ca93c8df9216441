// Upload size and row limits are quota limits like the others, against real PostgreSQL and Redis:
// the role gives the default, a cohort's quota (bounded by what instructors have) replaces it for
// its students, an admin's allocation (bounded by the ceilings) overrides both. The galaxy and
// particle-table uploads enforce the person's effective limits and store nothing when they refuse.
import request from 'supertest';
import { openAuthStack, userWithToken, type AuthStack } from './auth/harness';
import { Cohort, Galaxy, type User } from '../../server/db/entities';
import { newEnrolmentCode } from '../../server/services/cohorts';
import { COHORT_CEILING, LIMIT_CEILINGS, ROLE_LIMITS } from '../../shared/api/accounts';

jest.setTimeout(60_000);

type Auth = { Authorization: string };
let s: AuthStack;
let instructor: { user: User; auth: Auth };
let admin: { user: User; auth: Auth };

beforeAll(async () => {
  s = await openAuthStack(55583);
  instructor = await userWithToken(s, 'instructor', 'uq-teacher');
  admin = await userWithToken(s, 'admin', 'uq-admin');
});

afterAll(async () => {
  await s.close();
});

/** A rotation curve of `rows` data rows, padded with a comment to at least `bytes` bytes. */
function curve(rows: number, bytes = 0): string {
  const body = 'R_kpc,Vobs,e_Vobs\n' + Array.from({ length: rows }, (_, i) => `${(i + 1) / 10},${50 + (i % 7)},3`).join('\n') + '\n';
  return body.length >= bytes ? body : `# ${'x'.repeat(bytes - body.length)}\n${body}`;
}

/** Seven numbers a row: x y z vx vy vz mass. */
const particles = (rows: number) => Array.from({ length: rows }, (_, i) => `${i + 1},0,0,0,50,0,1e9`).join('\n') + '\n';

const uploadGalaxy = (auth: Auth, text: string) =>
  request(s.app).post('/api/galaxies').set(auth).field('name', 'Invented quota curve').attach('file', Buffer.from(text, 'utf8'), 'curve.csv');
const uploadParticles = (auth: Auth, text: string) => request(s.app).post('/api/particle-tables').set(auth).attach('file', Buffer.from(text, 'utf8'), 'particles.csv');
const limits = async (auth: Auth) => (await request(s.app).get('/api/account/usage').set(auth).expect(200)).body.limits;
const galaxiesOf = (u: User) => s.em().count(Galaxy, { owner: u.id });

const OTHERS = { maxParticles: 1500, maxSteps: 4000, maxConcurrentRuns: 1, dailyInteractions: 2e9 };

/** A cohort made by the instructor through the API, with a fresh student enrolled in it. */
async function cohortWithStudent(quota: object, prefix: string) {
  const created = await request(s.app).post('/api/cohorts').set(instructor.auth).send({ name: 'Upload seminar (invented)', quota }).expect(201);
  const student = await userWithToken(s, 'student', prefix);
  await request(s.app).post('/api/cohorts/join').set(student.auth).send({ code: created.body.cohort.enrolmentCode }).expect(200);
  return { id: created.body.cohort.id as number, student, summary: created.body.cohort };
}

describe('the role default', () => {
  test('a student in no cohort has the student upload limits, reported with the others and on the galaxy list', async () => {
    const student = await userWithToken(s, 'student', 'uq-alone');
    expect(await limits(student.auth)).toEqual(ROLE_LIMITS.student);
    const list = await request(s.app).get('/api/galaxies').set(student.auth).expect(200);
    expect(list.body.limits).toEqual({ maxUploadBytes: ROLE_LIMITS.student.maxUploadBytes, maxUploadRows: ROLE_LIMITS.student.maxUploadRows });
    const researcher = await userWithToken(s, 'researcher', 'uq-researcher');
    expect(await limits(researcher.auth)).toMatchObject({ maxUploadBytes: 4 * 1024 * 1024, maxUploadRows: 50_000 });
  });
});

describe("a cohort's quota sets what its students may upload", () => {
  test('a file over the cohort size is refused with 413 naming the limit, a table over its rows too; nothing is stored', async () => {
    const { student, summary } = await cohortWithStudent({ ...OTHERS, maxUploadBytes: 8 * 1024, maxUploadRows: 50 }, 'uq-small');
    expect(summary.quota).toEqual({ ...OTHERS, maxUploadBytes: 8192, maxUploadRows: 50 });
    expect(await limits(student.auth)).toEqual({ ...OTHERS, maxUploadBytes: 8192, maxUploadRows: 50 });
    expect((await request(s.app).get('/api/galaxies').set(student.auth).expect(200)).body.limits).toEqual({ maxUploadBytes: 8192, maxUploadRows: 50 });

    // 10 KB: within the student default (256 KB), over this cohort's 8 KB.
    const big = await uploadGalaxy(student.auth, curve(20, 10 * 1024)).expect(413);
    expect(big.body.error).toMatchObject({ code: 'PAYLOAD_TOO_LARGE', field: 'file' });
    expect(big.body.error.message).toBe("file: the table is larger than 8 KB, your quota's largest table file: 8 KB");

    const long = await uploadGalaxy(student.auth, curve(51)).expect(413);
    expect(long.body.error.message).toMatch(/more than 50 data rows/);
    expect(long.body.error.message).toContain("your quota's rows per table: 50");
    expect(await galaxiesOf(student.user)).toBe(0);

    const rows = await uploadParticles(student.auth, particles(51)).expect(413);
    expect(rows.body.error.message).toContain("your quota's rows per table: 50");
    const size = await uploadParticles(student.auth, `# ${'x'.repeat(9 * 1024)}\n${particles(2)}`).expect(413);
    expect(size.body.error.message).toContain("your quota's largest table file: 8 KB");

    // Within both limits it goes through.
    await uploadGalaxy(student.auth, curve(50)).expect(201);
    expect((await uploadParticles(student.auth, particles(50)).expect(200)).body.particles).toHaveLength(50);
    expect(await galaxiesOf(student.user)).toBe(1);
  });

  test('a cohort can give more than the student default, up to what instructors have', async () => {
    const { id, student } = await cohortWithStudent({ ...OTHERS, maxUploadRows: 3000 }, 'uq-more');
    const rows = curve(2500);
    // No byte limit given: the student default stands for it.
    expect(await limits(student.auth)).toMatchObject({ maxUploadBytes: ROLE_LIMITS.student.maxUploadBytes, maxUploadRows: 3000 });
    await uploadGalaxy(student.auth, rows).expect(201);

    const put = (quota: object) => request(s.app).put(`/api/cohorts/${id}/quota`).set(instructor.auth).send({ ...OTHERS, ...quota });
    const tooBig = await put({ maxUploadBytes: COHORT_CEILING.maxUploadBytes + 1024 }).expect(400);
    expect(tooBig.body.error.field).toBe('maxUploadBytes');
    expect(tooBig.body.error.message).toMatch(/largest table file can be at most 1 MB \(what instructors have themselves\)/);
    const tooLong = await put({ maxUploadRows: COHORT_CEILING.maxUploadRows + 1 }).expect(400);
    expect(tooLong.body.error.field).toBe('maxUploadRows');
    expect(tooLong.body.error.message).toMatch(/rows per table can be at most 10\u2009000/);
    const tooSmall = await put({ maxUploadBytes: 512 }).expect(400);
    expect(tooSmall.body.error.message).toMatch(/largest table file must be at least 1 KB/);
    // Refused settings leave the quota as it was.
    expect(await limits(student.auth)).toMatchObject({ maxUploadRows: 3000 });

    // A quota without upload limits (as scripts sent before they existed) gives the student defaults.
    await put({}).expect(200);
    expect(await limits(student.auth)).toMatchObject({ maxUploadBytes: ROLE_LIMITS.student.maxUploadBytes, maxUploadRows: ROLE_LIMITS.student.maxUploadRows });
    const refused = await uploadGalaxy(student.auth, rows).expect(413);
    expect(refused.body.error.message).toContain("your quota's rows per table: 2\u2009000");
  });

  test('a cohort row stored before upload limits existed (null) gives the student defaults', async () => {
    const em = s.em();
    const cohort = em.create(Cohort, { name: 'Old seminar (invented)', enrolmentCode: newEnrolmentCode(), instructor: instructor.user.id, ...OTHERS });
    await em.flush();
    const [row] = await em.execute<{ max_upload_bytes: number | null; max_upload_rows: number | null }[]>('select max_upload_bytes, max_upload_rows from cohorts where id = ?', [cohort.id]);
    expect(row).toEqual({ max_upload_bytes: null, max_upload_rows: null });
    const student = await userWithToken(s, 'student', 'uq-old');
    await request(s.app).post('/api/cohorts/join').set(student.auth).send({ code: cohort.enrolmentCode }).expect(200);
    expect(await limits(student.auth)).toEqual({ ...OTHERS, maxUploadBytes: ROLE_LIMITS.student.maxUploadBytes, maxUploadRows: ROLE_LIMITS.student.maxUploadRows });
    const summary = (await request(s.app).get(`/api/cohorts/${cohort.id}`).set(instructor.auth).expect(200)).body.cohort;
    expect(summary.quota).toEqual({ ...OTHERS, maxUploadBytes: ROLE_LIMITS.student.maxUploadBytes, maxUploadRows: ROLE_LIMITS.student.maxUploadRows });
  });
});

describe("an admin's allocation overrides role and cohort", () => {
  test('a grant lets a student upload what the cohort refused; clearing it restores the cohort limit', async () => {
    const { student } = await cohortWithStudent({ ...OTHERS, maxUploadBytes: 8 * 1024, maxUploadRows: 50 }, 'uq-granted');
    const table = curve(60, 12 * 1024);
    await uploadGalaxy(student.auth, table).expect(413);
    expect(await galaxiesOf(student.user)).toBe(0);

    const allocate = (body: object) => request(s.app).put(`/api/admin/users/${student.user.id}/allocation`).set(admin.auth).send(body);
    const granted = await allocate({ maxUploadBytes: 32 * 1024, maxUploadRows: 100 }).expect(200);
    expect(granted.body.user.allocation).toMatchObject({ maxUploadBytes: 32768, maxUploadRows: 100, maxParticles: null });
    expect(granted.body.user.limits).toMatchObject({ ...OTHERS, maxUploadBytes: 32768, maxUploadRows: 100 });
    expect(await limits(student.auth)).toEqual({ ...OTHERS, maxUploadBytes: 32768, maxUploadRows: 100 });
    await uploadGalaxy(student.auth, table).expect(201);
    const over = await uploadGalaxy(student.auth, curve(20, 40 * 1024)).expect(413);
    expect(over.body.error.message).toContain("your quota's largest table file: 32 KB");
    expect(await galaxiesOf(student.user)).toBe(1);

    // Ceilings: no allocation beyond them, with a message that says so; nothing changes.
    const tooBig = await allocate({ maxUploadBytes: LIMIT_CEILINGS.maxUploadBytes + 1 }).expect(400);
    expect(tooBig.body.error.field).toBe('maxUploadBytes');
    expect(tooBig.body.error.message).toMatch(/largest table file can be at most 16 MB \(the most any allocation may give\)/);
    const tooLong = await allocate({ maxUploadRows: LIMIT_CEILINGS.maxUploadRows + 1 }).expect(400);
    expect(tooLong.body.error.message).toMatch(/rows per table can be at most 100\u2009000/);
    expect(await limits(student.auth)).toMatchObject({ maxUploadBytes: 32768, maxUploadRows: 100 });

    // The admin's view of the person shows the same numbers.
    const detail = (await request(s.app).get(`/api/admin/users/${student.user.id}`).set(admin.auth).expect(200)).body;
    expect(detail.usage.limits).toMatchObject({ maxUploadBytes: 32768, maxUploadRows: 100 });

    await allocate({ maxUploadBytes: null }).expect(200);
    expect(await limits(student.auth)).toMatchObject({ maxUploadBytes: 8192, maxUploadRows: 100 });
    await uploadGalaxy(student.auth, table).expect(413);
    expect(await galaxiesOf(student.user)).toBe(1);
  });

  test('only admins set allocations, and only instructors of the cohort its quota', async () => {
    const { id, student } = await cohortWithStudent(OTHERS, 'uq-self');
    await request(s.app).put(`/api/admin/users/${student.user.id}/allocation`).set(student.auth).send({ maxUploadBytes: LIMIT_CEILINGS.maxUploadBytes }).expect(403);
    await request(s.app).put(`/api/cohorts/${id}/quota`).set(student.auth).send({ ...OTHERS, maxUploadBytes: COHORT_CEILING.maxUploadBytes }).expect(403);
    expect(await limits(student.auth)).toMatchObject({ maxUploadBytes: ROLE_LIMITS.student.maxUploadBytes });
  });
});
