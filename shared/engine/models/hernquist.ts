import { z } from 'zod';
import type { RngState } from '../rng';
import { isotropicDirection, MAX_REJECTION_DRAWS, rejectionGaveUp, uniform } from '../rng';
import type { ParticleState } from '../state';
import { checkSystem, count, equilibriumLaw, length, liveHaloSchema, mass, truncation } from './fields';
import { sphericalModel, type MassModel, type SphericalProfile } from './massModel';
import { sampleSphere, sphereComponents, sphereMass, sphereMassModel } from './sphere';
import { defineSystem } from './system';

export interface HernquistParams {
  mass_Msun: number;
  scale_kpc: number;
  truncationRadius_kpc?: number;
}

/** Default cut at the radius enclosing 99% of the mass, about 199 a (common practice: the profile falls only as r^-4). */
const DEFAULT_MASS_FRACTION = 0.99;

const massFraction = (r: number, a: number): number => (r / (r + a)) ** 2;
const radiusOfFraction = (X: number, a: number): number => (a * Math.sqrt(X)) / (1 - Math.sqrt(X));

export function hernquistTruncation(p: HernquistParams): number {
  return p.truncationRadius_kpc ?? radiusOfFraction(DEFAULT_MASS_FRACTION, p.scale_kpc);
}

/** The truncated Hernquist (1990) profile, renormalised to mass_Msun inside the truncation radius. */
export function hernquistProfile(p: HernquistParams): SphericalProfile {
  const a = p.scale_kpc, rt = hernquistTruncation(p), M = p.mass_Msun;
  const Xc = massFraction(rt, a);
  return {
    totalMass_Msun: M,
    outerRadius_kpc: rt,
    scale_kpc: a,
    extent_kpc: Math.min(10 * a, rt),
    enclosedMass: (r) => (r >= rt ? M : (M * massFraction(r, a)) / Xc),
    enclosedMassSlope: (r) => (r >= rt ? 0 : (M * 2 * a * r) / ((r + a) ** 3 * Xc)),
  };
}

export const hernquistModel = (p: HernquistParams): MassModel => sphericalModel(hernquistProfile(p));

/** Radii drawn from the truncated profile by inverting M(r). */
function sampleHernquistRadius(p: HernquistParams, rng: RngState): number {
  const Xc = massFraction(hernquistTruncation(p), p.scale_kpc);
  let X = 0;
  for (let t = 0; X === 0; t++) {
    if (t === MAX_REJECTION_DRAWS) throw rejectionGaveUp('Hernquist radius');
    X = uniform(rng) * Xc;
  }
  return radiusOfFraction(X, p.scale_kpc);
}

/** Positions of particles start..start+count-1 of a Hernquist sphere; velocities are set apart (see isotropic.ts). */
export function sampleHernquistPositions(p: HernquistParams, rng: RngState, out: ParticleState, start: number, count: number): void {
  const m = p.mass_Msun / count;
  for (let i = start; i < start + count; i++) {
    const r = sampleHernquistRadius(p, rng);
    const [ux, uy, uz] = isotropicDirection(rng);
    out.x[i] = r * ux; out.y[i] = r * uy; out.z[i] = r * uz;
    out.m[i] = m;
  }
}

const schema = z
  .strictObject({
    kind: z.literal('hernquist'),
    n: count,
    mass_Msun: mass,
    scale_kpc: length.describe('Hernquist scale radius a').meta({ title: 'Scale radius a' }),
    truncationRadius_kpc: truncation,
    halo: liveHaloSchema,
    equilibriumLaw,
  })
  .describe('Hernquist (1990) sphere, isotropic velocities from the distribution function in the equilibrium law\'s field');

export type HernquistSpec = z.infer<typeof schema>;

const LABEL = 'Hernquist sphere';

export const hernquistModule = defineSystem({
  kind: 'hernquist',
  schema,
  label: LABEL,
  note: 'A cuspy sphere like a galaxy bulge or elliptical.',
  // An invented example system, sized to run in seconds under the default timestep.
  preset: { kind: 'hernquist', n: 1000, mass_Msun: 5e10, scale_kpc: 2 },
  traits: { geometry: 'spherical', systems: 1 },
  version1Reference: true,
  components: (s) => sphereComponents(LABEL, s),
  mass: (s) => sphereMass(s),
  massModel: (s) => sphereMassModel(hernquistProfile(s), s.halo),
  sample: (s, law, ctx, out, start) =>
    sampleSphere(s, LABEL, hernquistProfile(s), (rng, o, from, n) => sampleHernquistPositions(s, rng, o, from, n), law, ctx, out, start),
  checkSystem: (s, path, ctx) => checkSystem(s, 'scale_kpc', path, ctx),
});
