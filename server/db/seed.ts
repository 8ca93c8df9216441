// The invented demo scenario: people, a cohort, a template, and runs that the worker
// really computes (submitted through the same path as a user's). Runs once per database.
import type { EntityManager } from '@mikro-orm/postgresql';
import type { Orm } from './orm';
import { Galaxy, Run } from './entities';
import { seedAccounts } from './seed-accounts';
import { seedGalaxies } from './seed-galaxies';
import { openRunQueue } from '../queue';
import { submitRuns } from '../services/runs';
import { runsFromGalaxy } from '../services/galaxies';
import { publishTemplate } from '../services/templates';
import { RUN_SPEC_VERSION } from '../../shared/spec';

// An invented barred-free spiral, "Kestrel", and an invented cluster, "Wren".
const kestrelDisk = {
  kind: 'disk',
  n: 1500,
  mass_Msun: 4e10,
  scaleLength_kpc: 2.5,
  scaleHeight_kpc: 0.3,
  toomreQ: 1.5,
  bulge: { mass_Msun: 6e9, scale_kpc: 0.5 },
} as const;
const kestrelHalo = { kind: 'halo', profile: 'nfw', scale_kpc: 15, density_Msun_kpc3: 8e6 } as const;

const base = { version: RUN_SPEC_VERSION, integrator: 'leapfrog', solver: { kind: 'direct' }, seed: 7 } as const;

const SCENARIO = {
  diskPair: {
    name: 'Kestrel disk (invented): halo or MOND?',
    spec: { ...base, model: kestrelDisk, law: kestrelHalo, timestep_Myr: 1, duration_Myr: 400, softening_kpc: 0.2, snapshotEvery: 8 },
    pairLaw: { kind: 'mond', interpolation: 'simple', a0_m_s2: 1.2e-10 },
  },
  clusterPair: {
    name: 'Wren cluster (invented): Newton or emergent?',
    spec: { ...base, model: { kind: 'plummer', n: 1000, mass_Msun: 2e9, scale_kpc: 0.8 }, law: { kind: 'newton' }, timestep_Myr: 0.5, duration_Myr: 200, softening_kpc: 0.05, snapshotEvery: 8 },
    pairLaw: { kind: 'emergent', H0_km_s_Mpc: 70 },
  },
  // Long enough to be seen in progress for a few minutes after start.
  longDisk: {
    name: 'Kestrel disk, long settle (invented)',
    spec: { ...base, model: { ...kestrelDisk, n: 4000 }, law: kestrelHalo, timestep_Myr: 0.5, duration_Myr: 2000, softening_kpc: 0.2, snapshotEvery: 40 },
  },
  // Two particles 1e-150 kpc apart with no softening: the force overflows double
  // precision and the engine stops with its reason. Shows how a failed run reads.
  broken: {
    name: 'Unsoftened close pair (invented)',
    spec: {
      ...base,
      model: {
        kind: 'table',
        recentre: false,
        particles: [
          { x_kpc: 0, y_kpc: 0, z_kpc: 0, vx_km_s: 0, vy_km_s: 0, vz_km_s: 0, mass_Msun: 1e9 },
          { x_kpc: 1e-150, y_kpc: 0, z_kpc: 0, vx_km_s: 0, vy_km_s: 0, vz_km_s: 0, mass_Msun: 1e9 },
        ],
      },
      law: { kind: 'newton' },
      timestep_Myr: 1,
      duration_Myr: 10,
      softening_kpc: 0,
      snapshotEvery: 1,
    },
  },
  studentPlummer: {
    name: 'First Plummer sphere',
    spec: { ...base, model: { kind: 'plummer', n: 800, mass_Msun: 1e10, scale_kpc: 1 }, law: { kind: 'newton' }, timestep_Myr: 0.5, duration_Myr: 150, softening_kpc: 0.05, snapshotEvery: 6 },
  },
  template: {
    name: 'Week 3: a disk under a halo and under MOND',
    description: 'Invented demo template: clone it, change one parameter, and compare the two rotation curves.',
    pairLaw: { kind: 'mond', interpolation: 'simple', a0_m_s2: 1.2e-10 },
    spec: { ...base, model: { ...kestrelDisk, n: 1000 }, law: kestrelHalo, timestep_Myr: 1, duration_Myr: 300, softening_kpc: 0.2, snapshotEvery: 10 },
  },
};

async function alreadySeeded(em: EntityManager, ownerId: number): Promise<boolean> {
  return (await em.count(Run, { owner: ownerId })) > 0;
}

export async function seedDemo(orm: Orm): Promise<void> {
  const em = orm.em.fork();
  const { users, cohort } = await seedAccounts(em);
  const researcher = users['teodora-vance'];
  // Galaxies are seeded on their own check, so a database seeded before they existed gets them too.
  const galaxies = await seedGalaxies(em, users['ilse-varga'], cohort);
  if (galaxies) console.log(`[infall] seeded ${galaxies} invented galaxies with their fits`);
  if (await alreadySeeded(em, researcher.id)) return;

  const queue = openRunQueue();
  try {
    await publishTemplate(em, users['ilse-varga'], cohort, SCENARIO.template);
    await submitRuns(em, queue, researcher, SCENARIO.diskPair);
    await submitRuns(em, queue, researcher, SCENARIO.clusterPair);
    await submitRuns(em, queue, researcher, SCENARIO.broken);
    await submitRuns(em, queue, researcher, SCENARIO.longDisk);
    await submitRuns(em, queue, users['amira-solberg'], SCENARIO.studentPlummer);
    // A pair built from the invented Kestrel galaxy's Newtonian fit, as the galaxy page starts one.
    const kestrel = await em.findOneOrFail(Galaxy, { owner: users['ilse-varga'].id, invented: true, name: { $like: 'Kestrel%' } }, { exclude: ['fileBytes'] });
    await runsFromGalaxy(em, queue, users['ilse-varga'], kestrel as Galaxy, { n: 1000, duration_Myr: 250 });
    console.log('[infall] seeded the invented demo: 6 people, a cohort, a template and 9 runs for the worker (two built from an invented galaxy)');
  } finally {
    await queue.close();
  }
}
