// A law's own pull among a system's sampled particles, for laws whose model
// curve only approximates their field.
import { createLaw, lawModule, modelAcceleration, type LawSpec } from '../laws/registry';
import type { LawContext } from '../laws/types';
import { allocateAccelerations, type Sources } from '../state';
import { interpolate } from './isotropic';
import type { MassModel } from './massModel';

/** Unit vectors the pull is averaged over at each probe radius. */
export interface ProbeDirections {
  x: Float64Array;
  y: Float64Array;
  z: Float64Array;
}

/** `count` directions evenly round the ring in the x-y plane, half a step off the x axis. */
export function ringDirections(count: number): ProbeDirections {
  const phi = (j: number) => (2 * Math.PI * (j + 0.5)) / count;
  return {
    x: Float64Array.from({ length: count }, (_, j) => Math.cos(phi(j))),
    y: Float64Array.from({ length: count }, (_, j) => Math.sin(phi(j))),
    z: new Float64Array(count),
  };
}

/**
 * `count` directions spread evenly over the sphere on a Fibonacci lattice
 * (equal-area bands in z, golden-angle steps in azimuth; common practice):
 * fixed, so measuring the pull draws nothing from the run's random numbers.
 */
export function sphereDirections(count: number): ProbeDirections {
  const d = { x: new Float64Array(count), y: new Float64Array(count), z: new Float64Array(count) };
  const golden = Math.PI * (3 - Math.sqrt(5));
  for (let j = 0; j < count; j++) {
    const z = 1 - (2 * (j + 0.5)) / count, s = Math.sqrt(1 - z * z);
    d.x[j] = s * Math.cos(golden * j); d.y[j] = s * Math.sin(golden * j); d.z[j] = z;
  }
  return d;
}

/**
 * Where a law's model curve is not its own field but an approximation of it
 * (`approximateCurve`: the field form of MOND, whose pull equals the algebraic
 * ν g_N only in spherical symmetry and where its grid resolves the mass), a
 * system balanced for it would be balanced for the wrong field. Returns the
 * ratio of the law's own inward pull on probes among the sampled particles to
 * the model curve, averaged over the directions at each radius of `lnR`,
 * smoothed over neighbouring radii (particle graininess, about 1% per radius)
 * and held at the end radii's values beyond them. Other laws: ratio 1.
 */
export function lawPullRatio(law: LawSpec, ctx: LawContext, sources: Sources, model: MassModel, lnR: Float64Array, dirs: ProbeDirections): (R: number) => number {
  if (!lawModule(law.kind).approximateCurve) return () => 1;
  const radii = lnR.length, J = dirs.x.length;
  const probes = { x: new Float64Array(radii * J), y: new Float64Array(radii * J), z: new Float64Array(radii * J) };
  for (let r = 0; r < radii; r++) {
    const R = Math.exp(lnR[r]);
    for (let j = 0; j < J; j++) {
      probes.x[r * J + j] = R * dirs.x[j];
      probes.y[r * J + j] = R * dirs.y[j];
      probes.z[r * J + j] = R * dirs.z[j];
    }
  }
  const acc = allocateAccelerations(radii * J);
  createLaw(law, ctx).accelerations(sources, probes, acc);
  const raw = Float64Array.from({ length: radii }, (_, r) => {
    let inward = 0;
    for (let j = 0, k = r * J; j < J; j++, k++) inward -= acc.ax[k] * dirs.x[j] + acc.ay[k] * dirs.y[j] + acc.az[k] * dirs.z[j];
    return inward / J / modelAcceleration(law, model, Math.exp(lnR[r]));
  });
  const ratio = raw.map((_, r) => {
    const a = Math.max(0, r - 1), b = Math.min(radii - 1, r + 1);
    let sum = 0;
    for (let k = a; k <= b; k++) sum += raw[k];
    return sum / (b - a + 1);
  });
  return (R) => interpolate(lnR, ratio, Math.log(Math.max(R, 1e-300)));
}
