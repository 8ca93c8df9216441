// A mass model from an observed galaxy's tabulated baryonic curve, so the
// laws' own modelAcceleration code (the code behind the engine's analytic
// curves) computes the fitted curves too: one source of truth.
import { sphericalModel, type MassModel } from '../engine/models/massModel';
import { G } from '../engine/units';
import type { RotationCurve } from './table';

/** Mass-to-light ratios applied to the stellar components; gas is fixed at 1 (common practice: its mass is measured, not inferred from light). */
export interface MassToLight {
  disk: number;
  bulge: number;
}

/**
 * v_bar^2 at each tabulated radius, (km/s)^2: components add in quadrature,
 * each as v|v| so a component pulling outward (a gas term negative near the
 * centre, as tables give it) subtracts (common practice).
 */
export function baryonicSquared(curve: RotationCurve, ml: MassToLight): number[] {
  const sq = (list: number[] | null, i: number) => (list ? list[i] * Math.abs(list[i]) : 0);
  return curve.radiusKpc.map((_, i) => sq(curve.vGas, i) + ml.disk * sq(curve.vDisk, i) + ml.bulge * sq(curve.vBulge, i));
}

export const hasBaryons = (curve: RotationCurve): boolean => curve.vGas !== null || curve.vDisk !== null || curve.vBulge !== null;

/**
 * Spherical mass model whose Newtonian circular speed equals the tabulated
 * baryonic one at every tabulated radius. The enclosed mass is the proxy
 * M(R) = R v_bar^2 / G, i.e. the baryons are treated as spherical: exact for
 * Newton and the algebraic MOND curve (both use only g_N = v_bar^2 / R), an
 * approximation for emergent gravity, whose extra pull depends on how M grows.
 * Between tabulated radii M is linear in R; inside the first it grows as R^3
 * (uniform density); beyond the last it stays constant (no mass is assumed
 * where nothing was measured). The slope handed to emergent gravity is held
 * so that d(M R)/dR >= 0: a falling proxy (an outward gas term) cannot give
 * an imaginary apparent dark mass.
 */
export function tabulatedBaryonModel(curve: RotationCurve, ml: MassToLight): MassModel {
  const R = curve.radiusKpc;
  const M = baryonicSquared(curve, ml).map((v2, i) => (R[i] * v2) / G);
  const n = R.length;
  const last = R[n - 1];
  const segment = (r: number): number => {
    let lo = 0, hi = n - 1;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (R[mid] <= r) lo = mid;
      else hi = mid;
    }
    return lo;
  };
  const segmentSlope = (k: number) => (M[k + 1] - M[k]) / (R[k + 1] - R[k]);
  const enclosedMass = (r: number): number => {
    if (r <= R[0]) return M[0] * (r / R[0]) ** 3;
    if (r >= last) return M[n - 1];
    const k = segment(r);
    return M[k] + segmentSlope(k) * (r - R[k]);
  };
  const rawSlope = (r: number): number => {
    if (r < R[0]) return (3 * M[0] * r * r) / R[0] ** 3;
    if (r > last || n === 1) return 0;
    const k = Math.min(segment(r), n - 2);
    // At a tabulated radius the interpolant has a kink: take the mean of the two sides.
    if (r === R[k] && k > 0) return 0.5 * (segmentSlope(k - 1) + segmentSlope(k));
    if (r === last) return segmentSlope(n - 2);
    return segmentSlope(k);
  };
  return sphericalModel({
    totalMass_Msun: Math.max(0, M[n - 1]),
    outerRadius_kpc: last,
    scale_kpc: R[0],
    extent_kpc: last,
    enclosedMass,
    enclosedMassSlope: (r) => Math.max(rawSlope(r), r > 0 ? -enclosedMass(r) / r : 0),
  });
}
