import type { Accelerations, Points, Sources } from '../state';
import { G } from '../units';
import { sumPotential, sumPull } from './pair';
import type { FieldSolver, PairKernel } from './types';

/**
 * Direct-sum field for targets iStart..iEnd-1 over all sources. Every target
 * sums its sources in index order, so splitting the range across threads over
 * shared arrays gives bit-identical results to one call over the whole range.
 * That is why the pair symmetry (half the work) is deliberately not used.
 */
export function directFieldRange(
  sources: Sources, targets: Points, kernel: PairKernel, iStart: number, iEnd: number, out: Accelerations,
): void {
  const acc = new Float64Array(3);
  for (let i = iStart; i < iEnd; i++) {
    acc.fill(0);
    sumPull(sources.x, sources.y, sources.z, sources.m, sources.m.length, targets.x[i], targets.y[i], targets.z[i], kernel, acc);
    out.ax[i] = G * acc[0]; out.ay[i] = G * acc[1]; out.az[i] = G * acc[2];
  }
}

/** Pair potential per unit mass, (km/s)^2, at targets iStart..iEnd-1; same ordering guarantee as the field. */
export function directPotentialRange(
  sources: Sources, targets: Points, kernel: PairKernel, iStart: number, iEnd: number, out: Float64Array,
): void {
  for (let i = iStart; i < iEnd; i++) {
    out[i] = -G * sumPotential(sources.x, sources.y, sources.z, sources.m, sources.m.length, targets.x[i], targets.y[i], targets.z[i], kernel);
  }
}

export const directSolver: FieldSolver = {
  kind: 'direct',
  field: (sources, targets, kernel, out) => directFieldRange(sources, targets, kernel, 0, targets.x.length, out),
  potential: (sources, targets, kernel, out) => directPotentialRange(sources, targets, kernel, 0, targets.x.length, out),
};
