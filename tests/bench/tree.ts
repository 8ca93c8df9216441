// Barnes-Hut tree: cost of one force evaluation (build and walk over every
// particle) and its force error against the direct sum on a random subset of
// targets; up to DIRECT_UP_TO particles, the direct sum's own cost beside it.
// Under the Yukawa law, one evaluation with the JS loops and in WebAssembly.
import { directSolver } from '../../shared/engine/solvers/direct';
import { setDirectKernel } from '../../shared/engine/solvers/directWasm';
import { treeSolver } from '../../shared/engine/solvers/tree';
import { pairKernel } from '../../shared/engine/solvers/types';
import { newtonKernel } from '../../shared/engine/laws/newton';
import { yukawaPairKernel } from '../../shared/engine/laws/yukawa';
import { allocateAccelerations, type Points } from '../../shared/engine/state';
import { seedRng, uniform } from '../../shared/engine/rng';
import { plummerParticles } from './specs';

export interface TreeFigure {
  n: number;
  theta: number;
  msPerStep: number;
  /**
   * CPU time of that fastest evaluation, ms: on a machine shared with other
   * work the wall time also counts the time other processes held the core.
   */
  cpuMsPerStep: number;
  medianError: number;
  p99Error: number;
  /** One direct-sum evaluation of the same particles, ms, wall and CPU (null above DIRECT_UP_TO particles). */
  directMsPerStep: number | null;
  directCpuMsPerStep: number | null;
}

/** One Yukawa tree evaluation (self-field of a Plummer sphere) with the float64 JS loops and in WebAssembly SIMD. */
export interface YukawaTreeFigure {
  n: number;
  theta: number;
  alpha: number;
  lambda_kpc: number;
  /** Fastest evaluation, wall ms, and its CPU ms, with the JS walk and loops (setDirectKernel('js')). */
  jsMsPerStep: number;
  jsCpuMsPerStep: number;
  /** The same in WebAssembly. */
  wasmMsPerStep: number;
  wasmCpuMsPerStep: number;
  /** jsCpuMsPerStep / wasmCpuMsPerStep. */
  speedup: number;
  /** Largest per-particle |a_wasm - a_js| / |a_js|. */
  maxRelativeDifference: number;
}

/** Largest N the direct sum is timed at, for the size where the tree starts to pay. */
const DIRECT_UP_TO = 10_000;

/** The fastest of `repeats` calls: wall ms, and the CPU ms of that call. */
function best(repeats: number, f: () => void): { ms: number; cpuMs: number } {
  let ms = Infinity, cpuMs = Infinity;
  for (let r = 0; r < repeats; r++) {
    const t = performance.now(), c = process.cpuUsage();
    f();
    const wall = performance.now() - t;
    if (wall < ms) {
      ms = wall;
      cpuMs = process.cpuUsage(c).user / 1000;
    }
  }
  return { ms, cpuMs };
}

function quantile(sorted: Float64Array, q: number): number {
  return sorted[Math.min(sorted.length - 1, Math.floor(q * (sorted.length - 1) + 0.5))];
}

/** Distinct random indices, k of n (all of them when k >= n), from a fixed seed. */
function sampleIndices(n: number, k: number): Uint32Array {
  if (k >= n) return Uint32Array.from({ length: n }, (_, i) => i);
  const rng = seedRng(2024);
  const picked = new Set<number>();
  while (picked.size < k) picked.add(Math.floor(uniform(rng) * n));
  return Uint32Array.from([...picked].sort((a, b) => a - b));
}

export function benchTree({ sizes = [1_000, 10_000, 100_000], thetas = [0.5, 0.7], sampleTargets = 1_000, repeats = 3, softening_kpc = 0.05 } = {}): TreeFigure[] {
  const kernel = newtonKernel(softening_kpc);
  const figures: TreeFigure[] = [];
  for (const n of sizes) {
    const p = plummerParticles(n);
    const idx = sampleIndices(n, sampleTargets);
    const probes: Points = { x: Float64Array.from(idx, (i) => p.x[i]), y: Float64Array.from(idx, (i) => p.y[i]), z: Float64Array.from(idx, (i) => p.z[i]) };
    const exact = allocateAccelerations(idx.length);
    directSolver.field(p, probes, kernel, exact);
    const out = allocateAccelerations(n);
    const direct = n <= DIRECT_UP_TO ? best(repeats, () => directSolver.field(p, p, kernel, out)) : null;
    for (const theta of thetas) {
      const solver = treeSolver(theta);
      // Big trees take seconds an evaluation: fewer repeats there, but two, so the first one's warm-up doesn't count.
      const timed = best(n >= 50_000 ? Math.min(2, repeats) : repeats, () => solver.field(p, p, kernel, out));
      const err = Float64Array.from(idx, (i, k) => {
        const d = Math.hypot(out.ax[i] - exact.ax[k], out.ay[i] - exact.ay[k], out.az[i] - exact.az[k]);
        return d / Math.hypot(exact.ax[k], exact.ay[k], exact.az[k]);
      }).sort();
      figures.push({ n, theta, msPerStep: timed.ms, cpuMsPerStep: timed.cpuMs, medianError: quantile(err, 0.5), p99Error: quantile(err, 0.99), directMsPerStep: direct?.ms ?? null, directCpuMsPerStep: direct?.cpuMs ?? null });
    }
  }
  return figures;
}

export function benchYukawaTree({ n = 20_000, theta = 0.6, alpha = 0.3, lambda_kpc = 3, repeats = 2, softening_kpc = 0.05 } = {}): YukawaTreeFigure {
  const kernel = pairKernel(yukawaPairKernel, softening_kpc, [alpha, lambda_kpc]);
  const p = plummerParticles(n);
  const solver = treeSolver(theta);
  const js = allocateAccelerations(n), wasm = allocateAccelerations(n);
  const previous = setDirectKernel('js');
  let slow: { ms: number; cpuMs: number };
  try {
    slow = best(repeats, () => solver.field(p, p, kernel, js));
  } finally {
    setDirectKernel(previous);
  }
  const fast = best(repeats, () => solver.field(p, p, kernel, wasm));
  let maxRelativeDifference = 0;
  for (let i = 0; i < n; i++) {
    const d = Math.hypot(wasm.ax[i] - js.ax[i], wasm.ay[i] - js.ay[i], wasm.az[i] - js.az[i]) / Math.hypot(js.ax[i], js.ay[i], js.az[i]);
    maxRelativeDifference = Math.max(maxRelativeDifference, d);
  }
  return {
    n, theta, alpha, lambda_kpc,
    jsMsPerStep: slow.ms, jsCpuMsPerStep: slow.cpuMs, wasmMsPerStep: fast.ms, wasmCpuMsPerStep: fast.cpuMs,
    speedup: slow.cpuMs / fast.cpuMs, maxRelativeDifference,
  };
}
