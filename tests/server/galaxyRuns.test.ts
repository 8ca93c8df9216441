// A pair of runs from a galaxy's Newtonian fit, against real PostgreSQL and Redis: the specs are
// the ones the shared builder makes from the stored fit, both runs are charged and queued as a
// pair that remembers the galaxy, and only people who may see the galaxy can start one.
import request from 'supertest';
import { openAuthStack, userWithToken, type AuthStack } from './auth/harness';
import { Galaxy, GalaxyFit, Run, type User } from '../../server/db/entities';
import { inventedCurve } from '../../shared/galaxy/invented';
import { galaxyRunSpec, haloLawFromFit } from '../../shared/galaxy/toRun';
import { GALAXY_PAIR_LAW } from '../../shared/api/galaxies';
import { parseRunSpec } from '../../shared/spec';

jest.setTimeout(120_000);

let s: AuthStack;
type Auth = { Authorization: string };
let owner: { user: User; auth: Auth };
let other: { user: User; auth: Auth };
let privateId: number;
let publicId: number;
let unfittedId: number;

/** An invented galaxy: stellar disk (Upsilon 0.5), gas and a bulge (Upsilon 0.7) plus a smooth halo term. */
function table(): string {
  const R = Array.from({ length: 16 }, (_, i) => 0.8 * (i + 1));
  const c = inventedCurve(
    { disk: { mass_Msun: 4e10, scale_kpc: 2.5 }, gas: { mass_Msun: 1e10, scale_kpc: 5 }, bulge: { mass_Msun: 8e9, scale_kpc: 0.5 } },
    R,
    (r, v) => Math.sqrt(v.vGas ** 2 + 0.5 * v.vDisk ** 2 + 0.7 * v.vBulge ** 2 + (120 ** 2 * r) / (r + 3)),
    (_r, v) => 0.03 * v + 2,
    9,
  );
  const rows = c.radiusKpc.map((r, i) => [r, c.vObs[i], c.vErr[i], c.vGas![i], c.vDisk![i], c.vBulge![i]].map((x) => x.toPrecision(8)).join(','));
  return ['R,Vobs,errV,Vgas,Vdisk,Vbul', ...rows].join('\n');
}

async function galaxy(name: string, visibility: string, fitLaws: string[] | null): Promise<number> {
  const id = (await request(s.app).post('/api/galaxies').set(owner.auth).field('name', name).field('visibility', visibility).attach('file', Buffer.from(table()), 'c.csv').expect(201)).body.id;
  if (fitLaws) await request(s.app).post(`/api/galaxies/${id}/fits`).set(owner.auth).send({ laws: fitLaws }).expect(201);
  return id;
}

beforeAll(async () => {
  s = await openAuthStack(55565);
  owner = await userWithToken(s, 'researcher', 'gr-owner');
  other = await userWithToken(s, 'researcher', 'gr-other');
  privateId = await galaxy('Invented run galaxy', 'private', ['nfw', 'isothermal', 'mond-simple']);
  publicId = await galaxy('Invented public galaxy', 'public', ['isothermal']);
  unfittedId = await galaxy('Invented unfitted galaxy', 'private', null);
});

afterAll(async () => {
  await s.close();
});

const usage = async (auth: Auth) => (await request(s.app).get('/api/account/usage').set(auth).expect(200)).body.used.interactionsToday as number;

test('a pair is built from the newest Newtonian fit as stated, charged, and remembers its galaxy', async () => {
  const before = await usage(owner.auth);
  const res = await request(s.app).post(`/api/galaxies/${privateId}/runs`).set(owner.auth).send({ n: 400, duration_Myr: 20 }).expect(201);
  const runs = res.body.runs as { id: string; lawKind: string; pairId: string; galaxyId: number; costInteractions: number }[];
  expect(runs.map((r) => r.lawKind)).toEqual(['halo', 'qumond']);
  expect(runs[0].pairId).toBe(runs[1].pairId);
  expect(runs.every((r) => r.galaxyId === privateId)).toBe(true);
  // Both runs are charged to the person who asked.
  expect((await usage(owner.auth)) - before).toBe(runs[0].costInteractions + runs[1].costInteractions);

  // The specs are the shared builder's, from the halo fit with the lower BIC in the stored fit.
  const stored = (await s.em().findOneOrFail(GalaxyFit, { galaxy: privateId })).results;
  const halos = stored.laws.filter((l) => l.law === 'nfw' || l.law === 'isothermal');
  const best = halos.reduce((a, b) => (b.bic < a.bic ? b : a));
  const expected = parseRunSpec(galaxyRunSpec(best, { name: `Invented run galaxy from its fit under ${best.label}`, n: 400, duration_Myr: 20, timestep_Myr: 0.5, softening_kpc: 0.1, snapshotEvery: 10, seed: 1 }).spec);
  if (!expected.ok) throw new Error('the built spec does not parse');
  const rows = await s.em().find(Run, { pairId: runs[0].pairId }, { orderBy: { lawKind: 'asc' } });
  expect(rows.map((r) => (r.galaxy as Galaxy).id)).toEqual([privateId, privateId]);
  const [halo, mond] = rows;
  // The name says the fit in words (its law's label), not the fit's id.
  expect(halo.name.startsWith(`Invented run galaxy from its fit under ${best.label} · `)).toBe(true);
  expect(halo.name).not.toContain(`${best.law} fit`);
  expect(halo.spec.model).toEqual(expected.spec.model);
  expect(halo.spec.law).toEqual(haloLawFromFit(best));
  expect(halo.spec.model).toMatchObject({ kind: 'disk', n: 400, bulge: { mass_Msun: expect.any(Number) } });
  // The pair: same model and seed, the field-form MOND law.
  expect(mond.spec.model).toEqual(halo.spec.model);
  expect(mond.spec.seed).toBe(halo.spec.seed);
  expect(mond.spec.law).toEqual(GALAXY_PAIR_LAW);

  // Read back through the runs API, the summary names the galaxy.
  const one = await request(s.app).get(`/api/runs/${runs[0].id}`).set(owner.auth).expect(200);
  expect(one.body.galaxyId).toBe(privateId);
});

test('the halo and the pair law can be chosen', async () => {
  const res = await request(s.app)
    .post(`/api/galaxies/${privateId}/runs`)
    .set(owner.auth)
    .send({ halo: 'isothermal', n: 300, duration_Myr: 10, pairLaw: { kind: 'mond', interpolation: 'standard' } })
    .expect(201);
  const rows = await s.em().find(Run, { pairId: res.body.runs[0].pairId }, { orderBy: { lawKind: 'asc' } });
  expect(rows[0].spec.law).toMatchObject({ kind: 'halo', profile: 'cored-isothermal' });
  expect(rows[1].spec.law).toMatchObject({ kind: 'mond', interpolation: 'standard' });
});

test('a galaxy one may not see is missing; a public one starts runs owned by whoever asked', async () => {
  const count = () => s.em().count(Run, { owner: other.user.id });
  await request(s.app).post(`/api/galaxies/${privateId}/runs`).set(other.auth).send({}).expect(404);
  expect(await count()).toBe(0);
  const res = await request(s.app).post(`/api/galaxies/${publicId}/runs`).set(other.auth).send({ n: 300, duration_Myr: 10 }).expect(201);
  expect(res.body.runs.map((r: { owner: { id: number } }) => r.owner.id)).toEqual([other.user.id, other.user.id]);
  expect(await count()).toBe(2);
  await request(s.app).post(`/api/galaxies/${publicId}/runs`).send({}).expect(401);
});

test('refusals name the problem and store nothing', async () => {
  const before = await s.em().count(Run, { owner: owner.user.id });
  const none = await request(s.app).post(`/api/galaxies/${unfittedId}/runs`).set(owner.auth).send({}).expect(400);
  expect(none.body.error.message).toMatch(/no fit under nfw or isothermal; fit it under a Newtonian halo first/);
  const nfw = await request(s.app).post(`/api/galaxies/${publicId}/runs`).set(owner.auth).send({ halo: 'nfw' }).expect(400);
  expect(nfw.body.error.field).toBe('halo');
  expect((await request(s.app).post(`/api/galaxies/${privateId}/runs`).set(owner.auth).send({ n: 10 }).expect(400)).body.error.field).toBe('n');
  expect((await request(s.app).post(`/api/galaxies/${privateId}/runs`).set(owner.auth).send({ fitId: 999999 }).expect(404)).body.error.field).toBe('fitId');
  expect((await request(s.app).post(`/api/galaxies/${privateId}/runs`).set(owner.auth).send({ pairLaw: { kind: 'phlogiston' } }).expect(400)).body.error.field).toMatch(/^pairLaw/);
  expect((await request(s.app).post(`/api/galaxies/${privateId}/runs`).set(owner.auth).send({ extra: 1 }).expect(400)).body.error.code).toBe('BAD_REQUEST');
  expect(await s.em().count(Run, { owner: owner.user.id })).toBe(before);
});

test('deleting the galaxy keeps its runs, without the link', async () => {
  const id = await galaxy('Invented short-lived galaxy', 'private', ['nfw']);
  const res = await request(s.app).post(`/api/galaxies/${id}/runs`).set(owner.auth).send({ n: 200, duration_Myr: 5 }).expect(201);
  await request(s.app).delete(`/api/galaxies/${id}`).set(owner.auth).expect(204);
  const rows = await s.em().find(Run, { pairId: res.body.runs[0].pairId });
  expect(rows).toHaveLength(2);
  expect(rows.every((r) => r.galaxy === null)).toBe(true);
});
