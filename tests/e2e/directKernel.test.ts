// The engine's direct sum in Chromium, as the launch page's preview runs it: the WebAssembly
// SIMD kernel loads on the page's main thread and gives the bits Node's pool threads give, and
// so does the float64 JS fallback.
import path from 'node:path';
import { build } from 'esbuild';
import type { Browser } from 'playwright-core';
import { directFieldRange, directPotentialRange } from '../../shared/engine/solvers/direct';
import { directKernelInUse, setDirectKernel } from '../../shared/engine/solvers/directWasm';
import { newtonKernel } from '../../shared/engine/laws/newton';
import { allocateAccelerations } from '../../shared/engine/state';
import { plummerParticles } from '../bench/specs';
import { launch } from './support/browser';

jest.setTimeout(120_000);

let browser: Browser;
beforeAll(async () => {
  browser = await launch();
});
afterAll(async () => {
  await browser?.close();
});

test('Chromium runs the WebAssembly kernel and its field and potential equal Node\'s bit for bit, as do the JS fallback\'s', async () => {
  const bundle = await build({
    entryPoints: [path.join(__dirname, 'support/engineBundle.ts')],
    bundle: true,
    write: false,
    format: 'iife',
    globalName: 'infallEngine',
    platform: 'browser',
    target: 'es2022',
  });
  const n = 999;
  const p = plummerParticles(n);
  const eps2 = newtonKernel(0.05).softening2_kpc2;
  expect(directKernelInUse()).toBe('wasm');
  /** Node's field and potential with the given kernel, flattened as the page returns them. */
  const inNode = (choice: 'wasm' | 'js') => {
    setDirectKernel(choice);
    try {
      const want = allocateAccelerations(n);
      const wantPot = new Float64Array(n);
      directFieldRange(p, p, newtonKernel(0.05), 0, n, want);
      directPotentialRange(p, p, newtonKernel(0.05), 0, n, wantPot);
      return [...want.ax, ...want.ay, ...want.az, ...wantPot];
    } finally {
      setDirectKernel('wasm');
    }
  };

  const page = await browser.newPage();
  try {
    await page.setContent('<!doctype html><title>kernel</title>');
    await page.addScriptTag({ content: bundle.outputFiles[0].text });
    const got = await page.evaluate(
      ({ x, y, z, m, eps2 }) => {
        type Engine = typeof import('./support/engineBundle');
        const engine = (globalThis as unknown as { infallEngine: Engine }).infallEngine;
        const s = { x: new Float64Array(x), y: new Float64Array(y), z: new Float64Array(z), m: new Float64Array(m) };
        const k = { name: 'newton', softening2_kpc2: eps2, params: [] };
        const run = () => {
          const out = { ax: new Float64Array(x.length), ay: new Float64Array(x.length), az: new Float64Array(x.length) };
          const pot = new Float64Array(x.length);
          engine.directFieldRange(s, s, k, 0, x.length, out);
          engine.directPotentialRange(s, s, k, 0, x.length, pot);
          return [...out.ax, ...out.ay, ...out.az, ...pot];
        };
        const kernel = engine.directKernelInUse();
        const wasm = run();
        engine.setDirectKernel('js');
        const js = run();
        return { kernel, fallback: engine.directKernelInUse(), wasm, js };
      },
      { x: [...p.x], y: [...p.y], z: [...p.z], m: [...p.m], eps2 },
    );
    expect(got.kernel).toBe('wasm');
    expect(got.fallback).toBe('js');
    // Finite doubles cross page.evaluate exactly, so equality here is equality of bits.
    expect(got.wasm).toEqual(inNode('wasm'));
    expect(got.js).toEqual(inNode('js'));
    // The two kernels are different sums (float32 terms in WebAssembly), so each was checked against its own.
    expect(got.wasm).not.toEqual(got.js);
  } finally {
    await page.close();
  }
});
