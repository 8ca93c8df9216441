import type { ParticleState } from '../state';
import { G } from '../units';
import { pointMassModel, type MassModel } from './massModel';

export interface KeplerParams {
  mass1_Msun: number;
  mass2_Msun: number;
  semiMajorAxis_kpc: number;
  eccentricity: number;
}

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
