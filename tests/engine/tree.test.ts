import { buildInitialConditions, runSimulation } from '../../shared/engine';
import { directFieldRange, directPotentialRange } from '../../shared/engine/solvers/direct';
import { buildOctant, buildOctree, joinOctree, planOctree, treeFieldRange, treeSolver, treeWorkUnits, type OctantCells, type Octree } from '../../shared/engine/solvers/tree';
import { newtonKernel } from '../../shared/engine/laws/newton';
import { setDirectKernel } from '../../shared/engine/solvers/directWasm';
import { allocateAccelerations, allocateParticles } from '../../shared/engine/state';
import { quantile, specWith } from './helpers';

const N = 3000;
const p = buildInitialConditions(specWith({ model: { kind: 'hernquist', n: N, mass_Msun: 1e10, scale_kpc: 1 }, seed: 5 })).particles;
const kernel = newtonKernel(0.02);
const exact = allocateAccelerations(N);
directFieldRange(p, p, kernel, 0, N, exact);

function forceErrors(theta: number): number[] {
  const out = allocateAccelerations(N);
  treeSolver(theta).field(p, p, kernel, out);
  return Array.from({ length: N }, (_, i) =>
    Math.hypot(out.ax[i] - exact.ax[i], out.ay[i] - exact.ay[i], out.az[i] - exact.az[i]) / Math.hypot(exact.ax[i], exact.ay[i], exact.az[i]),
  );
}

describe('Barnes & Hut (1986) tree', () => {
  test('force error against the direct sum at theta = 0.5: median below 0.3%, 99th percentile below 2% (quadrupole cells; our tolerances, common practice puts the median near 0.1%)', () => {
    const e = forceErrors(0.5);
    expect(quantile(e, 0.5)).toBeLessThan(3e-3);
    expect(quantile(e, 0.99)).toBeLessThan(2e-2);
  });

  test('probes (targets that are not the sources) walk one by one and are as accurate', () => {
    const probes = { x: p.x.slice(), y: p.y.slice(), z: p.z.slice() };
    const out = allocateAccelerations(N);
    treeSolver(0.5).field(p, probes, kernel, out);
    const e = Array.from({ length: N }, (_, i) => Math.hypot(out.ax[i] - exact.ax[i], out.ay[i] - exact.ay[i], out.az[i] - exact.az[i]) / Math.hypot(exact.ax[i], exact.ay[i], exact.az[i]));
    expect(quantile(e, 0.5)).toBeLessThan(3e-3);
  });

  test('the self-field split into ranges of leaves (as threads would) equals one call bit for bit', () => {
    const tree = buildOctree(p);
    const units = treeWorkUnits(tree, p, p);
    const whole = allocateAccelerations(N), parts = allocateAccelerations(N);
    treeFieldRange(tree, p, p, kernel, 0.5, 0, units, whole);
    const cut = Math.floor(units / 3);
    treeFieldRange(tree, p, p, kernel, 0.5, 0, cut, parts);
    treeFieldRange(tree, p, p, kernel, 0.5, cut, units, parts);
    expect(Buffer.from(whole.ax.buffer).equals(Buffer.from(parts.ax.buffer))).toBe(true);
    expect(Buffer.from(whole.az.buffer).equals(Buffer.from(parts.az.buffer))).toBe(true);
  });

  test('with the JS walk and loops (no WebAssembly) the split equals one call bit for bit too', () => {
    const previous = setDirectKernel('js');
    try {
      const tree = buildOctree(p);
      const units = treeWorkUnits(tree, p, p);
      const whole = allocateAccelerations(N), parts = allocateAccelerations(N);
      treeFieldRange(tree, p, p, kernel, 0.5, 0, units, whole);
      const cut = Math.floor(units / 2) + 1;
      treeFieldRange(tree, p, p, kernel, 0.5, cut, units, parts);
      treeFieldRange(tree, p, p, kernel, 0.5, 0, cut, parts);
      expect(Buffer.from(whole.ax.buffer).equals(Buffer.from(parts.ax.buffer))).toBe(true);
      expect(Buffer.from(whole.ay.buffer).equals(Buffer.from(parts.ay.buffer))).toBe(true);
    } finally {
      setDirectKernel(previous);
    }
  });

  test('two trees walked in turn by the WebAssembly walk each give what a fresh walk gives (the module copies a tree only when it changes)', () => {
    const q = buildInitialConditions(specWith({ model: { kind: 'plummer', n: 1500, mass_Msun: 1e10, scale_kpc: 1 }, seed: 8 })).particles;
    const [ta, tb] = [buildOctree(p), buildOctree(q)];
    const first = allocateAccelerations(N), again = allocateAccelerations(N), other = allocateAccelerations(1500);
    treeFieldRange(ta, p, p, kernel, 0.5, 0, treeWorkUnits(ta, p, p), first);
    treeFieldRange(tb, q, q, kernel, 0.5, 0, treeWorkUnits(tb, q, q), other);
    treeFieldRange(ta, p, p, kernel, 0.5, 0, treeWorkUnits(ta, p, p), again);
    expect(Buffer.from(first.ax.buffer).equals(Buffer.from(again.ax.buffer))).toBe(true);
  });

  test('a group whose float32 sums would overflow is summed in float64 instead: finite, and the JS walk\'s numbers', () => {
    // 1e31 Msun 1e-3 kpc apart: m / s^3 near 1e39, beyond float32 (3.4e38), well within float64.
    const q = allocateParticles(12);
    for (let i = 0; i < 12; i++) {
      q.m[i] = 1e31;
      q.x[i] = 1e-3 * i; q.y[i] = 2e-3 * (i % 3); q.z[i] = 0;
    }
    const tight = newtonKernel(1e-4);
    const wasm = allocateAccelerations(12), js = allocateAccelerations(12);
    treeSolver(0.5).field(q, q, tight, wasm);
    const previous = setDirectKernel('js');
    try {
      treeSolver(0.5).field(q, q, tight, js);
    } finally {
      setDirectKernel(previous);
    }
    expect(Array.from(wasm.ax).every(Number.isFinite)).toBe(true);
    expect(Array.from(wasm.ax)).toEqual(Array.from(js.ax));
  });

  test('walk groups cover every particle once, each a run of at most 64 consecutive slots', () => {
    const tree = buildOctree(p);
    const seen = new Uint8Array(N);
    for (let k = 0; k < tree.groups.length; k += 2) {
      const [start, count] = [tree.groups[k], tree.groups[k + 1]];
      expect(count).toBeGreaterThan(0);
      expect(count).toBeLessThanOrEqual(64);
      for (let s = start; s < start + count; s++) seen[s]++;
    }
    expect(seen.every((v) => v === 1)).toBe(true);
    // Merged siblings make groups fuller than single cells of at most 64 would be (about 39 particles each here).
    expect(N / (tree.groups.length / 2)).toBeGreaterThan(30);
  });

  test('the error shrinks as theta shrinks', () => {
    const [fine, mid, coarse] = [0.3, 0.6, 1.0].map((t) => quantile(forceErrors(t), 0.5));
    expect(fine).toBeLessThan(mid);
    expect(mid).toBeLessThan(coarse);
  });

  test('potential agrees with the direct sum (median below 0.1%)', () => {
    const a = new Float64Array(N), b = new Float64Array(N);
    directPotentialRange(p, p, kernel, 0, N, a);
    treeSolver(0.5).potential(p, p, kernel, b);
    expect(quantile(Array.from(a, (v, i) => Math.abs(b[i] / v - 1)), 0.5)).toBeLessThan(1e-3);
  });

  test('the root\'s octants built apart, in any order, and put together make the tree of one build, cell for cell', () => {
    /** As threads would: the plan, then the octants last to first, each copied out of the builder's reused arrays. */
    const joined = (q: typeof p): { tree: Omit<Octree, 'stamp'>; rootGroups: number } => {
      const n = q.m.length;
      const order = new Uint32Array(n);
      const plan = planOctree(q, order);
      const sorted = { x: new Float64Array(n), y: new Float64Array(n), z: new Float64Array(n), m: new Float64Array(n) };
      const parts: OctantCells[] = [];
      for (let j = plan.count - 1; j >= 0; j--) {
        const o = buildOctant(q, order, plan.octants, j, sorted);
        parts[j] = { nodes: o.nodes, cells: o.cells.slice(0, 16 * o.nodes), links: o.links.slice(0, 4 * o.nodes), box: o.box.slice(), groups: Array.from(o.groups) };
      }
      const into = { cells: new Float64Array(16 * 2 * n), links: new Int32Array(4 * 2 * n), groups: new Int32Array(2 * n) };
      const { nodes, groups } = joinOctree(plan, (j) => parts[j], into);
      const tree = { nodes, cells: into.cells.subarray(0, 16 * nodes), links: into.links.subarray(0, 4 * nodes), order, sorted, groups: into.groups.subarray(0, 2 * groups) };
      return { tree, rootGroups: plan.groups.filter((v, k) => k % 2 === 0 && v >= 0).length };
    };
    const whole = (q: typeof p) => {
      const { nodes, cells, links, order, sorted, groups } = buildOctree(q);
      return { nodes, cells, links, order, sorted, groups };
    };
    // Lopsided: most particles low in y, so the root's upper octants are small and grouped at the root itself.
    const lopsided = allocateParticles(1500);
    for (let i = 0; i < 1500; i++) {
      lopsided.m[i] = 1 + (i % 3);
      lopsided.x[i] = (i * 0.618034) % 1; lopsided.y[i] = ((i * 0.414214) % 1) ** 6; lopsided.z[i] = (i * 0.732051) % 1;
    }
    const flat = { ...p, z: new Float64Array(N) };
    for (const q of [p, flat, lopsided]) {
      const { tree, rootGroups } = joined(q);
      expect(tree.nodes).toBeGreaterThan(100);
      expect(tree).toEqual(whole(q));
      if (q === lopsided) expect(rootGroups).toBeGreaterThan(0);
    }
  });

  test('coincident particles end in one bounded-depth leaf instead of splitting forever', () => {
    const q = allocateParticles(40);
    for (let i = 0; i < 40; i++) {
      q.m[i] = 1;
      q.x[i] = i < 30 ? 1 : i; // thirty particles at one point
    }
    const tree = buildOctree(q);
    expect(tree.nodes).toBeLessThan(200);
    const out = allocateAccelerations(40);
    treeSolver(0.6).field(q, q, kernel, out);
    expect(Array.from(out.ax).every(Number.isFinite)).toBe(true);
  });

  test('a tree run conserves energy to the force accuracy and its momentum drift is small but not exact', () => {
    const r = runSimulation(specWith({ model: { kind: 'plummer', n: 400, mass_Msun: 1e10, scale_kpc: 1 }, solver: { kind: 'tree', theta: 0.5 }, timestep_Myr: 0.25, duration_Myr: 10, snapshotEvery: 10 }));
    expect(r.summary.maxAbsEnergyDrift!).toBeLessThan(2e-3);
    expect(r.summary.finalMomentumDrift).toBeLessThan(1e-3);
    expect(r.summary.finalMomentumDrift).toBeGreaterThan(1e-12);
  });
});
