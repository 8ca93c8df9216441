import type { Sources } from '../state';
import type { FieldSolver, PairKernel } from '../solvers/types';

/** Reusable per-size scratch so repeated diagnostics do not allocate. */
export function scratchFor() {
  let pot = new Float64Array(0);
  return (n: number): Float64Array => {
    if (pot.length !== n) pot = new Float64Array(n);
    return pot;
  };
}

/** W = 1/2 sum_i m_i phi_i of the pair potential, Msun (km/s)^2. */
export function pairPotentialEnergy(
  solver: FieldSolver,
  kernel: PairKernel,
  sources: Sources,
  scratch: ReturnType<typeof scratchFor>,
): number {
  const pot = scratch(sources.m.length);
  solver.potential(sources, sources, kernel, pot);
  let w = 0;
  for (let i = 0; i < pot.length; i++) w += sources.m[i] * pot[i];
  return 0.5 * w;
}
