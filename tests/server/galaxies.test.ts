// Galaxy uploads and access through the API, against real PostgreSQL and Redis: a good table is
// stored with its raw bytes; every refusal names the problem and stores nothing; who sees what.
import request from 'supertest';
import { openAuthStack, userWithToken, type AuthStack } from './auth/harness';
import { randomUUID } from 'node:crypto';
import { Cohort, CohortMember, Galaxy, GalaxyFit, Run, RunOutput, RunSnapshot, type User } from '../../server/db/entities';
import { defaultRunSpec, parseRunSpec } from '../../shared/spec';
import { runSimulation } from '../../shared/engine';
import { outputData } from '../../worker/store';
import { seedGalaxies } from '../../server/db/seed-galaxies';
import { ROLE_LIMITS } from '../../shared/api/accounts';
import { bytesText } from '../../shared/api/quotaWords';
import { newEnrolmentCode } from '../../server/services/cohorts';
import { inventedCurve } from '../../shared/galaxy/invented';
import { accelFromSI } from '../../shared/engine/units';

jest.setTimeout(60_000);

let s: AuthStack;
type Auth = { Authorization: string };
let owner: { user: User; auth: Auth };
let stranger: { user: User; auth: Auth };
let member: { user: User; auth: Auth };
let student: { user: User; auth: Auth };
let cohortId: number;

const GOOD = '# invented galaxy\nR_kpc,Vobs,e_Vobs,Vgas,Vdisk\n0.5,30,3,5,20\n1.0,50,2.5,8,35\n2.0,62,2,12,40\n';

beforeAll(async () => {
  s = await openAuthStack(55557);
  owner = await userWithToken(s, 'researcher', 'gx-owner');
  stranger = await userWithToken(s, 'researcher', 'gx-stranger');
  member = await userWithToken(s, 'student', 'gx-member');
  student = await userWithToken(s, 'student', 'gx-student');
  const em = s.em();
  const cohort = em.create(Cohort, {
    name: 'Galaxy seminar (invented)',
    enrolmentCode: newEnrolmentCode(),
    instructor: owner.user.id,
    maxParticles: 1000,
    maxSteps: 1000,
    maxConcurrentRuns: 1,
    dailyInteractions: 1e9,
  });
  await em.flush();
  em.create(CohortMember, { cohort: cohort.id, user: member.user.id });
  await em.flush();
  cohortId = cohort.id;
});

afterAll(async () => {
  await s.close();
});

const stored = (u: User) => s.em().count(Galaxy, { owner: u.id });

function upload(auth: Auth, body: string | Buffer, fields: Record<string, string> = {}, fileName = 'curve.csv') {
  const req = request(s.app).post('/api/galaxies').set(auth);
  for (const [k, v] of Object.entries({ name: 'Invented galaxy A', ...fields })) req.field(k, v);
  return req.attach('file', Buffer.isBuffer(body) ? body : Buffer.from(body, 'utf8'), fileName);
}

describe('uploading a rotation-curve table', () => {
  test('a good CSV is stored with its raw bytes, uploader and time, and read as a curve', async () => {
    const before = Date.now();
    const res = await upload(owner.auth, GOOD).expect(201);
    expect(res.body).toMatchObject({ name: 'Invented galaxy A', points: 3, visibility: 'private', owner: { id: owner.user.id }, canManage: true, fileName: 'curve.csv' });
    expect(res.body.curve.radiusKpc).toEqual([0.5, 1, 2]);
    expect(res.body.curve.vDisk).toEqual([20, 35, 40]);
    expect(new Date(res.body.uploadedAt).getTime()).toBeGreaterThanOrEqual(before - 1000);
    const raw = await request(s.app).get(`/api/galaxies/${res.body.id}/file`).set(owner.auth).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    }).expect(200);
    expect(raw.headers['content-disposition']).toMatch(/attachment/);
    expect((raw.body as Buffer).toString('utf8')).toBe(GOOD);
  });

  test('arcsec radii are converted with the distance given in the mapping', async () => {
    const mapping = JSON.stringify({ columns: { radius: 1, vObs: 2, vErr: 3 }, radiusUnit: 'arcsec', distanceMpc: { value: 10 } });
    const res = await upload(owner.auth, '10 40 3\n20 60 3\n', { mapping }).expect(201);
    // 10 arcsec at 10 Mpc: 10 * 1e4 kpc * pi/648000 = 0.4848 kpc (small-angle formula).
    expect(res.body.curve.radiusKpc[0]).toBeCloseTo(0.48481, 4);
    expect(res.body.mapping.radiusUnit).toBe('arcsec');
  });

  test.each([
    ['a cell that is not a number', GOOD.replace('50,2.5', '5O,2.5'), /line 4, column 2: "5O" is not a number/],
    ['formula injection in a cell', GOOD.replace('62,2', '=HYPERLINK("http://x"),2'), /line 5, column 2: .*formula/],
    ['formula injection in the header', GOOD.replace('Vgas', '@SUM(A1)'), /formula/],
    ['binary content', Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a, 0, 0, 0, 0x0d]), /binary/],
    ['a table not in UTF-8', Buffer.from('R,V,dV\n1,50,3\n# Galaxie fran\xe7aise\n', 'latin1'), /UTF-8/],
    ['radii out of order', '1,50,3\n0.5,40,3\n', /line 2, column 1: .*sorted/],
    ['an empty file', '', /empty/],
  ])('%s is refused with a clear message naming where, and nothing is stored', async (_what, body, message) => {
    const before = await stored(owner.user);
    const res = await upload(owner.auth, body as string | Buffer).expect(400);
    expect(res.body.error.code).toBe('BAD_REQUEST');
    expect(res.body.error.field).toBe('file');
    expect(res.body.error.message).toMatch(message);
    expect(await stored(owner.user)).toBe(before);
  });

  test('a table over the person’s byte limit is refused while it streams in, and nothing is stored', async () => {
    const { maxUploadBytes } = ROLE_LIMITS.student;
    const line = '1.0,50,3\n';
    const big = 'R,V,dV\n' + line.repeat(Math.ceil((maxUploadBytes + 10) / line.length));
    const res = await upload(student.auth, big).expect(413);
    expect(res.body.error.message).toContain(`your quota's largest table file: ${bytesText(maxUploadBytes)}`);
    expect(await stored(student.user)).toBe(0);
  });

  test('a table over the person’s row limit is refused, and nothing is stored', async () => {
    const { maxUploadRows } = ROLE_LIMITS.student;
    const rows = Array.from({ length: maxUploadRows + 1 }, (_, i) => `${i + 1},50,3`).join('\n');
    const res = await upload(student.auth, rows).expect(413);
    expect(res.body.error.message).toMatch(new RegExp(`${maxUploadRows} data rows`));
    expect(await stored(student.user)).toBe(0);
    // The same table is within a researcher's limits.
    await upload(stranger.auth, rows, { name: 'Invented long curve' }).expect(201);
  });

  test('bad fields are refused before the table is read: name, mapping, visibility, a second file', async () => {
    const before = await stored(owner.user);
    const noName = await request(s.app).post('/api/galaxies').set(owner.auth).attach('file', Buffer.from(GOOD), 'c.csv').expect(400);
    expect(noName.body.error.field).toBe('name');
    const badJson = await upload(owner.auth, GOOD, { mapping: '{columns:' }).expect(400);
    expect(badJson.body.error.message).toMatch(/mapping: is not valid JSON/);
    const badUnit = await upload(owner.auth, GOOD, { mapping: JSON.stringify({ radiusUnit: 'parsec' }) }).expect(400);
    expect(badUnit.body.error.field).toBe('mapping.radiusUnit');
    const arcsecNoDistance = await upload(owner.auth, GOOD, { mapping: JSON.stringify({ radiusUnit: 'arcsec' }) }).expect(400);
    expect(arcsecNoDistance.body.error.message).toMatch(/distance/);
    const notMine = await upload(stranger.auth, GOOD, { visibility: 'cohort', cohortId: String(cohortId) }).expect(400);
    expect(notMine.body.error.message).toMatch(/not in cohort/);
    const noFile = await request(s.app).post('/api/galaxies').set(owner.auth).field('name', 'x').expect(400);
    expect(noFile.body.error.field).toBe('file');
    const two = await request(s.app).post('/api/galaxies').set(owner.auth).field('name', 'x').attach('file', Buffer.from(GOOD), 'a.csv').attach('file', Buffer.from(GOOD), 'b.csv');
    expect(two.status).toBe(400);
    expect(await stored(owner.user)).toBe(before);
  });

  test('without a sign-in or token nothing can be uploaded or listed', async () => {
    await request(s.app).post('/api/galaxies').field('name', 'x').attach('file', Buffer.from(GOOD), 'a.csv').expect(401);
    await request(s.app).get('/api/galaxies').expect(401);
  });
});

describe('who sees a galaxy', () => {
  let privateId: number;
  let cohortGalaxyId: number;
  let publicId: number;
  beforeAll(async () => {
    privateId = (await upload(owner.auth, GOOD, { name: 'Invented private' }).expect(201)).body.id;
    cohortGalaxyId = (await upload(owner.auth, GOOD, { name: 'Invented for the seminar', visibility: 'cohort', cohortId: String(cohortId) }).expect(201)).body.id;
    publicId = (await upload(owner.auth, GOOD, { name: 'Invented for all', visibility: 'public' }).expect(201)).body.id;
  });

  const ids = async (auth: Auth) => ((await request(s.app).get('/api/galaxies').set(auth).expect(200)).body.galaxies as { id: number }[]).map((g) => g.id);

  test('private: only the owner; others get 404 on every route, as for a missing id', async () => {
    expect(await ids(owner.auth)).toEqual(expect.arrayContaining([privateId, cohortGalaxyId, publicId]));
    expect(await ids(stranger.auth)).not.toContain(privateId);
    for (const path of [`/api/galaxies/${privateId}`, `/api/galaxies/${privateId}/file`]) {
      const res = await request(s.app).get(path).set(stranger.auth).expect(404);
      expect(res.body.error.code).toBe('NOT_FOUND');
    }
    await request(s.app).patch(`/api/galaxies/${privateId}`).set(stranger.auth).send({ visibility: 'public' }).expect(404);
    await request(s.app).delete(`/api/galaxies/${privateId}`).set(stranger.auth).expect(404);
    expect(await s.em().count(Galaxy, { id: privateId, visibility: 'private' })).toBe(1);
  });

  test('cohort: its members see it, people outside it do not', async () => {
    expect(await ids(member.auth)).toContain(cohortGalaxyId);
    expect(await ids(member.auth)).not.toContain(privateId);
    await request(s.app).get(`/api/galaxies/${cohortGalaxyId}`).set(member.auth).expect(200);
    await request(s.app).get(`/api/galaxies/${cohortGalaxyId}`).set(stranger.auth).expect(404);
  });

  test('public: everyone signed in sees it, but only the owner changes it', async () => {
    const seen = await request(s.app).get(`/api/galaxies/${publicId}`).set(student.auth).expect(200);
    expect(seen.body.canManage).toBe(false);
    const res = await request(s.app).patch(`/api/galaxies/${publicId}`).set(student.auth).send({ name: 'Mine now' }).expect(403);
    expect(res.body.error.code).toBe('FORBIDDEN');
    await request(s.app).delete(`/api/galaxies/${publicId}`).set(student.auth).expect(403);
  });

  test('the owner shares and unshares; the cohort must be named and be theirs', async () => {
    await request(s.app).patch(`/api/galaxies/${privateId}`).set(owner.auth).send({ visibility: 'cohort' }).expect(400);
    const shared = await request(s.app).patch(`/api/galaxies/${privateId}`).set(owner.auth).send({ visibility: 'cohort', cohortId }).expect(200);
    expect(shared.body.cohort).toMatchObject({ id: cohortId });
    await request(s.app).get(`/api/galaxies/${privateId}`).set(member.auth).expect(200);
    // A rename leaves the sharing as it is.
    const renamed = await request(s.app).patch(`/api/galaxies/${privateId}`).set(owner.auth).send({ name: 'Invented, renamed' }).expect(200);
    expect(renamed.body).toMatchObject({ name: 'Invented, renamed', visibility: 'cohort', cohort: { id: cohortId } });
    await request(s.app).patch(`/api/galaxies/${privateId}`).set(owner.auth).send({ visibility: 'private' }).expect(200);
    await request(s.app).get(`/api/galaxies/${privateId}`).set(member.auth).expect(404);
  });

  test.each(['abc', '0', '-1', '1.5', '99999999999', '1%20OR%201=1'])('a malformed id (%s) is a 404', async (id) => {
    const res = await request(s.app).get(`/api/galaxies/${id}`).set(owner.auth).expect(404);
    expect(res.body.error.code).toBe('NOT_FOUND');
  });

  test('the owner deletes a galaxy, and its rows go with it', async () => {
    const id = (await upload(owner.auth, GOOD, { name: 'Invented to delete' }).expect(201)).body.id;
    await request(s.app).delete(`/api/galaxies/${id}`).set(owner.auth).expect(204);
    await request(s.app).get(`/api/galaxies/${id}`).set(owner.auth).expect(404);
    expect(await s.em().count(Galaxy, { id })).toBe(0);
  });
});

describe('fitting a galaxy through the API', () => {
  // An invented galaxy whose curve is exactly MOND (simple function, a0 = 1.2e-10 m/s^2) on its
  // baryons at Upsilon_disk = 0.5, with 3% errors and seeded noise.
  let id: number;
  beforeAll(async () => {
    const curve = inventedCurve(
      { disk: { mass_Msun: 4e10, scale_kpc: 2.5 }, gas: { mass_Msun: 1e10, scale_kpc: 5 } },
      Array.from({ length: 20 }, (_, i) => 0.75 * (i + 1)),
      (R, c) => {
        const gN = (c.vGas ** 2 + 0.5 * c.vDisk ** 2) / R;
        const y = gN / accelFromSI(1.2e-10);
        return Math.sqrt(R * gN * (0.5 + Math.sqrt(0.25 + 1 / y)));
      },
      (_R, v) => 0.03 * v + 2,
      7,
    );
    const lines = curve.radiusKpc.map((R, i) => [R, curve.vObs[i], curve.vErr[i], curve.vGas![i], curve.vDisk![i]].map((v) => v.toPrecision(8)).join(','));
    id = (await upload(owner.auth, ['R,Vobs,errV,Vgas,Vdisk', ...lines].join('\n'), { name: 'Invented MOND galaxy', visibility: 'public' }).expect(201)).body.id;
  });

  test('a fit request stores per-law results with chi^2, uncertainties and a BIC verdict', async () => {
    const res = await request(s.app).post(`/api/galaxies/${id}/fits`).set(stranger.auth).send({ laws: ['mond-simple', 'nfw'], a0: 'free' }).expect(201);
    expect(res.body.request).toEqual({ laws: ['mond-simple', 'nfw'], a0: 'free', H0: 'fixed' });
    expect(res.body.requestedBy.id).toBe(stranger.user.id);
    const mond = res.body.results.laws.find((l: { law: string }) => l.law === 'mond-simple');
    const a0 = mond.params.find((p: { name: string }) => p.name === 'a0');
    // The curve was made with a0 = 1.2e-10 m/s^2: recovered within 3 sigma (tolerance ours).
    expect(Math.abs(a0.value - 1.2e-10)).toBeLessThan(3 * a0.error);
    expect(mond.reducedChi2).toBeGreaterThan(0);
    expect(res.body.results.verdict.criterion).toBe('BIC');
    const detail = await request(s.app).get(`/api/galaxies/${id}`).set(owner.auth).expect(200);
    expect(detail.body.fits[0].id).toBe(res.body.id);
  });

  test('a bad fit request is refused naming the field; a galaxy one cannot see cannot be fitted', async () => {
    const bad = await request(s.app).post(`/api/galaxies/${id}/fits`).set(owner.auth).send({ laws: ['phlogiston'] }).expect(400);
    expect(bad.body.error.field).toBe('laws.0');
    await request(s.app).post(`/api/galaxies/${id}/fits`).set(owner.auth).send({ laws: [] }).expect(400);
    await request(s.app).post(`/api/galaxies/${id}/fits`).set(owner.auth).send({ a0: 'maybe' }).expect(400);
    const hidden = (await upload(owner.auth, GOOD, { name: 'Invented hidden' }).expect(201)).body.id;
    await request(s.app).post(`/api/galaxies/${hidden}/fits`).set(stranger.auth).send({}).expect(404);
  });
});

describe('the seeded demo galaxies', () => {
  test('three invented galaxies with fits, added once, marked invented, one shared with the demo cohort', async () => {
    const em = s.em();
    const instructor = s.seeded.users['ilse-varga'];
    await seedGalaxies(em, instructor, s.seeded.cohort);
    expect(await seedGalaxies(s.em(), instructor, s.seeded.cohort)).toBe(0);
    const rows = await s.em().find(Galaxy, { owner: instructor.id, invented: true }, { orderBy: { id: 'asc' } });
    expect(rows).toHaveLength(3);
    for (const g of rows) {
      expect(g.name).toMatch(/invented/);
      expect(Buffer.from(g.fileBytes).toString('utf8')).toMatch(/INVENTED demo data/);
      expect(await s.em().count(GalaxyFit, { galaxy: g.id })).toBeGreaterThan(0);
    }
    expect(rows.filter((g) => g.visibility === 'cohort').map((g) => (g.cohort as Cohort).id)).toEqual([s.seeded.cohort.id]);
  });
});

describe('particle tables through the same upload path', () => {
  const post = (auth: Auth, body: string | Buffer, name = 'particles.csv') => request(s.app).post('/api/particle-tables').set(auth).attach('file', Buffer.isBuffer(body) ? body : Buffer.from(body), name);

  test('a good table comes back as particles, with or without a header, and nothing is stored', async () => {
    const before = await s.em().count(Galaxy, {});
    const res = await post(owner.auth, 'x,y,z,vx,vy,vz,mass\n1,0,0,0,50,0,1e9\n-1,0,0,0,-50,0,1e9\n').expect(200);
    expect(res.body).toEqual({ fileName: 'particles.csv', particles: [
      { x_kpc: 1, y_kpc: 0, z_kpc: 0, vx_km_s: 0, vy_km_s: 50, vz_km_s: 0, mass_Msun: 1e9 },
      { x_kpc: -1, y_kpc: 0, z_kpc: 0, vx_km_s: 0, vy_km_s: -50, vz_km_s: 0, mass_Msun: 1e9 },
    ] });
    // Whitespace-separated, scientific notation, a malformed cell named by line and column.
    expect((await post(owner.auth, '1e0 0 0 0 5e1 0 1e9\n').expect(200)).body.particles).toEqual([{ x_kpc: 1, y_kpc: 0, z_kpc: 0, vx_km_s: 0, vy_km_s: 50, vz_km_s: 0, mass_Msun: 1e9 }]);
    expect((await post(owner.auth, '1 0 0 0 50 0 1e9\n1 0 0 0 50 0 4e\n').expect(400)).body.error.message).toBe('file: line 2, column 7: "4e" is not a number');
    expect(await s.em().count(Galaxy, {})).toBe(before);
  });

  test.each([
    ['a row of six numbers', '1,0,0,0,50,0,1e9\n1,0,0,0,50,0\n', /^file: line 2: expected 7 numbers/],
    ['a cell that is not a number', '1,0,0,0,50,0,1e9\n1,0,0,0,5O,0,1e9\n', /^file: line 2, column 5: "5O" is not a number/],
    ['formula injection', '1,0,0,0,50,0,=1+1\n', /^file: line 1, column 7: .*formula/],
    ['a zero mass', '1,0,0,0,50,0,0\n', /^file: line 1, column 7: mass 0 must be positive/],
    ['binary content', Buffer.from([0x1f, 0x8b, 0x08, 0, 0, 0, 0, 0]), /binary/],
    ['latin-1 text', Buffer.from('# Teilchen f\xfcr den Lauf\n1,0,0,0,50,0,1e9\n', 'latin1'), /UTF-8/],
  ])('%s is refused with a clear message', async (_what, body, message) => {
    const res = await post(owner.auth, body as string | Buffer).expect(400);
    expect(res.body.error.message).toMatch(message);
  });

  test('rows beyond the particles a run may have are refused', async () => {
    const rows = Array.from({ length: ROLE_LIMITS.student.maxUploadRows + 1 }, (_, i) => `${i},0,0,0,0,0,1e6`).join('\n');
    const res = await post(student.auth, rows).expect(413);
    expect(res.body.error.message).toMatch(/data rows/);
    await request(s.app).post('/api/particle-tables').attach('file', Buffer.from('1,0,0,0,0,0,1'), 'p.csv').expect(401);
  });
});

describe('a snapshot file from the export as a particle table', () => {
  const binary = (res: NodeJS.ReadableStream, done: (err: Error | null, body: Buffer) => void) => {
    const chunks: Buffer[] = [];
    res.on('data', (c: Buffer) => chunks.push(c));
    res.on('end', () => done(null, Buffer.concat(chunks)));
  };

  // A three-particle run: its stored JSON output is a real engine result, its frames are invented.
  const parsed = parseRunSpec({ ...defaultRunSpec(), model: { kind: 'plummer', n: 3, mass_Msun: 6e9, scale_kpc: 1 }, duration_Myr: 1 });
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.issues));
  const spec = parsed.spec;

  /** A finished run's rows as the worker stores them (invented numbers), exported as HDF5 through the API. */
  async function exportedFile(withVelocities: boolean): Promise<{ bytes: Buffer; last: { positions: Float32Array; velocities: Float32Array }; masses: Float64Array }> {
    const em = s.em();
    const run = em.create(Run, {
      id: randomUUID(), owner: owner.user.id, name: 'Export to restart (invented)', spec, modelKind: 'plummer', lawKind: 'newton',
      particles: 3, steps: 20, costInteractions: 0, status: 'finished', progress: 1, finishedAt: new Date(),
    });
    const masses = Float64Array.from([1e9, 2e9, 3e9]);
    em.create(RunOutput, {
      run: run.id, ...outputData(runSimulation(spec)), snapshotParticles: 3,
      particleIds: Buffer.from(Uint32Array.from([0, 1, 2]).buffer), masses: Buffer.from(masses.buffer), components: [{ label: 'sphere', start: 0, count: 3 }], engineVersion: 'test',
    });
    const frames = [0, 1].map((k) => ({ positions: Float32Array.from({ length: 9 }, (_, i) => i + k / 2), velocities: Float32Array.from({ length: 9 }, (_, i) => 10 * i - k) }));
    frames.forEach((f, frame) =>
      em.create(RunSnapshot, { run: run.id, frame, step: frame * 10, timeMyr: frame * 5, positions: Buffer.from(f.positions.buffer), velocities: withVelocities ? Buffer.from(f.velocities.buffer) : null }),
    );
    await em.flush();
    const res = await request(s.app).get(`/api/runs/${run.id}/snapshots.h5`).set(owner.auth).buffer(true).parse((r, done) => binary(r as unknown as NodeJS.ReadableStream, done)).expect(200);
    return { bytes: res.body as Buffer, last: frames[1], masses };
  }

  test('its last frame comes back as particles with their masses', async () => {
    const { bytes, last, masses } = await exportedFile(true);
    const res = await request(s.app).post('/api/particle-tables').set(owner.auth).attach('file', bytes, 'run.h5').expect(200);
    expect(res.body.particles).toEqual([0, 1, 2].map((i) => ({
      x_kpc: last.positions[3 * i], y_kpc: last.positions[3 * i + 1], z_kpc: last.positions[3 * i + 2],
      vx_km_s: last.velocities[3 * i], vy_km_s: last.velocities[3 * i + 1], vz_km_s: last.velocities[3 * i + 2], mass_Msun: masses[i],
    })));
  });

  test('a file without velocities, or an HDF5 file of another kind, is refused in words', async () => {
    const { bytes } = await exportedFile(false);
    const res = await request(s.app).post('/api/particle-tables').set(owner.auth).attach('file', bytes, 'old.h5').expect(400);
    expect(res.body.error.message).toMatch(/no velocities or masses/);
    const forged = Buffer.concat([Buffer.from([0x89, 0x48, 0x44, 0x46, 0x0d, 0x0a, 0x1a, 0x0a]), Buffer.alloc(64, 7)]);
    const bad = await request(s.app).post('/api/particle-tables').set(owner.auth).attach('file', forged, 'forged.h5').expect(400);
    expect(bad.body.error.message).toMatch(/^file: the HDF5 file cannot be read/);
  });
});
