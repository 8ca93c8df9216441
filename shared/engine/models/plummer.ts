import type { RngState } from '../rng';
import { isotropicDirection, MAX_REJECTION_DRAWS, rejectionGaveUp, uniform } from '../rng';
import type { ParticleState } from '../state';
import { sphericalModel, type MassModel, type SphericalProfile } from './massModel';

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
