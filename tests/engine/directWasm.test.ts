// The WebAssembly SIMD direct sum against the typed-array kernel it replaces:
// the same operations in the same per-target order, so the same bits, for every
// target range and target kind; and the fallback when WebAssembly is missing.
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

test('WebAssembly and JS kernels give the same bits for the field and potential, whole and partial target ranges, sources or probes', () => {
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
        const ranges: [number, number][] = [[0, count], [1, count], [Math.floor(count / 3), Math.max(Math.floor(count / 3), count - 2)]];
        for (const [a, b] of ranges) expectSameBits(sums('wasm', p, targets, k, a, b), sums('js', p, targets, k, a, b));
      }
    }
  }
});

test('a bigger run after a smaller one (the module grows its memory) still matches, and the sum is the physical field', () => {
  const small = plummerParticles(10);
  sums('wasm', small, small, newtonKernel(0.05), 0, 10);
  const p = plummerParticles(4000);
  const k = newtonKernel(0.05);
  const w = sums('wasm', p, p, k, 0, 4000);
  expectSameBits(w, sums('js', p, p, k, 0, 4000));
  // Newton's third law: the pulls of a pair are equal and opposite, so the mass-weighted field sums
  // to zero up to rounding (relative to the sum of magnitudes; 1e-12 is our own margin over float64 rounding).
  let sx = 0, mag = 0;
  for (let i = 0; i < 4000; i++) {
    sx += p.m[i] * w.ax[i];
    mag += p.m[i] * Math.abs(w.ax[i]);
  }
  expect(Math.abs(sx) / mag).toBeLessThan(1e-12);
});

test('unsoftened and Yukawa kernels, which the WebAssembly kernel does not cover, take the JS loops with either choice', () => {
  const p = plummerParticles(101);
  for (const k of [newtonKernel(0), { name: 'yukawa', softening2_kpc2: 0.01, params: [0.5, 2] }]) {
    expectSameBits(sums('wasm', p, p, k, 0, 101), sums('js', p, p, k, 0, 101));
  }
});

test('without WebAssembly the engine falls back to the JS kernel and gives the same bits', () => {
  const p = plummerParticles(300);
  const k = newtonKernel(0.05);
  const withWasm = sums('wasm', p, p, k, 0, 300);
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
  expectSameBits(fallback!, withWasm);
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
