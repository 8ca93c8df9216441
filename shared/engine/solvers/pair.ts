import { pairKernelDefinition } from '../laws/kernels';
import { FAST_PATHS } from './fast';
import { MOMENTS, type PairKernel, type PairKernelDefinition, type PairLoops } from './types';

// Module-local alias: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { sqrt } = Math;

/**
 * The loops of any kernel, from its radial functions alone: one call per pair
 * or cell, so slower than a kernel's own loops (the cost is measured in
 * DEVELOPERS.md, "Adding a pair kernel").
 *
 * Cells: with d = centre of mass - target, s^2 = d^2 + eps^2, I the second
 * moments about the centre of mass and M the mass, the Taylor expansion of
 * sum_j m_j phi(|d + delta_j|, softened) to second order (the first-order term
 * vanishes about the centre of mass) is M phi + D1 tr(I) / 2 + D2 d.I.d / 2,
 * where D1 = phi'(s)/s, D2 = D1'(s)/s, D3 = D2'(s)/s; the pull, G times minus
 * its gradient in d, is G [-(M D1 + D2 tr(I) / 2 + D3 d.I.d / 2) d - D2 I.d].
 * This is the standard Cartesian multipole expansion of a radial kernel,
 * truncated after the quadrupole (as in Dehnen 2002, J. Comput. Phys. 179, 27,
 * cited from memory; common practice); the differentiation is our own, and
 * tests/engine/kernels.test.ts checks its d^-3 error law for every kernel.
 */
function genericLoops(def: PairKernelDefinition): PairLoops {
  const { pull, potential, derivatives } = def;
  const D = new Float64Array(3);
  return {
    pull(x, y, z, m, count, xi, yi, zi, eps2, p, acc) {
      let sx = 0, sy = 0, sz = 0;
      for (let j = 0; j < count; j++) {
        const dx = x[j] - xi, dy = y[j] - yi, dz = z[j] - zi;
        const r2 = dx * dx + dy * dy + dz * dz;
        if (r2 === 0) continue; // a particle does not act on itself
        const f = m[j] * pull(sqrt(r2 + eps2), p);
        sx += f * dx; sy += f * dy; sz += f * dz;
      }
      acc[0] += sx; acc[1] += sy; acc[2] += sz;
    },
    potential(x, y, z, m, count, xi, yi, zi, eps2, p) {
      let sp = 0;
      for (let j = 0; j < count; j++) {
        const dx = x[j] - xi, dy = y[j] - yi, dz = z[j] - zi;
        const r2 = dx * dx + dy * dy + dz * dz;
        if (r2 === 0) continue;
        sp += m[j] * potential(sqrt(r2 + eps2), p);
      }
      return sp;
    },
    cellPull(cl, cells, xi, yi, zi, eps2, p, acc) {
      let sx = 0, sy = 0, sz = 0;
      for (let k = 0, n = MOMENTS * cells; k < n; k += MOMENTS) {
        const dx = cl[k] - xi, dy = cl[k + 1] - yi, dz = cl[k + 2] - zi, M = cl[k + 3];
        derivatives(sqrt(dx * dx + dy * dy + dz * dz + eps2), p, D);
        const Ixx = cl[k + 4], Iyy = cl[k + 5], Izz = cl[k + 6], Ixy = cl[k + 7], Ixz = cl[k + 8], Iyz = cl[k + 9];
        const Idx = Ixx * dx + Ixy * dy + Ixz * dz, Idy = Ixy * dx + Iyy * dy + Iyz * dz, Idz = Ixz * dx + Iyz * dy + Izz * dz;
        const radial = -(M * D[0] + 0.5 * D[1] * (Ixx + Iyy + Izz) + 0.5 * D[2] * (dx * Idx + dy * Idy + dz * Idz));
        const q = D[1];
        sx += radial * dx - q * Idx; sy += radial * dy - q * Idy; sz += radial * dz - q * Idz;
      }
      acc[0] += sx; acc[1] += sy; acc[2] += sz;
    },
    cellPotential(cl, cells, xi, yi, zi, eps2, p) {
      let sp = 0;
      for (let k = 0, n = MOMENTS * cells; k < n; k += MOMENTS) {
        const dx = cl[k] - xi, dy = cl[k + 1] - yi, dz = cl[k + 2] - zi, M = cl[k + 3];
        const s = sqrt(dx * dx + dy * dy + dz * dz + eps2);
        derivatives(s, p, D);
        const Ixx = cl[k + 4], Iyy = cl[k + 5], Izz = cl[k + 6], Ixy = cl[k + 7], Ixz = cl[k + 8], Iyz = cl[k + 9];
        const dId = dx * (Ixx * dx + Ixy * dy + Ixz * dz) + dy * (Ixy * dx + Iyy * dy + Iyz * dz) + dz * (Ixz * dx + Iyz * dy + Izz * dz);
        sp += M * potential(s, p) + 0.5 * D[0] * (Ixx + Iyy + Izz) + 0.5 * D[1] * dId;
      }
      return sp;
    },
  };
}

const generic = new Map<string, PairLoops>();

/** The generic loops of a registered kernel, built once per thread. */
function genericLoopsOf(name: string): PairLoops {
  let loops = generic.get(name);
  if (!loops) generic.set(name, (loops = genericLoops(pairKernelDefinition(name))));
  return loops;
}

/** The loops the solvers sum `kernel` with: its fast path where it has one (unless told not to), else the generic loops of its registered definition. */
export function loopsFor(kernel: PairKernel): PairLoops {
  return (!kernel.generic && FAST_PATHS.get(kernel.name)) || genericLoopsOf(kernel.name);
}
