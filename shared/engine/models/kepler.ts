import { z } from 'zod';
import { referenceLaw } from '../laws/registry';
import { allocateParticles, type ParticleState } from '../state';
import { G, internalToMyr } from '../units';
import { length, mass } from './fields';
import { pointMassModel, type MassModel } from './massModel';
import { defineModel } from './types';

const schema = z
  .strictObject({
    kind: z.literal('kepler'),
    mass1_Msun: mass.meta({ title: 'Mass 1' }),
    mass2_Msun: mass.meta({ title: 'Mass 2' }),
    semiMajorAxis_kpc: length.meta({ title: 'Semi-major axis' }),
    eccentricity: z.number().min(0).max(0.99).default(0).meta({ title: 'Eccentricity' }),
  })
  .describe('Two bodies on a Kepler orbit, starting at pericentre');

export type KeplerParams = z.infer<typeof schema>;

/** Two bodies at pericentre in the x-y plane, centre-of-mass frame: r_p = a (1 - e), v_p = sqrt(G M (1 + e) / r_p). */
export function placeKeplerPair(p: KeplerParams, out: ParticleState): void {
  const M = p.mass1_Msun + p.mass2_Msun;
  const rp = p.semiMajorAxis_kpc * (1 - p.eccentricity);
  const vp = Math.sqrt((G * M * (1 + p.eccentricity)) / rp);
  const f1 = p.mass2_Msun / M, f2 = p.mass1_Msun / M;
  out.m[0] = p.mass1_Msun; out.m[1] = p.mass2_Msun;
  out.x[0] = -f1 * rp; out.x[1] = f2 * rp;
  out.vy[0] = -f1 * vp; out.vy[1] = f2 * vp;
}

/** Curves of a Kepler pair are those of a point of the total mass. */
export const keplerModel = (p: KeplerParams): MassModel =>
  pointMassModel(p.mass1_Msun + p.mass2_Msun, 2 * p.semiMajorAxis_kpc * (1 + p.eccentricity));

export const keplerModule = defineModel({
  kind: 'kepler',
  schema,
  label: 'Kepler pair',
  note: 'Two bodies starting at pericentre: the cleanest check of an integrator.',
  // An invented example pair, sized to run in seconds under the default timestep.
  preset: { kind: 'kepler', mass1_Msun: 1e10, mass2_Msun: 2e9, semiMajorAxis_kpc: 5, eccentricity: 0.3 },
  traits: { geometry: 'spherical', systems: 1 },
  components: () => ['body 1', 'body 2'],
  particleCount: () => 2,
  particleFields: () => [],
  balancedPaths: [],
  equalMass: () => false,
  massModel: keplerModel,
  build(p) {
    const particles = allocateParticles(2);
    placeKeplerPair(p, particles);
    return { particles, components: [{ label: 'body 1', start: 0, count: 1 }, { label: 'body 2', start: 1, count: 1 }] };
  },
  // A Kepler pair is a Newtonian orbit.
  balanced: () => [{ system: 'Kepler pair', law: referenceLaw() }],
  orbit: (p) => ({
    period_Myr: internalToMyr(2 * Math.PI * Math.sqrt(p.semiMajorAxis_kpc ** 3 / (G * (p.mass1_Msun + p.mass2_Msun)))),
    innerRadius_kpc: p.semiMajorAxis_kpc * (1 - p.eccentricity),
  }),
});
