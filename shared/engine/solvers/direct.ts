import type { Accelerations, Points, Sources } from '../state';
import { G } from '../units';
import { wasmDirect } from './directWasm';
import { sumPotential, sumPull } from './pair';
import type { FieldSolver, PairKernel } from './types';

// Module-local alias: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { sqrt } = Math;

/**
 * Direct-sum field for targets iStart..iEnd-1 over all sources. Every target
 * sums its sources in index order with the same operations whichever path
 * below takes it, so splitting the range across threads over shared arrays
 * gives bit-identical results to one call over the whole range. That is why
 * the pair symmetry (half the work) is deliberately not used. Softened Newton
 * goes to the WebAssembly SIMD kernel where it loads (directWasm.ts), which
 * gives the same bits as the loops here.
 */
export function directFieldRange(
  sources: Sources, targets: Points, kernel: PairKernel, iStart: number, iEnd: number, out: Accelerations,
): void {
  const { x, y, z, m } = sources;
  const n = m.length;
  const { ax, ay, az } = out;
  const tx = targets.x, ty = targets.y, tz = targets.z;
  const eps2 = kernel.softening2_kpc2;
  let i = iStart;
  const wasm = kernel.yukawaAlpha === 0 && eps2 > 0 ? wasmDirect() : null;
  if (wasm) {
    const even = (iEnd - iStart) & ~1;
    wasm.field(sources, targets, eps2, iStart, even, ax, ay, az);
    for (const a of [ax, ay, az]) for (let k = iStart; k < iStart + even; k++) a[k] *= G;
    i += even;
  } else if (kernel.yukawaAlpha === 0 && eps2 > 0) {
    // Softened Newton, two targets per pass over the sources: each source is
    // loaded once for both. With eps > 0 a coincident pair adds exactly +0
    // (d = 0 times a finite factor), so the loop needs no test for it.
    for (; i + 1 < iEnd; i += 2) {
      const xa = tx[i], ya = ty[i], za = tz[i], xb = tx[i + 1], yb = ty[i + 1], zb = tz[i + 1];
      let sxa = 0, sya = 0, sza = 0, sxb = 0, syb = 0, szb = 0;
      for (let j = 0; j < n; j++) {
        const xj = x[j], yj = y[j], zj = z[j], mj = m[j];
        const dxa = xj - xa, dya = yj - ya, dza = zj - za;
        const dxb = xj - xb, dyb = yj - yb, dzb = zj - zb;
        const ia = 1 / sqrt(dxa * dxa + dya * dya + dza * dza + eps2);
        const ib = 1 / sqrt(dxb * dxb + dyb * dyb + dzb * dzb + eps2);
        const fa = mj * ia * ia * ia, fb = mj * ib * ib * ib;
        sxa += fa * dxa; sya += fa * dya; sza += fa * dza;
        sxb += fb * dxb; syb += fb * dyb; szb += fb * dzb;
      }
      ax[i] = G * sxa; ay[i] = G * sya; az[i] = G * sza;
      ax[i + 1] = G * sxb; ay[i + 1] = G * syb; az[i + 1] = G * szb;
    }
  }
  // The odd target out, unsoftened Newton and Yukawa: one target at a time.
  const acc = new Float64Array(3);
  for (; i < iEnd; i++) {
    acc[0] = 0; acc[1] = 0; acc[2] = 0;
    sumPull(x, y, z, m, n, tx[i], ty[i], tz[i], kernel, acc);
    ax[i] = G * acc[0]; ay[i] = G * acc[1]; az[i] = G * acc[2];
  }
}

/** Pair potential per unit mass, (km/s)^2, at targets iStart..iEnd-1; same ordering guarantee (and pairing) as the field. */
export function directPotentialRange(
  sources: Sources, targets: Points, kernel: PairKernel, iStart: number, iEnd: number, out: Float64Array,
): void {
  const { x, y, z, m } = sources;
  const n = m.length;
  const tx = targets.x, ty = targets.y, tz = targets.z;
  const eps2 = kernel.softening2_kpc2;
  let i = iStart;
  const wasm = kernel.yukawaAlpha === 0 && eps2 > 0 ? wasmDirect() : null;
  if (wasm) {
    const even = (iEnd - iStart) & ~1;
    wasm.potentialSums(sources, targets, eps2, iStart, even, out);
    for (let k = iStart; k < iStart + even; k++) out[k] *= -G;
    i += even;
  } else if (kernel.yukawaAlpha === 0 && eps2 > 0) {
    // Two targets per pass, as in the field; here a coincident pair must be skipped (it would add m / eps).
    for (; i + 1 < iEnd; i += 2) {
      const xa = tx[i], ya = ty[i], za = tz[i], xb = tx[i + 1], yb = ty[i + 1], zb = tz[i + 1];
      let pa = 0, pb = 0;
      for (let j = 0; j < n; j++) {
        const xj = x[j], yj = y[j], zj = z[j], mj = m[j];
        const dxa = xj - xa, dya = yj - ya, dza = zj - za;
        const dxb = xj - xb, dyb = yj - yb, dzb = zj - zb;
        const r2a = dxa * dxa + dya * dya + dza * dza, r2b = dxb * dxb + dyb * dyb + dzb * dzb;
        if (r2a !== 0) pa += mj / sqrt(r2a + eps2);
        if (r2b !== 0) pb += mj / sqrt(r2b + eps2);
      }
      out[i] = -G * pa; out[i + 1] = -G * pb;
    }
  }
  for (; i < iEnd; i++) out[i] = -G * sumPotential(x, y, z, m, n, tx[i], ty[i], tz[i], kernel);
}

export const directSolver: FieldSolver = {
  kind: 'direct',
  field: (sources, targets, kernel, out) => directFieldRange(sources, targets, kernel, 0, targets.x.length, out),
  potential: (sources, targets, kernel, out) => directPotentialRange(sources, targets, kernel, 0, targets.x.length, out),
};
