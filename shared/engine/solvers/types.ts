import type { Accelerations, Points, Sources } from '../state';
import type { GridThreads } from './grid';
import type { Octree } from './tree';

/**
 * One pair interaction as plain data, so it crosses to worker threads as it is:
 * the name of a registered kernel (laws/kernels.ts), the softening, and the
 * kernel's numeric parameters in the order its definition names them. Solvers
 * and threads look the kernel's functions up by name.
 */
export interface PairKernel {
  name: string;
  softening2_kpc2: number;
  params: readonly number[];
  /** Sum with the generic loops even where the kernel has its own (to check and time those against them). */
  generic?: boolean;
}

/**
 * What a law with a pair potential declares in its module. With the softened
 * separation s = sqrt(r^2 + eps^2), a source of mass m has the potential
 * -G m phi(s) per unit mass. The radial functions take s and the parameters.
 */
export interface PairKernelDefinition {
  /** Registry key: ASCII letters and digits, at most 32 (it crosses to threads through shared memory). */
  name: string;
  /** Names of the numeric parameters, in the order of PairKernel.params. */
  params: readonly string[];
  /** Parameters the registry-wide tests exercise the kernel with. */
  sample: readonly number[];
  /** phi(s). */
  potential(s: number, p: readonly number[]): number;
  /**
   * -phi'(s) / s: the pull of a unit mass is G times this times the separation
   * vector (source minus target). Equal to -derivatives()[0]; kept apart because
   * it is the generic direct sum's inner loop.
   */
  pull(s: number, p: readonly number[]): number;
  /**
   * The tree's quadrupole term needs D1 = phi'(s)/s, D2 = D1'(s)/s and
   * D3 = D2'(s)/s (the derivatives in r^2, times 2, 4 and 8): written into out[0..2].
   */
  derivatives(s: number, p: readonly number[], out: Float64Array): void;
}

/** Most parameters a kernel may have (they share one block of the thread split's memory). */
export const MAX_KERNEL_PARAMS = 8;
/** Longest kernel name, in ASCII characters. */
export const MAX_KERNEL_NAME = 32;

export function definePairKernel(def: PairKernelDefinition): PairKernelDefinition {
  if (!new RegExp(`^[A-Za-z][A-Za-z0-9]{0,${MAX_KERNEL_NAME - 1}}$`).test(def.name)) {
    throw new Error(`pair kernel name "${def.name}" must be ASCII letters and digits, at most ${MAX_KERNEL_NAME}`);
  }
  if (def.params.length > MAX_KERNEL_PARAMS || def.sample.length !== def.params.length) {
    throw new Error(`pair kernel "${def.name}" needs at most ${MAX_KERNEL_PARAMS} parameters and one sample value for each`);
  }
  return def;
}

/** The data a solver receives for `def` at this softening. */
export function pairKernel(def: PairKernelDefinition, softening_kpc: number, params: readonly number[]): PairKernel {
  if (params.length !== def.params.length) {
    throw new Error(`pair kernel "${def.name}" takes ${def.params.length} parameters (${def.params.join(', ')}), got ${params.length}`);
  }
  return { name: def.name, softening2_kpc2: softening_kpc * softening_kpc, params };
}

/**
 * A tree cell as it acts on targets: MOMENTS numbers, centre of mass x, y, z
 * (kpc), mass (Msun), second moments xx, yy, zz, xy, xz, yz about the centre
 * of mass (Msun kpc^2).
 */
export const MOMENTS = 10;

/** What one tree walk gathered for a group of targets: particles of opened leaves, and accepted cells (MOMENTS numbers each). */
export interface GatheredList {
  px: Float64Array; py: Float64Array; pz: Float64Array; pm: Float64Array;
  particles: number;
  cl: Float64Array;
  cellCount: number;
}

/**
 * The loops one kernel's sums run in. Every kernel has the generic ones, built
 * from its radial functions (genericLoops); a kernel may have faster ones of
 * its own in solvers/fast/, which must give the same sums to rounding
 * (tests/engine/kernels.test.ts holds them to 1e-12). All leave the factor G
 * to the caller; p is the kernel's parameter list.
 */
export interface PairLoops {
  /** Adds the pull at (xi, yi, zi) of `count` point sources into acc[0..2]; coincident points are skipped. */
  pull(x: Float64Array, y: Float64Array, z: Float64Array, m: Float64Array, count: number,
    xi: number, yi: number, zi: number, eps2: number, p: readonly number[], acc: Float64Array): void;
  /** Sum of m phi(s) over the sources (the potential is -G times it); coincident points skipped. */
  potential(x: Float64Array, y: Float64Array, z: Float64Array, m: Float64Array, count: number,
    xi: number, yi: number, zi: number, eps2: number, p: readonly number[]): number;
  /** Adds the monopole-plus-quadrupole pull of `cells` cell records at (xi, yi, zi) into acc[0..2]. */
  cellPull(cl: Float64Array, cells: number, xi: number, yi: number, zi: number, eps2: number, p: readonly number[], acc: Float64Array): void;
  /** The same expansion of sum m phi(s) over the cells. */
  cellPotential(cl: Float64Array, cells: number, xi: number, yi: number, zi: number, eps2: number, p: readonly number[]): number;
  /**
   * Optional: a faster direct sum for targets iStart.. (through iEnd at most),
   * writing G-scaled results; returns how many targets it did (the rest go
   * through `pull` one at a time).
   */
  directField?(sources: Sources, targets: Points, eps2: number, p: readonly number[], iStart: number, iEnd: number, out: Accelerations): number;
  directPotential?(sources: Sources, targets: Points, eps2: number, p: readonly number[], iStart: number, iEnd: number, out: Float64Array): number;
  /** Optional: a whole gathered list (particles, then cells) at two targets in one pass; writes a's pull to acc[0..2], b's to acc[3..5]. */
  listPullTwo?(list: GatheredList, xa: number, ya: number, za: number, xb: number, yb: number, zb: number, eps2: number, p: readonly number[], acc: Float64Array): void;
  /**
   * Optional: walks the tree for one group of targets with the tree's acceptance test
   * (theta^2; accepted cells of at most `few` particles act through their particles)
   * and writes their G-scaled pulls to out: with `targets` null, the self-field group
   * in tree slots [from, to), at tree.order[from..to-1]; else the points targets[from..to-1],
   * at from..to-1. Returns false where it cannot (the caller then walks and sums the
   * group with the loops above).
   */
  treeGroupField?(tree: Octree, targets: Points | null, from: number, to: number, theta2: number, few: number, eps2: number, p: readonly number[], out: Accelerations): boolean;
  /** Optional: the same for the potential (per unit mass, G-scaled). */
  treeGroupPotential?(tree: Octree, targets: Points | null, from: number, to: number, theta2: number, few: number, eps2: number, p: readonly number[], out: Float64Array): boolean;
  /** Optional: the same for the potential sums, a's into acc[0], b's into acc[1]. */
  listPotentialTwo?(list: GatheredList, xa: number, ya: number, za: number, xb: number, yb: number, zb: number, eps2: number, p: readonly number[], acc: Float64Array): void;
}

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
  /** Threads that also share a law's grid work (the worker's split solver lends its helpers). */
  readonly gridThreads?: GridThreads;
  /**
   * Calls `sums` (which asks this solver for fields or potentials) and `aside`, the caller's own
   * work, which reads none of their results and calls no solver. A solver split across threads runs
   * `aside` on this thread once its helpers have started on the first round `sums` opens, so the two
   * overlap; without this method the caller runs one after the other (see `overlapped`).
   */
  overlap?(sums: () => void, aside: () => void): void;
}

/** `sums` and then `aside`, overlapped where the solver can (FieldSolver.overlap); the numbers are the same either way. */
export function overlapped(solver: FieldSolver | undefined, sums: () => void, aside: () => void): void {
  if (solver?.overlap) return solver.overlap(sums, aside);
  sums();
  aside();
}
