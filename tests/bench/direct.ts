// Direct sum: the engine's kernel against a plain loop written here, the same
// softened arithmetic on Float64Arrays in one thread, timed in the same run.
import { directSolver } from '../../shared/engine/solvers/direct';
import { newtonKernel } from '../../shared/engine/solvers/types';
import { allocateAccelerations, type Accelerations, type Sources } from '../../shared/engine/state';
import { G } from '../../shared/engine/units';
import { plummerParticles } from './specs';

export interface DirectFigures {
  n: number;
  interactionsPerSecond: number;
  referenceInteractionsPerSecond: number;
  ratio: number;
  /** Largest |engine - reference| / |reference| over all targets: the two must compute the same thing. */
  maxRelativeDifference: number;
}

/** a_i = G sum_j m_j r_ij / (r_ij^2 + eps^2)^(3/2), skipping coincident points: the textbook loop, nothing hoisted but the target. */
export function referenceField(s: Sources, eps2: number, out: Accelerations): void {
  const n = s.m.length;
  for (let i = 0; i < n; i++) {
    const xi = s.x[i], yi = s.y[i], zi = s.z[i];
    let sx = 0, sy = 0, sz = 0;
    for (let j = 0; j < n; j++) {
      const dx = s.x[j] - xi, dy = s.y[j] - yi, dz = s.z[j] - zi;
      const r2 = dx * dx + dy * dy + dz * dz;
      if (r2 === 0) continue;
      const inv = 1 / Math.sqrt(r2 + eps2);
      const f = s.m[j] * inv * inv * inv;
      sx += f * dx; sy += f * dy; sz += f * dz;
    }
    out.ax[i] = G * sx; out.ay[i] = G * sy; out.az[i] = G * sz;
  }
}

/** Best of `repeats` timings, alternating the two so both see the same machine load. */
export function benchDirect({ n = 4096, repeats = 7, softening_kpc = 0.05 } = {}): DirectFigures {
  const p = plummerParticles(n);
  const kernel = newtonKernel(softening_kpc);
  const engineOut = allocateAccelerations(n), refOut = allocateAccelerations(n);
  let engineBest = Infinity, refBest = Infinity;
  for (let r = 0; r < repeats; r++) {
    let t = performance.now();
    directSolver.field(p, p, kernel, engineOut);
    engineBest = Math.min(engineBest, performance.now() - t);
    t = performance.now();
    referenceField(p, kernel.softening2_kpc2, refOut);
    refBest = Math.min(refBest, performance.now() - t);
  }
  let maxRelativeDifference = 0;
  for (let i = 0; i < n; i++) {
    const d = Math.hypot(engineOut.ax[i] - refOut.ax[i], engineOut.ay[i] - refOut.ay[i], engineOut.az[i] - refOut.az[i]);
    maxRelativeDifference = Math.max(maxRelativeDifference, d / Math.hypot(refOut.ax[i], refOut.ay[i], refOut.az[i]));
  }
  const pairs = n * n;
  const interactionsPerSecond = pairs / (engineBest / 1000);
  const referenceInteractionsPerSecond = pairs / (refBest / 1000);
  return { n, interactionsPerSecond, referenceInteractionsPerSecond, ratio: interactionsPerSecond / referenceInteractionsPerSecond, maxRelativeDifference };
}
