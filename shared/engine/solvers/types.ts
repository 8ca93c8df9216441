import type { Accelerations, Points, Sources } from '../state';

/**
 * The pairwise interaction, described by numbers rather than a callback so a
 * worker thread can receive it as plain data. Softened Newton is
 * yukawaAlpha = 0. With s = sqrt(r^2 + eps^2) the pair potential is
 * -G m (1 + alpha e^(-s/lambda)) / s.
 */
export interface PairKernel {
  softening2_kpc2: number;
  yukawaAlpha: number;
  yukawaLambda_kpc: number;
}

export const newtonKernel = (softening_kpc: number): PairKernel => ({
  softening2_kpc2: softening_kpc * softening_kpc,
  yukawaAlpha: 0,
  yukawaLambda_kpc: Infinity,
});

/**
 * Pairwise field and potential of `sources` at `targets` (targets may be the
 * sources themselves: coincident points do not interact). Both write, not add.
 */
export interface FieldSolver {
  readonly kind: 'direct' | 'tree';
  /** Accelerations, (km/s)^2/kpc. */
  field(sources: Sources, targets: Points, kernel: PairKernel, out: Accelerations): void;
  /** Pair potential per unit mass, (km/s)^2. */
  potential(sources: Sources, targets: Points, kernel: PairKernel, out: Float64Array): void;
}
