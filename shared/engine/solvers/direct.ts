import type { Accelerations, Points, Sources } from '../state';
import { G } from '../units';
import { loopsFor } from './pair';
import type { FieldSolver, PairKernel } from './types';

/**
 * Direct-sum field for targets iStart..iEnd-1 over all sources. Every target
 * sums its sources in index order with the same operations whichever path
 * below takes it, so splitting the range across threads over shared arrays
 * gives bit-identical results to one call over the whole range. That is why
 * the pair symmetry (half the work) is deliberately not used. A kernel's own
 * direct loops (softened Newton: the WebAssembly SIMD kernel where it loads,
 * directWasm.ts, which gives the same bits as its JS loops) take what they
 * can; the rest goes one target at a time through the kernel's pair loop.
 */
export function directFieldRange(
  sources: Sources, targets: Points, kernel: PairKernel, iStart: number, iEnd: number, out: Accelerations,
): void {
  const { x, y, z, m } = sources;
  const n = m.length;
  const { ax, ay, az } = out;
  const tx = targets.x, ty = targets.y, tz = targets.z;
  const eps2 = kernel.softening2_kpc2, p = kernel.params;
  const loops = loopsFor(kernel);
  let i = iStart + (loops.directField?.(sources, targets, eps2, p, iStart, iEnd, out) ?? 0);
  const acc = new Float64Array(3);
  for (; i < iEnd; i++) {
    acc[0] = 0; acc[1] = 0; acc[2] = 0;
    loops.pull(x, y, z, m, n, tx[i], ty[i], tz[i], eps2, p, acc);
    ax[i] = G * acc[0]; ay[i] = G * acc[1]; az[i] = G * acc[2];
  }
}

/** Pair potential per unit mass, (km/s)^2, at targets iStart..iEnd-1; same ordering guarantee as the field. */
export function directPotentialRange(
  sources: Sources, targets: Points, kernel: PairKernel, iStart: number, iEnd: number, out: Float64Array,
): void {
  const { x, y, z, m } = sources;
  const n = m.length;
  const tx = targets.x, ty = targets.y, tz = targets.z;
  const eps2 = kernel.softening2_kpc2, p = kernel.params;
  const loops = loopsFor(kernel);
  let i = iStart + (loops.directPotential?.(sources, targets, eps2, p, iStart, iEnd, out) ?? 0);
  for (; i < iEnd; i++) out[i] = -G * loops.potential(x, y, z, m, n, tx[i], ty[i], tz[i], eps2, p);
}

export const directSolver: FieldSolver = {
  kind: 'direct',
  field: (sources, targets, kernel, out) => directFieldRange(sources, targets, kernel, 0, targets.x.length, out),
  potential: (sources, targets, kernel, out) => directPotentialRange(sources, targets, kernel, 0, targets.x.length, out),
};
