import { buildInitialConditions, runSimulation } from '../../shared/engine';
import { directFieldRange, directPotentialRange } from '../../shared/engine/solvers/direct';
import { buildOctant, buildOctree, joinOctree, planOctree, treeFieldRange, treeSolver, treeWorkUnits, type OctantCells, type Octree } from '../../shared/engine/solvers/tree';
import { newtonKernel } from '../../shared/engine/laws/newton';
import { yukawaPairKernel } from '../../shared/engine/laws/yukawa';
import { setDirectKernel } from '../../shared/engine/solvers/directWasm';
import { TREE_WASM_BYTES } from '../../shared/engine/solvers/treeWasm.generated';
import { pairKernel, type PairKernel } from '../../shared/engine/solvers/types';
import { allocateAccelerations, allocateParticles, type Accelerations, type Points, type Sources } from '../../shared/engine/state';
import { G } from '../../shared/engine/units';
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

describe('the Yukawa law\'s tree in WebAssembly SIMD (float32 terms, float64 sums)', () => {
  const sphere = buildInitialConditions(specWith({ model: { kind: 'plummer', n: 3000, mass_Msun: 1e10, scale_kpc: 1 }, seed: 7 })).particles;
  // A disk-like cloud: the sphere squashed ten times along z.
  const flat = { ...sphere, z: sphere.z.map((v) => 0.1 * v) };
  const fieldErrors = (a: Accelerations, b: Accelerations): number[] =>
    Array.from(b.ax, (_, i) => Math.hypot(a.ax[i] - b.ax[i], a.ay[i] - b.ay[i], a.az[i] - b.az[i]) / Math.hypot(b.ax[i], b.ay[i], b.az[i]));
  const potentialErrors = (a: Float64Array, b: Float64Array): number[] => Array.from(b, (v, i) => Math.abs(a[i] / v - 1));
  /** Field and potential from `solve`, with the JS loops (no WebAssembly) when `js`. */
  const sums = (solve: (acc: Accelerations, pot: Float64Array) => void, n: number, js = false) => {
    const acc = allocateAccelerations(n), pot = new Float64Array(n);
    const previous = js ? setDirectKernel('js') : null;
    try {
      solve(acc, pot);
    } finally {
      if (previous) setDirectKernel(previous);
    }
    return { acc, pot };
  };
  const tree = (s: Sources, t: Points, k: PairKernel, js = false) =>
    sums((acc, pot) => { treeSolver(0.6).field(s, t, k, acc); treeSolver(0.6).potential(s, t, k, pot); }, t.x.length, js);

  // Range 0.5 kpc puts e^(-s/lambda) across its whole range (u from 0.1 to beyond 87 in a 40 kpc cloud); 50 kpc keeps u small.
  test.each([[0.3, 3], [-0.5, 0.5], [1, 0.5], [-0.5, 50], [2, 50]])('alpha %p, lambda %p kpc: per-particle difference from the float64 JS walk below 2e-7 median, 5e-6 max for the pull, 1e-7 / 1e-6 for the potential, on a Plummer sphere and a flattened cloud, self-field and probes (our bounds; worst over the cases measured 7.9e-8 / 2.1e-6 and 3.2e-8 / 3.6e-7); its error against the direct sum is the JS tree\'s', (alpha, lambda) => {
    const k = pairKernel(yukawaPairKernel, 0.05, [alpha, lambda]);
    for (const cloud of [sphere, flat]) {
      const probes = { x: cloud.x.map((v) => v + 0.01), y: cloud.y, z: cloud.z };
      for (const targets of [cloud, probes]) {
        const wasm = tree(cloud, targets, k), js = tree(cloud, targets, k, true);
        const e = fieldErrors(wasm.acc, js.acc), ep = potentialErrors(wasm.pot, js.pot);
        expect(quantile(e, 0.5)).toBeLessThan(2e-7);
        expect(Math.max(...e)).toBeLessThan(5e-6);
        expect(quantile(ep, 0.5)).toBeLessThan(1e-7);
        expect(Math.max(...ep)).toBeLessThan(1e-6);
        // It did run: float32 terms leave a trace.
        expect(Math.max(...e)).toBeGreaterThan(0);
        expect(Math.max(...ep)).toBeGreaterThan(0);
      }
      // The direct float64 sum (the Yukawa law has no WebAssembly direct sum): the tree's own error, theta 0.6, is the same either way.
      const exact = sums((acc, pot) => { directFieldRange(cloud, cloud, k, 0, cloud.m.length, acc); directPotentialRange(cloud, cloud, k, 0, cloud.m.length, pot); }, cloud.m.length);
      const wasm = tree(cloud, cloud, k), js = tree(cloud, cloud, k, true);
      for (const q of [0.5, 0.99]) {
        expect(quantile(fieldErrors(wasm.acc, exact.acc), q) / quantile(fieldErrors(js.acc, exact.acc), q)).toBeCloseTo(1, 2);
        expect(quantile(potentialErrors(wasm.pot, exact.pot), q) / quantile(potentialErrors(js.pot, exact.pot), q)).toBeCloseTo(1, 2);
      }
      expect(quantile(fieldErrors(wasm.acc, exact.acc), 0.5)).toBeLessThan(1e-3);
    }
  });

  test('one pair at separations from 0.01 to 60 kpc (u = s / lambda from 0.1 to 120): pull and potential within 1e-6 relative of the law\'s formula written out in float64, for alpha 1 and -0.5 (measured 3.8e-7 and 1.7e-7)', () => {
    const source = allocateParticles(1);
    source.m[0] = 1e10;
    const n = 400, eps = 0.05, lambda = 0.5;
    // Along a skew direction, separations spread evenly in log from 0.01 to 60 kpc.
    const r = Float64Array.from({ length: n }, (_, i) => 0.01 * 6000 ** (i / (n - 1)));
    const probes = { x: r.map((v) => 0.48 * v), y: r.map((v) => 0.6 * v), z: r.map((v) => 0.64 * v) };
    for (const alpha of [1, -0.5]) {
      const got = tree(source, probes, pairKernel(yukawaPairKernel, eps, [alpha, lambda]));
      for (let i = 0; i < n; i++) {
        const s = Math.sqrt(r[i] * r[i] + eps * eps), u = s / lambda, e = alpha * Math.exp(-u);
        // phi = (1 + e) / s; pull = -phi'(s) r / s = (1 + e (1 + u)) r / s^3, toward the source.
        const pull = (G * source.m[0] * (1 + e * (1 + u)) * r[i]) / (s * s * s), pot = (-G * source.m[0] * (1 + e)) / s;
        expect(Math.abs(Math.hypot(got.acc.ax[i], got.acc.ay[i], got.acc.az[i]) / pull - 1)).toBeLessThan(1e-6);
        expect(got.acc.ax[i]).toBeLessThan(0);
        expect(Math.abs(got.pot[i] / pot - 1)).toBeLessThan(1e-6);
      }
    }
  });

  test('its e^(-u) (Cody & Waite range reduction, Cephes\'s expf polynomial) is within 1.5e-7 relative of Math.exp over u in [0, 80] and [80, 87] (measured 7.9e-8 and 8.1e-8; float32 rounding alone is up to 6e-8), and exactly 0 above 87', () => {
    const ex = new WebAssembly.Instance(new WebAssembly.Module(TREE_WASM_BYTES), {}).exports as unknown as {
      memory: WebAssembly.Memory; heapBase(): number; expMinusAt(u: number, o: number, n: number): void;
    };
    const n = 1 << 18, at = ex.heapBase();
    const need = at + 8 * n - ex.memory.buffer.byteLength;
    if (need > 0) ex.memory.grow(Math.ceil(need / 65536));
    const u = new Float32Array(ex.memory.buffer, at, n), o = new Float32Array(ex.memory.buffer, at + 4 * n, n);
    for (let i = 0; i < n; i++) u[i] = (90 * i) / n;
    ex.expMinusAt(u.byteOffset, o.byteOffset, n);
    let below80 = 0, to87 = 0;
    for (let i = 0; i < n; i++) {
      // The reference at the float32 argument the module saw.
      if (u[i] > 87) {
        expect(o[i]).toBe(0);
        continue;
      }
      const err = Math.abs(o[i] / Math.exp(-u[i]) - 1);
      if (u[i] <= 80) below80 = Math.max(below80, err);
      else to87 = Math.max(to87, err);
    }
    expect(below80).toBeLessThan(1.5e-7);
    expect(to87).toBeLessThan(1.5e-7);
    // Not exact: float32 arithmetic shows.
    expect(below80).toBeGreaterThan(1e-8);
  });

  test('below alpha = -0.9 (where 1 + alpha e^(-u) (1 + u) cancels in float32) the float64 JS walk runs: the same numbers bit for bit', () => {
    const k = pairKernel(yukawaPairKernel, 0.05, [-0.95, 3]);
    const wasm = tree(sphere, sphere, k), js = tree(sphere, sphere, k, true);
    expect(Buffer.from(wasm.acc.ax.buffer).equals(Buffer.from(js.acc.ax.buffer))).toBe(true);
    expect(Buffer.from(wasm.pot.buffer).equals(Buffer.from(js.pot.buffer))).toBe(true);
  });
});
