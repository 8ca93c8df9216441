import type { PairKernel } from './types';

// Module-local aliases: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { sqrt, exp } = Math;

// The pair interaction, summed over a list of point sources at one target.
// Direct sum passes all particles (for the targets its paired loop leaves
// over); the tree passes the particles, and for a Yukawa kernel the cells,
// its walk gathered. The arithmetic is written out in each loop with the
// kernel's constants read once, and Newton and Yukawa have loops of their own,
// so each compiles to a tight loop with no calls and no branch on the law.
// With s^2 = r^2 + eps^2 the potential of mass m per unit mass is
// -G m (1 + alpha e^(-s/lambda)) / s.

/** Adds the pull at (xi, yi, zi), still to be multiplied by G, into acc[0..2]. Coincident points are skipped. */
export function sumPull(
  x: Float64Array, y: Float64Array, z: Float64Array, m: Float64Array, count: number,
  xi: number, yi: number, zi: number, k: PairKernel, acc: Float64Array,
): void {
  const eps2 = k.softening2_kpc2, alpha = k.yukawaAlpha, lambda = k.yukawaLambda_kpc;
  let sx = 0, sy = 0, sz = 0;
  if (alpha === 0) {
    for (let j = 0; j < count; j++) {
      const dx = x[j] - xi, dy = y[j] - yi, dz = z[j] - zi;
      const r2 = dx * dx + dy * dy + dz * dz;
      if (r2 === 0) continue; // a particle does not act on itself
      const inv = 1 / sqrt(r2 + eps2);
      const f = m[j] * inv * inv * inv;
      sx += f * dx; sy += f * dy; sz += f * dz;
    }
  } else {
    for (let j = 0; j < count; j++) {
      const dx = x[j] - xi, dy = y[j] - yi, dz = z[j] - zi;
      const r2 = dx * dx + dy * dy + dz * dz;
      if (r2 === 0) continue;
      const s2 = r2 + eps2;
      const inv = 1 / sqrt(s2);
      // -d/ds of (1 + alpha e^(-s/lambda))/s, relative to the Newtonian 1/s^2.
      const u = (s2 * inv) / lambda;
      const f = m[j] * inv * inv * inv * (1 + alpha * exp(-u) * (1 + u));
      sx += f * dx; sy += f * dy; sz += f * dz;
    }
  }
  acc[0] += sx; acc[1] += sy; acc[2] += sz;
}

/** Sum of m (1 + alpha e^(-s/lambda)) / s over the sources; the potential is -G times it. */
export function sumPotential(
  x: Float64Array, y: Float64Array, z: Float64Array, m: Float64Array, count: number,
  xi: number, yi: number, zi: number, k: PairKernel,
): number {
  const eps2 = k.softening2_kpc2, alpha = k.yukawaAlpha, lambda = k.yukawaLambda_kpc;
  let sp = 0;
  if (alpha === 0) {
    for (let j = 0; j < count; j++) {
      const dx = x[j] - xi, dy = y[j] - yi, dz = z[j] - zi;
      const r2 = dx * dx + dy * dy + dz * dz;
      if (r2 === 0) continue;
      sp += m[j] / sqrt(r2 + eps2);
    }
  } else {
    for (let j = 0; j < count; j++) {
      const dx = x[j] - xi, dy = y[j] - yi, dz = z[j] - zi;
      const r2 = dx * dx + dy * dy + dz * dz;
      if (r2 === 0) continue;
      const s = sqrt(r2 + eps2);
      sp += (m[j] / s) * (1 + alpha * exp(-s / lambda));
    }
  }
  return sp;
}
