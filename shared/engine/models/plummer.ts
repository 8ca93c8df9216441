import { z } from 'zod';
import type { RngState } from '../rng';
import { isotropicDirection, MAX_REJECTION_DRAWS, rejectionGaveUp, uniform } from '../rng';
import type { ParticleState } from '../state';
import { checkSystem, count, equilibriumLaw, length, liveHaloSchema, mass, truncation } from './fields';
import { sphericalModel, type MassModel, type SphericalProfile } from './massModel';
import { sampleSphere, sphereComponents, sphereMass, sphereMassModel } from './sphere';
import { defineSystem } from './system';

export interface PlummerParams {
  mass_Msun: number;
  scale_kpc: number;
  truncationRadius_kpc?: number;
}

/** Default cut at the radius enclosing 99.9% of the mass (common practice; keeps rare far outliers out). */
const DEFAULT_MASS_FRACTION = 0.999;

const massFraction = (r: number, a: number): number => (r * r * r) / (r * r + a * a) ** 1.5;
const radiusOfFraction = (X: number, a: number): number => a / Math.sqrt(X ** (-2 / 3) - 1);

export function plummerTruncation(p: PlummerParams): number {
  return p.truncationRadius_kpc ?? radiusOfFraction(DEFAULT_MASS_FRACTION, p.scale_kpc);
}

/** The truncated profile, renormalised to mass_Msun inside the truncation radius. */
export function plummerProfile(p: PlummerParams): SphericalProfile {
  const a = p.scale_kpc, rt = plummerTruncation(p);
  const Xc = massFraction(rt, a);
  const M = p.mass_Msun;
  return {
    totalMass_Msun: M,
    outerRadius_kpc: rt,
    scale_kpc: a,
    extent_kpc: Math.min(5 * a, rt),
    enclosedMass: (r) => (r >= rt ? M : (M * massFraction(r, a)) / Xc),
    enclosedMassSlope: (r) => (r >= rt ? 0 : (M * 3 * a * a * r * r) / ((r * r + a * a) ** 2.5 * Xc)),
  };
}

export const plummerModel = (p: PlummerParams): MassModel => sphericalModel(plummerProfile(p));

/**
 * Positions of particles start..start+count-1 of a Plummer sphere: radius
 * from the inverted mass profile (Aarseth, Henon & Wielen 1974), isotropic
 * direction. Velocities are set apart (see isotropic.ts).
 */
export function samplePlummerPositions(p: PlummerParams, rng: RngState, out: ParticleState, start: number, count: number): void {
  const a = p.scale_kpc;
  const Xc = massFraction(plummerTruncation(p), a);
  const m = p.mass_Msun / count;
  for (let i = start; i < start + count; i++) {
    let X = 0;
    for (let t = 0; X === 0; t++) {
      if (t === MAX_REJECTION_DRAWS) throw rejectionGaveUp('Plummer radius');
      X = uniform(rng) * Xc;
    }
    const r = radiusOfFraction(X, a);
    const [ux, uy, uz] = isotropicDirection(rng);
    out.x[i] = r * ux; out.y[i] = r * uy; out.z[i] = r * uz;
    out.m[i] = m;
  }
}

const schema = z
  .strictObject({
    kind: z.literal('plummer'),
    n: count,
    mass_Msun: mass,
    scale_kpc: length.describe('Plummer radius a').meta({ title: 'Scale radius a' }),
    truncationRadius_kpc: truncation,
    halo: liveHaloSchema,
    equilibriumLaw,
  })
  .describe('Plummer sphere: radii as Aarseth, Henon & Wielen (1974), isotropic velocities from the distribution function in the equilibrium law\'s field');

export type PlummerSpec = z.infer<typeof schema>;

const LABEL = 'Plummer sphere';

export const plummerModule = defineSystem({
  kind: 'plummer',
  schema,
  label: LABEL,
  note: 'A cored sphere in equilibrium, sampled from its distribution function.',
  // An invented example system, sized to run in seconds under the default timestep.
  preset: { kind: 'plummer', n: 500, mass_Msun: 1e10, scale_kpc: 1 },
  traits: { geometry: 'spherical', systems: 1 },
  version1Reference: true,
  components: (s) => sphereComponents(LABEL, s),
  mass: (s) => sphereMass(s),
  massModel: (s) => sphereMassModel(plummerProfile(s), s.halo),
  sample: (s, law, ctx, out, start) =>
    sampleSphere(s, LABEL, plummerProfile(s), (rng, o, from, n) => samplePlummerPositions(s, rng, o, from, n), law, ctx, out, start),
  checkSystem: (s, path, ctx) => checkSystem(s, 'scale_kpc', path, ctx),
});
