import type { RngState } from '../rng';
import { isotropicDirection, MAX_REJECTION_DRAWS, rejectionGaveUp, uniform } from '../rng';
import type { ParticleState } from '../state';
import { sphericalModel, type MassModel, type SphericalProfile } from './massModel';

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
