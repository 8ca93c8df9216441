// One run's direct sum or tree walk split across pool threads over shared
// memory (worker/sharedField.ts): the same numbers, bit for bit, as one thread.
import { Piscina } from 'piscina';
import { directSolver } from '../../shared/engine/solvers/direct';
import { directKernelInUse, setDirectKernel } from '../../shared/engine/solvers/directWasm';
import { buildOctant, buildOctree, OCTANT, planOctree, treeSolver, type Octree } from '../../shared/engine/solvers/tree';
import { newtonKernel } from '../../shared/engine/laws/newton';
import type { FieldSolver, PairKernel } from '../../shared/engine/solvers/types';
import { allocateAccelerations, type Points, type Sources } from '../../shared/engine/state';
import type { RunResult } from '../../shared/engine';
import { RunPool, SPLIT_MIN_PARTICLES } from '../../worker/pool';
import { activeHelpers, chunksDone, createSharedField, latestTree, SplitSolver, stopSharedField, type SharedField } from '../../worker/sharedField';
import { plummerParticles, plummerRun } from '../bench/specs';
import { taskFile, until } from './threads';
import { everyKernel } from '../engine/helpers';

jest.setTimeout(120_000);

/** Field and potential of the split solver and the reference, on the particles and on probes, equal bit for bit. */
function expectSameFields(split: FieldSolver, reference: FieldSolver, kernels: PairKernel[], p: Sources, probes: Points): void {
  for (const kernel of kernels) {
    for (const targets of [p, probes]) {
      const count = targets.x.length;
      const a = allocateAccelerations(count), b = allocateAccelerations(count);
      split.field(p, targets, kernel, a);
      reference.field(p, targets, kernel, b);
      expect(a).toEqual(b);
      const pa = new Float64Array(count), pb = new Float64Array(count);
      split.potential(p, targets, kernel, pa);
      reference.potential(p, targets, kernel, pb);
      expect(pa).toEqual(pb);
    }
  }
}

/** Per octant of the root, the cells its subtree takes beyond the room of its part in shared memory (its particles, plus one). */
function overgrowth(q: Sources): number[] {
  const n = q.m.length, order = new Uint32Array(n), plan = planOctree(q, order);
  const sorted = { x: new Float64Array(n), y: new Float64Array(n), z: new Float64Array(n), m: new Float64Array(n) };
  return Array.from({ length: plan.count }, (_, j) => buildOctant(q, order, plan.octants, j, sorted).nodes - (plan.octants[OCTANT * j + 1] - plan.octants[OCTANT * j] + 1));
}

/** A tree's arrays, without the stamp that tells one build from another. */
const treeArrays = ({ nodes, cells, links, order, sorted, groups }: Octree) => ({ nodes, cells, links, order, sorted, groups });

test('a force sum split with a helper thread equals the single-thread direct sum bit for bit, for every kernel and target kind', async () => {
  const n = 1001; // odd, so chunks and pairs of targets do not line up
  const p = plummerParticles(n);
  const probes: Points = { x: p.x.slice(0, 333).map((v) => v + 0.01), y: p.y.slice(0, 333), z: p.z.slice(0, 333) };
  const kernels: PairKernel[] = [...everyKernel(0.05), ...everyKernel(0)];
  const pool = new Piscina({ filename: taskFile, maxThreads: 1 });
  const shared = createSharedField(n, 1);
  const helper = pool.run({ sharedField: shared }, { name: 'fieldHelper' }) as Promise<number>;
  try {
    await until(() => activeHelpers(shared) === 1, 'the helper thread');
    const split = new SplitSolver(shared);
    expectSameFields(split, directSolver, kernels, p, probes);
  } finally {
    stopSharedField(shared);
  }
  // The helper really took part: it computed some of the chunks, and left when told.
  expect(await helper).toBeGreaterThan(0);
  expect(activeHelpers(shared)).toBe(0);
  await pool.destroy();
});

test('split with the WebAssembly kernel in every thread, or the JS kernel in every thread, equals one thread of that kernel bit for bit', async () => {
  // Rounds long enough (a few ms in WebAssembly) for a sleeping helper to wake and take a chunk on a busy machine.
  const n = 3001;
  const p = plummerParticles(n);
  const kernel = newtonKernel(0.05);
  expect(directKernelInUse()).toBe('wasm');
  // The two kernels differ (float32 terms in WebAssembly), so each split is held to its own kernel's one-thread sums.
  for (const choice of ['wasm', 'js'] as const) {
    setDirectKernel(choice);
    const pool = new Piscina({ filename: taskFile, maxThreads: 1, env: { ...process.env, INFALL_DIRECT_KERNEL: choice } });
    try {
      const want = allocateAccelerations(n);
      const wantPot = new Float64Array(n);
      directSolver.field(p, p, kernel, want);
      directSolver.potential(p, p, kernel, wantPot);
      const shared = createSharedField(n, 1);
      const helper = pool.run({ sharedField: shared }, { name: 'fieldHelper' }) as Promise<number>;
      try {
        await until(() => activeHelpers(shared) === 1, 'the helper thread');
        const split = new SplitSolver(shared);
        const got = allocateAccelerations(n);
        const gotPot = new Float64Array(n);
        split.field(p, p, kernel, got);
        split.potential(p, p, kernel, gotPot);
        expect(got).toEqual(want);
        expect(gotPot).toEqual(wantPot);
      } finally {
        stopSharedField(shared);
      }
      expect(await helper).toBeGreaterThan(0);
    } finally {
      setDirectKernel('wasm');
      await pool.destroy();
    }
  }
});

test('a helper leaves when the run ends right after a round, and a small round followed by a large one never mixes their claims', async () => {
  // Both are races between threads, so the test repeats the riskiest timing many times: rounds of
  // 4 and then 38 chunks back to back (a claim spent at the end of the small round must not count
  // in the large one), then a one-chunk round the run's thread finishes alone and the run's end
  // signalled at once, while the helper woken for that round is still on its way back to sleep
  // (the end must still wake it).
  const n = 600;
  const p = plummerParticles(n);
  const probes: Points = { x: p.x.slice(0, 64).map((v) => v + 0.01), y: p.y.slice(0, 64), z: p.z.slice(0, 64) };
  const kernel = newtonKernel(0.05);
  const one: Points = { x: probes.x.slice(0, 16), y: probes.y.slice(0, 16), z: probes.z.slice(0, 16) };
  const wantProbes = allocateAccelerations(64), wantAll = allocateAccelerations(n), wantOne = allocateAccelerations(16);
  directSolver.field(p, probes, kernel, wantProbes);
  directSolver.field(p, p, kernel, wantAll);
  directSolver.field(p, one, kernel, wantOne);
  const pool = new Piscina({ filename: taskFile, maxThreads: 1 });
  try {
    for (let i = 0; i < 150; i++) {
      const shared = createSharedField(n, 1);
      const helper = pool.run({ sharedField: shared }, { name: 'fieldHelper' }) as Promise<number>;
      await until(() => activeHelpers(shared) === 1, 'the helper thread');
      const split = new SplitSolver(shared);
      const gotProbes = allocateAccelerations(64), gotAll = allocateAccelerations(n), gotOne = allocateAccelerations(16);
      split.field(p, probes, kernel, gotProbes);
      split.field(p, p, kernel, gotAll);
      split.field(p, one, kernel, gotOne);
      stopSharedField(shared);
      const left = await Promise.race([helper.then(() => true), new Promise<false>((r) => setTimeout(() => r(false), 10_000))]);
      expect({ round: i, left }).toEqual({ round: i, left: true });
      expect(gotProbes).toEqual(wantProbes);
      expect(gotAll).toEqual(wantAll);
      expect(gotOne).toEqual(wantOne);
    }
  } finally {
    await pool.destroy();
  }
});

/** A tree SplitSolver for n particles with one helper thread serving it; checks the helper took part and left. */
async function withTreeHelper(n: number, theta: number, use: (split: SplitSolver, shared: SharedField) => void): Promise<void> {
  const pool = new Piscina({ filename: taskFile, maxThreads: 1 });
  const shared = createSharedField(n, 1, theta);
  const helper = pool.run({ sharedField: shared }, { name: 'fieldHelper' }) as Promise<number>;
  try {
    await until(() => activeHelpers(shared) === 1, 'the helper thread');
    use(new SplitSolver(shared), shared);
  } finally {
    stopSharedField(shared);
  }
  expect(await helper).toBeGreaterThan(0);
  await pool.destroy();
}

/** Every run of 20 particles moved onto its first: clumps of more than a leaf holds (16), which make chains of cells down to the depth limit. */
function clumped(p: Sources, which: number[] = Array.from({ length: p.m.length }, (_, i) => i)): Sources {
  const q = { x: p.x.slice(), y: p.y.slice(), z: p.z.slice(), m: p.m };
  which.forEach((i, k) => {
    const first = which[k - (k % 20)];
    q.x[i] = q.x[first]; q.y[i] = q.y[first]; q.z[i] = q.z[first];
  });
  return q;
}

test('a tree walk split with a helper thread equals the single-thread walk bit for bit, for every kernel and target kind', async () => {
  const n = 3001;
  const p = plummerParticles(n);
  const probes: Points = { x: p.x.slice(0, 333).map((v) => v + 0.01), y: p.y.slice(0, 333), z: p.z.slice(0, 333) };
  const kernels: PairKernel[] = everyKernel(0.05);
  const theta = 0.6;
  const alone = treeSolver(theta);
  await withTreeHelper(n, theta, (split, shared) => {
    expect(split.kind).toBe('tree');
    expectSameFields(split, alone, kernels, p, probes);
    // The tree the threads built together (every octant fits its part) is one thread's, cell for cell.
    expect(Math.max(...overgrowth(p))).toBeLessThanOrEqual(0);
    expect(treeArrays(latestTree(shared))).toEqual(treeArrays(buildOctree(p)));
    // Clumps in one octant of the root make more cells there than that octant's part holds, though the
    // whole tree fits the shared room: the run's thread builds it alone, to the same tree and numbers.
    const lumpy = clumped(p, Array.from({ length: n }, (_, i) => i).filter((i) => p.x[i] < 0 && p.y[i] < 0 && p.z[i] < 0).slice(0, 600));
    expect(Math.max(...overgrowth(lumpy))).toBeGreaterThan(0);
    expect(buildOctree(lumpy).nodes).toBeLessThanOrEqual(n + 64);
    const la = allocateAccelerations(n), lb = allocateAccelerations(n);
    split.field(lumpy, lumpy, kernels[0], la);
    alone.field(lumpy, lumpy, kernels[0], lb);
    expect(la).toEqual(lb);
    expect(treeArrays(latestTree(shared))).toEqual(treeArrays(buildOctree(lumpy)));
    // Clumps everywhere make more cells than the shared room: the run's thread walks alone, to the same numbers.
    const deep = clumped(p);
    expect(buildOctree(deep).nodes).toBeGreaterThan(n + 64);
    const a = allocateAccelerations(n), b = allocateAccelerations(n);
    split.field(deep, deep, kernels[0], a);
    alone.field(deep, deep, kernels[0], b);
    expect(a).toEqual(b);
  });
});

test('work handed to overlap runs on the run\'s thread while the helper takes the round, once, and the sums stay those of one thread', async () => {
  const n = 3001;
  const p = plummerParticles(n);
  const kernel = newtonKernel(0.05);
  const theta = 0.6;
  const want = new Float64Array(n);
  treeSolver(theta).potential(p, p, kernel, want);
  await withTreeHelper(n, theta, (split, shared) => {
    const got = new Float64Array(n);
    let asides = 0, doneWhenAsideEnded = -1;
    split.overlap(() => split.potential(p, p, kernel, got), () => {
      asides++;
      // The round is open and this thread claims nothing until the aside ends: only the helper can finish a chunk now.
      const nap = new Int32Array(new SharedArrayBuffer(4));
      for (const started = Date.now(); chunksDone(shared) === 0 && Date.now() - started < 60_000;) Atomics.wait(nap, 0, 0, 5);
      doneWhenAsideEnded = chunksDone(shared);
    });
    expect(asides).toBe(1);
    expect(doneWhenAsideEnded).toBeGreaterThan(0);
    expect(got).toEqual(want);
    // Without a round to ride on (no solver call, or a tree too deep for the shared room), the aside runs after the sums, once.
    const order: string[] = [];
    split.overlap(() => order.push('sums'), () => order.push('aside'));
    const deep = clumped(p);
    split.overlap(() => {
      split.potential(deep, deep, kernel, got);
      order.push('deep sums');
    }, () => order.push('aside after deep'));
    expect(order).toEqual(['sums', 'aside', 'deep sums', 'aside after deep']);
  });
});

// A pool with all its threads started: a short run ends before a thread started on demand is up
// (seconds under load), and then has no helper to split with.
async function warmPool(threads: number): Promise<RunPool> {
  const pool = new RunPool(threads);
  await Promise.all(Array.from({ length: threads }, () => pool.start(plummerRun(50, 1), () => undefined).result));
  return pool;
}

const sameRun = (a: RunResult, b: RunResult) => {
  expect(a.snapshots.map((s) => s.positions)).toEqual(b.snapshots.map((s) => s.positions));
  expect(a.diagnostics).toEqual(b.diagnostics);
  expect(a.rotationCurves).toEqual(b.rotationCurves);
};

test('a large direct-sum run through the pool is split across its free thread and ends bit-identical to a one-thread run', async () => {
  const spec = plummerRun(SPLIT_MIN_PARTICLES + 1, 6, { snapshotEvery: 2, diagnosticsEvery: 2 });
  const one = new RunPool(1), two = await warmPool(2);
  try {
    const alone = one.start(spec, () => undefined);
    const split = two.start(spec, () => undefined);
    sameRun(await split.result, await alone.result);
    expect(await alone.helped).toBe(0);
    expect(await split.helped).toBeGreaterThan(0);
  } finally {
    await Promise.all([one.close(), two.close()]);
  }
});

test.each([{ kind: 'newton' }, { kind: 'yukawa', alpha: 0.5, lambda_kpc: 2 }] as const)('a large tree run through the pool under %o is split across its free thread and ends bit-identical to a one-thread run', async (law) => {
  const spec = plummerRun(SPLIT_MIN_PARTICLES + 1, 6, { snapshotEvery: 2, diagnosticsEvery: 2, solver: { kind: 'tree', theta: 0.5 }, law });
  const one = new RunPool(1), two = await warmPool(2);
  try {
    const alone = one.start(spec, () => undefined);
    const split = two.start(spec, () => undefined);
    sameRun(await split.result, await alone.result);
    expect(await alone.helped).toBe(0);
    expect(await split.helped).toBeGreaterThan(0);
  } finally {
    await Promise.all([one.close(), two.close()]);
  }
});

test('a run arriving while a helper holds the last thread takes that thread back instead of waiting for the large run', async () => {
  const pool = new RunPool(2);
  try {
    const ended: string[] = [];
    // The large run starts on an idle pool, so it borrows the second thread as a helper.
    const large = pool.start(plummerRun(SPLIT_MIN_PARTICLES, 400), () => undefined);
    const small = pool.start(plummerRun(200, 5), () => undefined);
    await Promise.all([large.result.then(() => ended.push('large')), small.result.then(() => ended.push('small'))]);
    expect(ended).toEqual(['small', 'large']);
  } finally {
    await pool.close();
  }
});
