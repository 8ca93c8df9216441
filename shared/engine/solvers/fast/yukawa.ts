// Newton plus a Yukawa term: the generic loops' arithmetic for
// phi = (1 + alpha e^(-s/lambda)) / s written out with the parameters read once;
// the tree's self-field and probes walked and summed group by group in WebAssembly
// SIMD (mixed precision, treeWasm.ts) where it loads, as Newton's are.
import { putGroupField, putGroupPotential, wasmTree } from '../treeWasm';
import { MOMENTS, type PairLoops } from '../types';

// Module-local aliases: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { sqrt, exp } = Math;

/**
 * The WebAssembly tree for these parameters, or null. With eps > 0 only (a target's own
 * slot must add exactly zero), and not for alpha below -0.9: there 1 + alpha e^(-u) (1 + u)
 * nears 0 at u << 1 and float32 terms would keep too few of its digits.
 */
const treeFor = (eps2: number, alpha: number) => (eps2 > 0 && alpha >= -0.9 ? wasmTree() : null);

export const yukawaLoops: PairLoops = {
  pull(x, y, z, m, count, xi, yi, zi, eps2, p, acc) {
    const alpha = p[0], lambda = p[1];
    let sx = 0, sy = 0, sz = 0;
    for (let j = 0; j < count; j++) {
      const dx = x[j] - xi, dy = y[j] - yi, dz = z[j] - zi;
      const r2 = dx * dx + dy * dy + dz * dz;
      if (r2 === 0) continue; // a particle does not act on itself
      const s2 = r2 + eps2;
      const inv = 1 / sqrt(s2);
      // -d/ds of (1 + alpha e^(-s/lambda))/s, relative to the Newtonian 1/s^2.
      const u = (s2 * inv) / lambda;
      const f = m[j] * inv * inv * inv * (1 + alpha * exp(-u) * (1 + u));
      sx += f * dx; sy += f * dy; sz += f * dz;
    }
    acc[0] += sx; acc[1] += sy; acc[2] += sz;
  },

  potential(x, y, z, m, count, xi, yi, zi, eps2, p) {
    const alpha = p[0], lambda = p[1];
    let sp = 0;
    for (let j = 0; j < count; j++) {
      const dx = x[j] - xi, dy = y[j] - yi, dz = z[j] - zi;
      const r2 = dx * dx + dy * dy + dz * dz;
      if (r2 === 0) continue;
      const s = sqrt(r2 + eps2);
      sp += (m[j] / s) * (1 + alpha * exp(-s / lambda));
    }
    return sp;
  },

  // The generic expansion with F1 = D1/2, F2 = D2/4, F3 = D3/8 (the derivatives in r^2) of yukawa.ts's D1..D3.
  cellPull(cl, cells, xi, yi, zi, eps2, p, acc) {
    const alpha = p[0], L = p[1];
    const iL = 1 / L, c1 = 0.5 * iL, c2 = 0.25 * iL * iL, c3 = 0.125 * iL * iL * iL;
    let sx = 0, sy = 0, sz = 0;
    for (let k = 0, n = MOMENTS * cells; k < n; k += MOMENTS) {
      const dx = cl[k] - xi, dy = cl[k + 1] - yi, dz = cl[k + 2] - zi, M = cl[k + 3];
      const s2 = dx * dx + dy * dy + dz * dz + eps2;
      const inv = 1 / sqrt(s2), s = s2 * inv;
      const inv2 = inv * inv, inv3 = inv2 * inv, inv5 = inv3 * inv2, inv7 = inv5 * inv2;
      const e = alpha * exp(-s * iL);
      const F1 = -0.5 * inv3 - e * c1 * (s + L) * inv3;
      const F2 = 0.75 * inv5 + e * c2 * (s2 + 3 * L * s + 3 * L * L) * inv5;
      const F3 = -1.875 * inv7 - e * c3 * (s2 * s + 6 * L * s2 + 15 * L * L * s + 15 * L * L * L) * inv7;
      const Ixx = cl[k + 4], Iyy = cl[k + 5], Izz = cl[k + 6], Ixy = cl[k + 7], Ixz = cl[k + 8], Iyz = cl[k + 9];
      const Idx = Ixx * dx + Ixy * dy + Ixz * dz, Idy = Ixy * dx + Iyy * dy + Iyz * dz, Idz = Ixz * dx + Iyz * dy + Izz * dz;
      const radial = -(2 * M * F1 + 2 * F2 * (Ixx + Iyy + Izz) + 4 * F3 * (dx * Idx + dy * Idy + dz * Idz));
      const q = 4 * F2;
      sx += radial * dx - q * Idx; sy += radial * dy - q * Idy; sz += radial * dz - q * Idz;
    }
    acc[0] += sx; acc[1] += sy; acc[2] += sz;
  },

  cellPotential(cl, cells, xi, yi, zi, eps2, p) {
    const alpha = p[0], L = p[1];
    const iL = 1 / L, c1 = 0.5 * iL, c2 = 0.25 * iL * iL;
    let sp = 0;
    for (let k = 0, n = MOMENTS * cells; k < n; k += MOMENTS) {
      const dx = cl[k] - xi, dy = cl[k + 1] - yi, dz = cl[k + 2] - zi, M = cl[k + 3];
      const s2 = dx * dx + dy * dy + dz * dz + eps2;
      const inv = 1 / sqrt(s2), s = s2 * inv;
      const inv2 = inv * inv, inv3 = inv2 * inv, inv5 = inv3 * inv2;
      const e = alpha * exp(-s * iL);
      const F0 = inv + e * inv;
      const F1 = -0.5 * inv3 - e * c1 * (s + L) * inv3;
      const F2 = 0.75 * inv5 + e * c2 * (s2 + 3 * L * s + 3 * L * L) * inv5;
      const Ixx = cl[k + 4], Iyy = cl[k + 5], Izz = cl[k + 6], Ixy = cl[k + 7], Ixz = cl[k + 8], Iyz = cl[k + 9];
      const dId = dx * (Ixx * dx + Ixy * dy + Ixz * dz) + dy * (Ixy * dx + Iyy * dy + Iyz * dz) + dz * (Ixz * dx + Iyz * dy + Izz * dz);
      sp += M * F0 + F1 * (Ixx + Iyy + Izz) + 2 * F2 * dId;
    }
    return sp;
  },

  // Where it declines (see treeFor) or a float32 sum overflows, the tree walks and sums the group with the loops above.
  treeGroupField(tree, targets, from, to, theta2, few, eps2, p, out) {
    const sums = treeFor(eps2, p[0])?.groupFieldYukawa(tree, targets, from, to, theta2, few, eps2, p[0], p[1]);
    if (!sums) return false;
    putGroupField(tree, targets, from, to, sums, out);
    return true;
  },

  treeGroupPotential(tree, targets, from, to, theta2, few, eps2, p, out) {
    const sums = treeFor(eps2, p[0])?.groupPotentialYukawa(tree, targets, from, to, theta2, few, eps2, p[0], p[1]);
    if (!sums) return false;
    putGroupPotential(tree, targets, from, to, sums, out);
    return true;
  },
};
