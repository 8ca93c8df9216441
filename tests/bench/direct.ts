// Direct sum: the engine's kernel (WebAssembly SIMD in mixed precision where it loads),
// its typed-array float64 fallback, a plain loop written here, and a C build of the same
// loop, on the same particles in one thread; then a leapfrog Plummer run under the
// engine's kernel and under the float64 fallback, whose energy drifts must agree.
import { execFileSync } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { directKernelInUse, setDirectKernel, type DirectKernelChoice } from '../../shared/engine/solvers/directWasm';
import { directSolver } from '../../shared/engine/solvers/direct';
import { newtonKernel } from '../../shared/engine/laws/newton';
import { runSimulation } from '../../shared/engine';
import { allocateAccelerations, type Accelerations, type Sources } from '../../shared/engine/state';
import { G } from '../../shared/engine/units';
import { plummerParticles, plummerRun } from './specs';

export interface DirectFigures {
  n: number;
  /** The kernel the engine used: 'wasm' unless WebAssembly SIMD failed to load. */
  kernel: DirectKernelChoice;
  interactionsPerSecond: number;
  /** The engine with its typed-array kernel forced. */
  jsInteractionsPerSecond: number;
  referenceInteractionsPerSecond: number;
  ratio: number;
  /** The C loop at cc -O3 -march=native -ffast-math; null (with a note) when no C compiler is found. */
  nativeReferenceInteractionsPerSecond: number | null;
  nativeRatio: number | null;
  nativeNote: string;
  /** Largest |engine - reference| / |reference| over all targets, against the float64 plain loop (mixed precision shows here). */
  maxRelativeDifference: number;
  /** The same for the float64 JS fallback against the plain loop: rounding only. */
  fallbackMaxRelativeDifference: number;
  /** The same for the C build against the plain loop (-ffast-math may reorder sums). */
  nativeMaxRelativeDifference: number | null;
  /** The leapfrog Plummer run whose energy drift is compared. */
  driftN: number;
  driftSteps: number;
  /** Largest |E(t) - E0| / (K0 + |W0|) of that run with the float64 JS kernel, and with the engine's kernel. */
  energyDriftFloat64: number;
  energyDriftEngine: number;
  /** energyDriftEngine / energyDriftFloat64: the issue asks for 1 within 10 %. */
  energyDriftRatio: number;
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

function maxRelative(a: Accelerations, b: Accelerations): number {
  let worst = 0;
  for (let i = 0; i < a.ax.length; i++) {
    const d = Math.hypot(a.ax[i] - b.ax[i], a.ay[i] - b.ay[i], a.az[i] - b.az[i]);
    worst = Math.max(worst, d / Math.hypot(b.ax[i], b.ay[i], b.az[i]));
  }
  return worst;
}

const NATIVE_SOURCE = path.join(__dirname, 'native', 'direct.c');
export const NATIVE_FLAGS = ['-O3', '-march=native', '-ffast-math'];

function findCompiler(): string | null {
  for (const cc of [process.env.CC, 'cc', 'gcc', 'clang']) {
    if (!cc) continue;
    try {
      execFileSync(cc, ['--version'], { stdio: 'ignore' });
      return cc;
    } catch {
      // not this one
    }
  }
  return null;
}

/** Builds the C loop into `dir`; the executable's path, or the reason it can't be built. */
function buildNative(dir: string): { exe: string } | { note: string } {
  const cc = findCompiler();
  if (!cc) return { note: 'no C compiler found (cc, gcc, clang): native reference skipped' };
  const exe = path.join(dir, 'direct');
  try {
    execFileSync(cc, [...NATIVE_FLAGS, NATIVE_SOURCE, '-o', exe, '-lm'], { stdio: ['ignore', 'ignore', 'pipe'] });
  } catch (err) {
    return { note: `${cc} could not build the native reference: ${String((err as { stderr?: Buffer }).stderr ?? err).trim().split('\n')[0]}` };
  }
  return { exe };
}

/** One timed pass of the C loop on the same particles: its seconds and its field. */
function runNative(exe: string, s: Sources, eps2: number): { seconds: number; out: Accelerations } {
  const n = s.m.length;
  const input = Buffer.alloc(16 + 32 * n);
  input.writeInt32LE(n, 0); input.writeInt32LE(1, 4); input.writeDoubleLE(eps2, 8);
  [s.x, s.y, s.z, s.m].forEach((a, k) => Buffer.from(a.buffer, a.byteOffset, a.byteLength).copy(input, 16 + 8 * n * k));
  const output = execFileSync(exe, { input, maxBuffer: 8 * (1 + 3 * n) + 1024 });
  const values = new Float64Array(output.buffer.slice(output.byteOffset, output.byteOffset + output.byteLength));
  const scaled = (k: number) => values.subarray(1 + k * n, 1 + (k + 1) * n).map((v) => G * v);
  return { seconds: values[0], out: { ax: scaled(0), ay: scaled(1), az: scaled(2) } };
}

/** Largest absolute energy drift of a leapfrog Plummer run (the bench's Plummer spec) under the given kernel. */
function energyDrift(choice: DirectKernelChoice, n: number, steps: number): number {
  const previous = setDirectKernel(choice);
  try {
    const drift = runSimulation(plummerRun(n, steps, { integrator: 'leapfrog', diagnosticsEvery: Math.max(1, Math.floor(steps / 100)) })).summary.maxAbsEnergyDrift;
    if (drift === null) throw new Error('the Plummer run reported no energy drift');
    return drift;
  } finally {
    setDirectKernel(previous);
  }
}

/**
 * Best of `repeats` timings, alternating the engine's kernels, the plain loop and the C loop
 * so all see the same machine load; then the energy drifts of a `drift`-sized Plummer run.
 */
export function benchDirect({ n = 4096, repeats = 7, softening_kpc = 0.05, drift = { n: 1000, steps: 400 } } = {}): DirectFigures {
  const p = plummerParticles(n);
  const kernel = newtonKernel(softening_kpc);
  const engineOut = allocateAccelerations(n), jsOut = allocateAccelerations(n), refOut = allocateAccelerations(n);
  const used = directKernelInUse();
  const dir = mkdtempSync(path.join(os.tmpdir(), 'infall-bench-'));
  try {
    const native = buildNative(dir);
    let nativeOut: Accelerations | null = null;
    let engineBest = Infinity, jsBest = Infinity, refBest = Infinity, nativeBest = Infinity;
    const time = (f: () => void) => {
      const t = performance.now();
      f();
      return performance.now() - t;
    };
    for (let r = 0; r < repeats; r++) {
      engineBest = Math.min(engineBest, time(() => directSolver.field(p, p, kernel, engineOut)));
      const previous = setDirectKernel('js');
      try {
        jsBest = Math.min(jsBest, time(() => directSolver.field(p, p, kernel, jsOut)));
      } finally {
        setDirectKernel(previous);
      }
      refBest = Math.min(refBest, time(() => referenceField(p, kernel.softening2_kpc2, refOut)));
      if ('exe' in native) {
        const c = runNative(native.exe, p, kernel.softening2_kpc2);
        nativeBest = Math.min(nativeBest, 1000 * c.seconds);
        nativeOut = c.out;
      }
    }
    const perSecond = (ms: number) => (n * n) / (ms / 1000);
    const interactionsPerSecond = perSecond(engineBest);
    const nativeReferenceInteractionsPerSecond = nativeOut ? perSecond(nativeBest) : null;
    const energyDriftFloat64 = energyDrift('js', drift.n, drift.steps);
    const energyDriftEngine = energyDrift(used, drift.n, drift.steps);
    return {
      n,
      kernel: used,
      interactionsPerSecond,
      jsInteractionsPerSecond: perSecond(jsBest),
      referenceInteractionsPerSecond: perSecond(refBest),
      ratio: interactionsPerSecond / perSecond(refBest),
      nativeReferenceInteractionsPerSecond,
      nativeRatio: nativeReferenceInteractionsPerSecond === null ? null : interactionsPerSecond / nativeReferenceInteractionsPerSecond,
      nativeNote: 'exe' in native ? `cc ${NATIVE_FLAGS.join(' ')}` : native.note,
      maxRelativeDifference: maxRelative(engineOut, refOut),
      fallbackMaxRelativeDifference: maxRelative(jsOut, refOut),
      nativeMaxRelativeDifference: nativeOut ? maxRelative(nativeOut, refOut) : null,
      driftN: drift.n,
      driftSteps: drift.steps,
      energyDriftFloat64,
      energyDriftEngine,
      energyDriftRatio: energyDriftEngine / energyDriftFloat64,
    };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
