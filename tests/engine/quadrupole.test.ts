// The tree's cells act through monopole plus quadrupole terms of the softened
// kernel; these checks pin that expansion down and the accuracy it buys.
import { buildInitialConditions } from '../../shared/engine';
import { directSolver } from '../../shared/engine/solvers/direct';
import { treeSolver } from '../../shared/engine/solvers/tree';
import { newtonKernel } from '../../shared/engine/laws/newton';
import type { PairKernel } from '../../shared/engine/solvers/types';
import { allocateAccelerations, type Sources } from '../../shared/engine/state';
import { quantile, specWith } from './helpers';

// A lopsided clump of 60 unequal masses within about 0.5 kpc of the origin (its quadrupole is large).
const clump: Sources = (() => {
  let seed = 3;
  const r = () => ((seed = (seed * 16807) % 2147483647) / 2147483647) - 0.5;
  return { x: Float64Array.from({ length: 60 }, r), y: Float64Array.from({ length: 60 }, () => 0.3 * r()), z: Float64Array.from({ length: 60 }, () => 0.6 * r()), m: Float64Array.from({ length: 60 }, () => 1e8 * (1 + r())) };
})();

/** Relative field and potential error of the whole clump taken as one cell, at distance d along a fixed direction. */
function farError(d: number, softening_kpc: number, kernel: PairKernel = newtonKernel(softening_kpc)): { field: number; potential: number } {
  const target = { x: Float64Array.of(0.6 * d), y: Float64Array.of(0.48 * d), z: Float64Array.of(0.64 * d) };
  const a = allocateAccelerations(1), b = allocateAccelerations(1);
  directSolver.field(clump, target, kernel, a);
  treeSolver(1.5).field(clump, target, kernel, b); // theta 1.5 accepts the root cell from every d used here
  const pa = new Float64Array(1), pb = new Float64Array(1);
  directSolver.potential(clump, target, kernel, pa);
  treeSolver(1.5).potential(clump, target, kernel, pb);
  return {
    field: Math.hypot(a.ax[0] - b.ax[0], a.ay[0] - b.ay[0], a.az[0] - b.az[0]) / Math.hypot(a.ax[0], a.ay[0], a.az[0]),
    potential: Math.abs(pb[0] / pa[0] - 1),
  };
}

describe('tree cells to second order', () => {
  test.each([0, 0.3])('with softening %p kpc the error of a far cell falls as distance^-3, the octupole order (a monopole alone would give ^-2)', (eps) => {
    const near = farError(4, eps), far = farError(8, eps);
    // Doubling the distance: 2^3 = 8 for the first neglected order; allow 6..10.
    expect(near.field / far.field).toBeGreaterThan(6);
    expect(near.field / far.field).toBeLessThan(10);
    expect(near.potential / far.potential).toBeGreaterThan(6);
    expect(far.field).toBeLessThan(3e-4);
  });

  test('Plummer sphere of 5,000: median force error at most 1e-3 at theta 0.5 and 2e-3 at theta 0.7 (our targets)', () => {
    const p = buildInitialConditions(specWith({ model: { kind: 'plummer', n: 5000, mass_Msun: 1e10, scale_kpc: 1 }, seed: 9 })).particles;
    const kernel = newtonKernel(0.05);
    const exact = allocateAccelerations(p.n);
    directSolver.field(p, p, kernel, exact);
    for (const [theta, bound] of [[0.5, 1e-3], [0.7, 2e-3]]) {
      const out = allocateAccelerations(p.n);
      treeSolver(theta).field(p, p, kernel, out);
      const e = Array.from({ length: p.n }, (_, i) => Math.hypot(out.ax[i] - exact.ax[i], out.ay[i] - exact.ay[i], out.az[i] - exact.az[i]) / Math.hypot(exact.ax[i], exact.ay[i], exact.az[i]));
      expect(quantile(e, 0.5)).toBeLessThan(bound);
    }
  });

  test.each([0, 0.3])('with a Yukawa term (alpha 0.5, lambda 4 kpc) and softening %p kpc the far-cell error also falls as distance^-3: the quadrupole of the Yukawa kernel is right', (eps) => {
    const kernel = { name: 'yukawa', softening2_kpc2: eps * eps, params: [0.5, 4] };
    const near = farError(4, eps, kernel), far = farError(8, eps, kernel);
    // The Yukawa part's higher orders fall faster than Newton's at d ~ lambda, so allow 6..14.
    expect(near.field / far.field).toBeGreaterThan(6);
    expect(near.field / far.field).toBeLessThan(14);
    expect(near.potential / far.potential).toBeGreaterThan(6);
    expect(far.field).toBeLessThan(3e-4);
  });

  test('Plummer sphere of 2,000 under a Yukawa kernel: median force error at most 1e-3 at theta 0.5, as for Newton (our target)', () => {
    const p = buildInitialConditions(specWith({ model: { kind: 'plummer', n: 2000, mass_Msun: 1e10, scale_kpc: 1 }, seed: 4 })).particles;
    const kernel = { name: 'yukawa', softening2_kpc2: 0.0025, params: [0.5, 1] };
    const exact = allocateAccelerations(p.n), out = allocateAccelerations(p.n);
    directSolver.field(p, p, kernel, exact);
    treeSolver(0.5).field(p, p, kernel, out);
    const e = Array.from({ length: p.n }, (_, i) => Math.hypot(out.ax[i] - exact.ax[i], out.ay[i] - exact.ay[i], out.az[i] - exact.az[i]) / Math.hypot(exact.ax[i], exact.ay[i], exact.az[i]));
    expect(quantile(e, 0.5)).toBeLessThan(1e-3);
    const pa = new Float64Array(p.n), pb = new Float64Array(p.n);
    directSolver.potential(p, p, kernel, pa);
    treeSolver(0.5).potential(p, p, kernel, pb);
    expect(quantile(Array.from(pa, (v, i) => Math.abs(pb[i] / v - 1)), 0.5)).toBeLessThan(1e-4);
  });
});
