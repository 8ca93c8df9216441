// A field-form run's grid passes split across pool threads over shared memory
// (worker/sharedGrid.ts): the same numbers, bit for bit, as one thread.
import { Piscina } from 'piscina';
import { createLaw } from '../../shared/engine/laws/registry';
import { directSolver } from '../../shared/engine/solvers/direct';
import { allocateAccelerations, type Points } from '../../shared/engine/state';
import type { LawSpec } from '../../shared/spec';
import { RunPool } from '../../worker/pool';
import { activeHelpers, createSharedField, SplitSolver, stopSharedField } from '../../worker/sharedField';
import { sharedGridFor } from '../../worker/sharedGrid';
import { plummerParticles, plummerRun } from '../bench/specs';
import { taskFile, until } from './threads';

jest.setTimeout(180_000);

test('the phantom grid split with a helper thread equals one thread bit for bit: forces on sources and probes, and energy', async () => {
  const n = 501;
  const p = plummerParticles(n);
  // Probes partly outside the grid's ball, so the algebraic fallback is crossed too.
  const probes: Points = { x: p.x.slice(0, 77).map((v) => 3 * v + 0.01), y: p.y.slice(0, 77), z: p.z.slice(0, 77) };
  const laws: LawSpec[] = [
    { kind: 'qumond', interpolation: 'simple', a0_m_s2: 1.2e-10, grid: 32 },
    { kind: 'qumond', interpolation: 'rar', a0_m_s2: 1.2e-10, grid: 32, externalField_m_s2: [2e-11, 0, -1e-11] },
  ];
  const pool = new Piscina({ filename: taskFile, maxThreads: 1 });
  try {
    for (const [k, law] of laws.entries()) {
      const softening_kpc = k === 0 ? 0.05 : 0; // with and without the softened kernel's array
      const shared = createSharedField(n, 1, undefined, sharedGridFor({ law, softening_kpc }));
      const helper = pool.run({ sharedField: shared }, { name: 'fieldHelper' }) as Promise<number>;
      try {
        await until(() => activeHelpers(shared) === 1, 'the helper thread');
        const solver = new SplitSolver(shared);
        const split = createLaw(law, { solver, softening_kpc, initial: p });
        const alone = createLaw(law, { solver: directSolver, softening_kpc, initial: p });
        for (const targets of [p, probes]) {
          const a = allocateAccelerations(targets.x.length), b = allocateAccelerations(targets.x.length);
          split.accelerations(p, targets, a);
          alone.accelerations(p, targets, b);
          expect(a).toEqual(b);
        }
        expect(split.potentialEnergy!(p)).toBe(alone.potentialEnergy!(p));
        // A second grid in the same run finds the shared arrays taken and works on its own ones, to the same numbers.
        const second = createLaw(law, { solver, softening_kpc, initial: p });
        const a = allocateAccelerations(n), b = allocateAccelerations(n);
        second.accelerations(p, p, a);
        alone.accelerations(p, p, b);
        expect(a).toEqual(b);
        split.accelerations(p, p, a);
        expect(a).toEqual(b);
      } finally {
        stopSharedField(shared);
      }
      // The helper really took part in the passes.
      expect(await helper).toBeGreaterThan(0);
    }
  } finally {
    await pool.destroy();
  }
});

test('a field-form run through the pool is split across its free thread, even when small, and ends bit-identical to a one-thread run', async () => {
  const law: LawSpec = { kind: 'qumond', interpolation: 'simple', a0_m_s2: 1.2e-10, grid: 32 };
  const spec = plummerRun(300, 6, { snapshotEvery: 2, diagnosticsEvery: 2, law });
  const one = new RunPool(1), two = new RunPool(2);
  try {
    const alone = one.start(spec, () => undefined);
    const split = two.start(spec, () => undefined);
    const [a, b] = [await alone.result, await split.result];
    expect(b.snapshots.map((s) => s.positions)).toEqual(a.snapshots.map((s) => s.positions));
    expect(b.diagnostics).toEqual(a.diagnostics);
    expect(b.rotationCurves).toEqual(a.rotationCurves);
    expect(await alone.helped).toBe(0);
    expect(await split.helped).toBeGreaterThan(0);
  } finally {
    await Promise.all([one.close(), two.close()]);
  }
});
