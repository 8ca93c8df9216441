// Field-form MOND: cost of one force evaluation (the tree's pair sum plus the
// grid's two isolated FFT solves) and of the pair sum alone, so the grid's share reads off.
import { createLaw } from '../../shared/engine/laws/registry';
import { treeSolver } from '../../shared/engine/solvers/tree';
import { newtonKernel } from '../../shared/engine/laws/newton';
import { allocateAccelerations } from '../../shared/engine/state';
import { plummerParticles } from './specs';

export interface QumondFigure {
  grid: 32 | 64 | 128;
  n: number;
  /** One whole force evaluation, ms (best of the repeats). */
  msPerEval: number;
  /** The tree's pair sum alone (theta 0.7), ms: the rest is the grid. */
  pairMsPerEval: number;
}

export const qumondKey = (f: { grid: number; n: number }) => `qumond[grid=${f.grid},n=${f.n}]`;

export function benchQumond({ grids = [64, 128] as QumondFigure['grid'][], sizes = [10_000, 100_000], repeats = 2, softening_kpc = 0.05 } = {}): QumondFigure[] {
  const solver = treeSolver(0.7);
  const kernel = newtonKernel(softening_kpc);
  const best = (f: () => void) => {
    let ms = Infinity;
    for (let r = 0; r < repeats; r++) {
      const t = performance.now();
      f();
      ms = Math.min(ms, performance.now() - t);
    }
    return ms;
  };
  const figures: QumondFigure[] = [];
  for (const n of sizes) {
    const p = plummerParticles(n);
    const out = allocateAccelerations(n);
    const pairMsPerEval = best(() => solver.field(p, p, kernel, out));
    for (const grid of grids) {
      const law = createLaw({ kind: 'qumond', interpolation: 'simple', a0_m_s2: 1.2e-10, grid }, { solver, softening_kpc });
      figures.push({ grid, n, msPerEval: best(() => law.accelerations(p, p, out)), pairMsPerEval });
    }
  }
  return figures;
}
