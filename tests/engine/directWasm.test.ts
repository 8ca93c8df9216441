// The WebAssembly SIMD direct sum (mixed precision) against the float64 typed-array
// kernel: within float32's rounding at every target, the same bits whatever range of
// targets a call covers (so threads can split it), float64 wherever float32 cannot
// hold the terms, and the fallback when WebAssembly is missing.
import { execFileSync } from 'node:child_process';
import path from 'node:path';
import { directFieldRange, directPotentialRange } from '../../shared/engine/solvers/direct';
import { applyDirectKernelSetting, directKernelInUse, setDirectKernel } from '../../shared/engine/solvers/directWasm';
import { newtonKernel } from '../../shared/engine/laws/newton';
import type { PairKernel } from '../../shared/engine/solvers/types';
import { allocateAccelerations, type Points, type Sources } from '../../shared/engine/state';
import { plummerParticles } from '../bench/specs';

jest.setTimeout(60_000);

afterEach(() => setDirectKernel('wasm'));

interface Sums { ax: Float64Array; ay: Float64Array; az: Float64Array; pot: Float64Array }

function sums(kernelChoice: 'wasm' | 'js', s: Sources, t: Points, k: PairKernel, iStart: number, iEnd: number): Sums {
  setDirectKernel(kernelChoice);
  const count = t.x.length;
  // NaN outside the range: a kernel that writes past its range shows up as a difference.
  const out = { ...allocateAccelerations(count), pot: new Float64Array(count) };
  for (const a of [out.ax, out.ay, out.az, out.pot]) a.fill(NaN);
  directFieldRange(s, t, k, iStart, iEnd, out);
  directPotentialRange(s, t, k, iStart, iEnd, out.pot);
  return out;
}

/** Same bits, NaN for NaN (Object.is per element, which toEqual on typed arrays does not promise for -0). */
function expectSameBits(a: Sums, b: Sums): void {
  for (const key of ['ax', 'ay', 'az', 'pot'] as const) {
    const x = a[key], y = b[key];
    let differing = 0;
    for (let i = 0; i < x.length; i++) if (!Object.is(x[i], y[i])) differing++;
    expect({ key, differing }).toEqual({ key, differing: 0 });
  }
}

test('the WebAssembly kernel loads here (Node, as in the pool threads and the CLI)', () => {
  expect(directKernelInUse()).toBe('wasm');
});

/** Largest relative difference at any target: |a - b| / |b| for the field, |p - q| / |q| for the potential. */
function worst(a: Sums, b: Sums): { field: number; potential: number } {
  let field = 0, potential = 0;
  for (let i = 0; i < a.ax.length; i++) {
    field = Math.max(field, Math.hypot(a.ax[i] - b.ax[i], a.ay[i] - b.ay[i], a.az[i] - b.az[i]) / Math.hypot(b.ax[i], b.ay[i], b.az[i]));
    potential = Math.max(potential, Math.abs(a.pot[i] - b.pot[i]) / Math.abs(b.pot[i]));
  }
  return { field, potential };
}

/** The range [a, b) of a whole-range result, NaN elsewhere, as sums() leaves it. */
function cut(whole: Sums, a: number, b: number): Sums {
  const keep = (x: Float64Array) => x.map((v, i) => (i >= a && i < b ? v : NaN));
  return { ax: keep(whole.ax), ay: keep(whole.ay), az: keep(whole.az), pot: keep(whole.pot) };
}

// Float32 terms round at 6e-8 and the separations keep float32's relative precision (wasm/direct.ts):
// measured at most 5.8e-7 of the field on Plummer spheres of 64 to 3,000 at 0.05 and 1e-3 kpc softening;
// 1e-6 is the bound and ours at every target.
const MIXED = 1e-6;

test('the WebAssembly kernel gives the float64 field and potential to 1e-6 relative at every target, and any range of targets the bits of the whole', () => {
  for (const n of [2, 3, 5, 64, 1001, 3000]) {
    const p = plummerParticles(n);
    // Probes off the particles, and some exactly on them (a coincident pair must add nothing to the potential).
    const m = Math.min(n, 77);
    const probes: Points = {
      x: p.x.slice(0, m).map((v, i) => (i % 3 === 0 ? v : v + 0.013)),
      y: p.y.slice(0, m),
      z: p.z.slice(0, m),
    };
    for (const k of [newtonKernel(0.05), newtonKernel(1e-3)]) {
      for (const targets of [p, probes]) {
        const count = targets.x.length;
        const whole = sums('wasm', p, targets, k, 0, count);
        const e = worst(whole, sums('js', p, targets, k, 0, count));
        expect(e.field).toBeLessThan(MIXED);
        expect(e.potential).toBeLessThan(MIXED);
        // A thread's share: every split point, odd or even, leaves each target's sums as they were.
        const ranges: [number, number][] = [[1, count], [Math.floor(count / 3), Math.max(Math.floor(count / 3), count - 2)], [Math.floor(count / 2), Math.floor(count / 2) + 5]];
        for (const [a, b] of ranges) expectSameBits(sums('wasm', p, targets, k, a, Math.min(b, count)), cut(whole, a, Math.min(b, count)));
      }
    }
  }
});

test('the mixed kernel did run: its sums are not the float64 bits', () => {
  const p = plummerParticles(500);
  const e = worst(sums('wasm', p, p, newtonKernel(0.05), 0, 500), sums('js', p, p, newtonKernel(0.05), 0, 500));
  expect(e.field).toBeGreaterThan(0);
  expect(e.potential).toBeGreaterThan(0);
});

test('a system far from the origin keeps its accuracy: positions are taken relative to the first source (float32 at 3e4 kpc alone would carry 2e-3 kpc)', () => {
  const p = plummerParticles(1000);
  const far = { ...p, x: p.x.map((v) => v + 3e4), y: p.y.map((v) => v - 2e4) };
  const k = newtonKernel(0.05);
  const e = worst(sums('wasm', far, far, k, 0, 1000), sums('js', far, far, k, 0, 1000));
  expect(e.field).toBeLessThan(MIXED);
  expect(e.potential).toBeLessThan(MIXED);
});

test('where float32 cannot hold the terms, float64 sums instead: all of them for sources or softening out of reach, one target for a target out of reach', () => {
  const p = plummerParticles(200);
  const k = newtonKernel(0.05);
  const spread = { ...p, x: p.x.map((v, i) => (i === 150 ? 1e13 : v)) };
  const heavy = { ...p, m: p.m.map((v, i) => (i === 7 ? 1e31 : v)) };
  for (const s of [spread, heavy]) expectSameBits(sums('wasm', s, s, k, 0, 200), sums('js', s, s, k, 0, 200));
  // Softening 1e-16 kpc: eps^2 = 1e-32 is below float32's normal numbers.
  expectSameBits(sums('wasm', p, p, newtonKernel(1e-16), 0, 200), sums('js', p, p, newtonKernel(1e-16), 0, 200));
  const probes: Points = { x: Float64Array.of(0.5, 2e12, -0.3), y: Float64Array.of(0.1, 0, 0.2), z: Float64Array.of(0, 0, 0.4) };
  const w = sums('wasm', p, probes, k, 0, 3), j = sums('js', p, probes, k, 0, 3);
  expectSameBits(cut(w, 1, 2), cut(j, 1, 2));
  // The targets within reach stay in float32.
  expect(w.ax[0]).not.toBe(j.ax[0]);
  expect(Math.abs(w.ax[0] / j.ax[0] - 1)).toBeLessThan(MIXED);
});

test('a bigger run after a smaller one (the module grows its memory) still agrees, and the sum is the physical field', () => {
  const small = plummerParticles(10);
  sums('wasm', small, small, newtonKernel(0.05), 0, 10);
  const p = plummerParticles(4000);
  const k = newtonKernel(0.05);
  const w = sums('wasm', p, p, k, 0, 4000);
  const e = worst(w, sums('js', p, p, k, 0, 4000));
  expect(e.field).toBeLessThan(MIXED);
  expect(e.potential).toBeLessThan(MIXED);
  // Newton's third law: the pulls of a pair are equal and opposite, so the mass-weighted field sums
  // to zero up to rounding (relative to the sum of magnitudes; 1e-6 is our margin over float32 terms).
  let sx = 0, mag = 0;
  for (let i = 0; i < 4000; i++) {
    sx += p.m[i] * w.ax[i];
    mag += p.m[i] * Math.abs(w.ax[i]);
  }
  expect(Math.abs(sx) / mag).toBeLessThan(1e-6);
});

test('unsoftened and Yukawa kernels, which the WebAssembly kernel does not cover, take the JS loops with either choice', () => {
  const p = plummerParticles(101);
  for (const k of [newtonKernel(0), { name: 'yukawa', softening2_kpc2: 0.01, params: [0.5, 2] }]) {
    expectSameBits(sums('wasm', p, p, k, 0, 101), sums('js', p, p, k, 0, 101));
  }
});

test('without WebAssembly the engine falls back to the JS kernel and gives its bits', () => {
  const p = plummerParticles(300);
  const k = newtonKernel(0.05);
  const js = sums('js', p, p, k, 0, 300);
  const saved = globalThis.WebAssembly;
  let fallback: Sums | undefined;
  let used: string | undefined;
  try {
    // @ts-expect-error: taken away to stand for a runtime without WebAssembly
    delete globalThis.WebAssembly;
    jest.isolateModules(() => {
      // A fresh copy of the modules, so the kernel is looked for again with WebAssembly gone.
      const direct = require('../../shared/engine/solvers/direct') as typeof import('../../shared/engine/solvers/direct');
      const wasm = require('../../shared/engine/solvers/directWasm') as typeof import('../../shared/engine/solvers/directWasm');
      used = wasm.directKernelInUse();
      const out = { ...allocateAccelerations(300), pot: new Float64Array(300) };
      direct.directFieldRange(p, p, k, 0, 300, out);
      direct.directPotentialRange(p, p, k, 0, 300, out.pot);
      fallback = out;
    });
  } finally {
    globalThis.WebAssembly = saved;
  }
  expect(used).toBe('js');
  expectSameBits(fallback!, js);
});

test('INFALL_DIRECT_KERNEL takes wasm or js, and names itself when given anything else', () => {
  applyDirectKernelSetting('js');
  expect(directKernelInUse()).toBe('js');
  applyDirectKernelSetting(undefined);
  expect(directKernelInUse()).toBe('js');
  applyDirectKernelSetting('wasm');
  expect(directKernelInUse()).toBe('wasm');
  expect(() => applyDirectKernelSetting('simd')).toThrow('INFALL_DIRECT_KERNEL must be "wasm" or "js", got "simd"');
});

test('the committed module is what the pinned compiler builds from shared/engine/solvers/wasm/direct.ts', () => {
  // Fails when the AssemblyScript source changed without `npm run build:wasm`, or the build stopped being deterministic.
  const root = path.join(__dirname, '..', '..');
  expect(() => execFileSync(process.execPath, ['server/scripts/build-wasm.mjs', '--check'], { cwd: root, stdio: 'pipe' })).not.toThrow();
});
