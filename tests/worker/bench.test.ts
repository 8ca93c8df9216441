// Smoke test of `npm run bench`: its sections that need no stack, at tiny sizes,
// so the bench can't rot. Nothing here is timed against a target.
import { benchPure, machine, toJson, toTable, type PureSizes } from '../bench/bench';

jest.setTimeout(120_000);

const TINY: PureSizes = {
  direct: { n: 64, repeats: 2, drift: { n: 64, steps: 20 } },
  tree: { sizes: [300, 600], thetas: [0.5, 0.7], sampleTargets: 50, repeats: 1 },
  yukawaTree: { n: 300, theta: 0.6, alpha: 0.3, lambda_kpc: 3, repeats: 1 },
  threads: { n: 200, steps: 2, treeN: 300, treeSteps: 2, gridN: 200, grid: 32, gridSteps: 2, threads: 2, spinIterations: 1e5, repeats: 2 },
  qumond: { grids: [32], sizes: [300], repeats: 1 },
};

const finite = (v: unknown) => typeof v === 'number' && Number.isFinite(v);

test('the pure sections give every JSON key a finite number, and the table names each target', async () => {
  const report = { ...(await benchPure(TINY)), machine: machine() };
  const json = toJson(report) as Record<string, Record<string, unknown> & unknown[]>;
  for (const key of ['interactionsPerSecond', 'referenceInteractionsPerSecond', 'ratio', 'energyDriftRatio']) expect(finite(json.directSum[key])).toBe(true);
  // The engine's mixed-precision kernel computes the plain loop's sums to float32's rounding (our bound over 1e-7 terms),
  // not to the bit; the float64 JS fallback computes them to float64's.
  expect(report.directSum.maxRelativeDifference).toBeLessThan(1e-6);
  expect(report.directSum.maxRelativeDifference).toBeGreaterThan(1e-12);
  expect(report.directSum.fallbackMaxRelativeDifference).toBeLessThan(1e-12);
  expect(report.directSum.kernel).toBe('wasm');
  expect(report.directSum.energyDriftFloat64).toBeGreaterThan(0);
  expect(report.directSum.energyDriftEngine).toBeGreaterThan(0);
  // The C reference runs wherever a compiler is found, and then computes the same field to rounding (-ffast-math reorders).
  const native = json.directSum.nativeReferenceInteractionsPerSecond;
  if (native === null) expect(report.directSum.nativeNote).toMatch(/no C compiler|could not build/);
  else {
    expect(finite(native)).toBe(true);
    expect(report.directSum.nativeMaxRelativeDifference).toBeLessThan(1e-10);
  }
  expect(json.tree).toHaveLength(4);
  for (const row of json.tree as unknown as Record<string, unknown>[]) {
    for (const key of ['n', 'theta', 'msPerStep', 'cpuMsPerStep', 'medianError', 'p99Error', 'directMsPerStep', 'directCpuMsPerStep']) expect(finite(row[key])).toBe(true);
  }
  for (const key of ['jsMsPerStep', 'wasmMsPerStep', 'speedup']) expect(finite(json.yukawaTree[key])).toBe(true);
  expect(report.yukawaTree.maxRelativeDifference).toBeLessThan(5e-6);
  expect(report.yukawaTree.maxRelativeDifference).toBeGreaterThan(0);
  expect(finite(json.threads.speedup)).toBe(true);
  expect(finite((json['qumond[grid=32,n=300]'] as unknown as Record<string, unknown>).msPerEval)).toBe(true);
  expect(finite(report.threads.machineSpeedup)).toBe(true);
  expect(report.threads.identical).toBe(true);
  expect(finite(json.threads.treeSpeedup)).toBe(true);
  expect(report.threads.treeIdentical).toBe(true);
  expect(finite(json.threads.gridSpeedup)).toBe(true);
  expect(report.threads.gridIdentical).toBe(true);
  expect(report.threads.gridHelperChunks).toBeGreaterThan(0);
  // On Linux each thread's CPU time is read: the split's busiest thread did less than the whole run.
  if (process.platform === 'linux') expect(report.threads.gridCpuSpeedup).toBeGreaterThan(1);
  // Without a stack (skipped here; tests/server/bench-stack.test.ts covers those sections) the keys are present and null.
  expect(json.e2e).toEqual({ firstProgressMs: null, diskRunSeconds: null, bigDiskRunSeconds: null });
  expect(json.snapshot).toEqual({ bytesPerParticle: null });
  expect(json.client).toEqual({ fps: null });
  const table = toTable(report);
  for (const target of ['>= 1.0', '<= 2e-4', '<= 5e-6 (tree.test.ts)', '>= 1.7x', '>= 1.6x', '<= 1e-6', '1 within 10 %']) expect(table).toContain(target);
  if (native !== null) expect(table).toContain('>= 0.5');
});
