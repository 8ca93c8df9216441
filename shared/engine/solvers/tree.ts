import type { Accelerations, Points, Sources } from '../state';
import { G } from '../units';
import { sumPotential, sumPull } from './pair';
import type { FieldSolver, PairKernel } from './types';

// Module-local aliases: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { abs, min, max } = Math;

/** Particles per leaf before it splits (common practice: small buckets beat single-particle leaves). */
const LEAF_SIZE = 8;
/** Beyond this depth coincident particles share a leaf rather than splitting forever. */
const MAX_DEPTH = 48;

/**
 * Barnes & Hut (1986) octree over the sources: cubic cells split into eight,
 * each holding its mass and centre of mass (monopole). Built by partitioning
 * an index array, so the same sources always give the same tree.
 */
export interface Octree {
  nodes: number;
  centreX: Float64Array; centreY: Float64Array; centreZ: Float64Array;
  halfSize: Float64Array;
  mass: Float64Array;
  comX: Float64Array; comY: Float64Array; comZ: Float64Array;
  /** First child node, or -1 for a leaf; children are stored consecutively. */
  firstChild: Int32Array;
  childCount: Uint8Array;
  /** A leaf's particles are order[leafStart .. leafStart + leafCount). */
  leafStart: Int32Array;
  leafCount: Int32Array;
  order: Uint32Array;
}

export function buildOctree(src: Sources): Octree {
  const n = src.m.length;
  let cap = max(16, 2 * Math.ceil(n / LEAF_SIZE) + 16);
  const fa = () => new Float64Array(cap);
  let t: Octree = {
    nodes: 0,
    centreX: fa(), centreY: fa(), centreZ: fa(), halfSize: fa(), mass: fa(), comX: fa(), comY: fa(), comZ: fa(),
    firstChild: new Int32Array(cap), childCount: new Uint8Array(cap), leafStart: new Int32Array(cap), leafCount: new Int32Array(cap),
    order: Uint32Array.from({ length: n }, (_, i) => i),
  };
  const grow = () => {
    cap *= 2;
    const g = <T extends Float64Array | Int32Array | Uint8Array>(a: T): T => {
      const b = new (a.constructor as { new (k: number): T })(cap);
      b.set(a);
      return b;
    };
    t = { ...t, centreX: g(t.centreX), centreY: g(t.centreY), centreZ: g(t.centreZ), halfSize: g(t.halfSize), mass: g(t.mass),
      comX: g(t.comX), comY: g(t.comY), comZ: g(t.comZ), firstChild: g(t.firstChild), childCount: g(t.childCount),
      leafStart: g(t.leafStart), leafCount: g(t.leafCount) };
  };
  const alloc = (cx: number, cy: number, cz: number, half: number): number => {
    if (t.nodes === cap) grow();
    const k = t.nodes++;
    t.centreX[k] = cx; t.centreY[k] = cy; t.centreZ[k] = cz; t.halfSize[k] = half;
    return k;
  };

  let minX = Infinity, minY = Infinity, minZ = Infinity, maxX = -Infinity, maxY = -Infinity, maxZ = -Infinity;
  for (let i = 0; i < n; i++) {
    minX = min(minX, src.x[i]); maxX = max(maxX, src.x[i]);
    minY = min(minY, src.y[i]); maxY = max(maxY, src.y[i]);
    minZ = min(minZ, src.z[i]); maxZ = max(maxZ, src.z[i]);
  }
  const half = 0.5 * max(maxX - minX, maxY - minY, maxZ - minZ) * (1 + 1e-9) || 1e-9;
  const root = alloc(0.5 * (minX + maxX), 0.5 * (minY + maxY), 0.5 * (minZ + maxZ), half);

  const scratch = new Uint32Array(n);
  const octantOf = new Uint8Array(n);
  const split = (node: number, start: number, end: number, depth: number): void => {
    let M = 0, mx = 0, my = 0, mz = 0;
    for (let s = start; s < end; s++) {
      const i = t.order[s], m = src.m[i];
      M += m; mx += m * src.x[i]; my += m * src.y[i]; mz += m * src.z[i];
    }
    t.mass[node] = M;
    t.comX[node] = mx / M; t.comY[node] = my / M; t.comZ[node] = mz / M;
    if (end - start <= LEAF_SIZE || depth >= MAX_DEPTH) {
      t.firstChild[node] = -1;
      t.leafStart[node] = start;
      t.leafCount[node] = end - start;
      return;
    }
    const cx = t.centreX[node], cy = t.centreY[node], cz = t.centreZ[node], h = 0.5 * t.halfSize[node];
    const counts = [0, 0, 0, 0, 0, 0, 0, 0];
    for (let s = start; s < end; s++) {
      const i = t.order[s];
      const o = (src.x[i] >= cx ? 1 : 0) | (src.y[i] >= cy ? 2 : 0) | (src.z[i] >= cz ? 4 : 0);
      octantOf[s] = o;
      counts[o]++;
    }
    // Stable counting sort of this range by octant.
    const offset = [0, 0, 0, 0, 0, 0, 0, 0];
    for (let o = 1; o < 8; o++) offset[o] = offset[o - 1] + counts[o - 1];
    for (let s = start; s < end; s++) scratch[start + offset[octantOf[s]]++] = t.order[s];
    t.order.set(scratch.subarray(start, end), start);
    const children: [number, number, number][] = [];
    let first = -1, at = start;
    for (let o = 0; o < 8; o++) {
      if (counts[o] === 0) continue;
      const child = alloc(cx + (o & 1 ? h : -h), cy + (o & 2 ? h : -h), cz + (o & 4 ? h : -h), h);
      if (first < 0) first = child;
      children.push([child, at, at + counts[o]]);
      at += counts[o];
    }
    t.firstChild[node] = first;
    t.childCount[node] = children.length;
    for (const [child, s, e] of children) split(child, s, e, depth + 1);
  };
  split(root, 0, n, 0);
  return t;
}

/** An axis-aligned box of targets that share one interaction list: one leaf's particles, or a single probe. */
interface TargetBox {
  minX: number; minY: number; minZ: number;
  maxX: number; maxY: number; maxZ: number;
}

/**
 * Collects the point masses a group of targets interacts with: accepted cells
 * as their monopoles, particles of leaves that must be opened. A cell is
 * accepted when size < theta * (distance from its centre of mass to the
 * nearest point of the target box) and it does not overlap the box (the
 * second condition is a common-practice guard against targets inside large,
 * lopsided cells). Sharing the walk among a leaf's particles is the grouping
 * of Barnes (1990); for a single point it is the 1986 criterion.
 */
class InteractionList {
  x = new Float64Array(256); y = new Float64Array(256); z = new Float64Array(256); m = new Float64Array(256);
  count = 0;
  private stack = new Int32Array(8 * MAX_DEPTH + 8);

  private push(x: number, y: number, z: number, m: number): void {
    if (this.count === this.x.length) {
      const g = (a: Float64Array) => { const b = new Float64Array(2 * a.length); b.set(a); return b; };
      this.x = g(this.x); this.y = g(this.y); this.z = g(this.z); this.m = g(this.m);
    }
    const k = this.count++;
    this.x[k] = x; this.y[k] = y; this.z[k] = z; this.m[k] = m;
  }

  collect(t: Octree, src: Sources, theta2: number, b: TargetBox): void {
    this.count = 0;
    const stack = this.stack;
    let top = 0;
    stack[top++] = 0;
    while (top > 0) {
      const node = stack[--top];
      const h = t.halfSize[node];
      const cx = t.centreX[node], cy = t.centreY[node], cz = t.centreZ[node];
      const apart = b.minX > cx + h || b.maxX < cx - h || b.minY > cy + h || b.maxY < cy - h || b.minZ > cz + h || b.maxZ < cz - h;
      // Distance from the centre of mass to the nearest point of the box.
      const gx = t.comX[node], gy = t.comY[node], gz = t.comZ[node];
      const dx = max(b.minX - gx, 0, gx - b.maxX), dy = max(b.minY - gy, 0, gy - b.maxY), dz = max(b.minZ - gz, 0, gz - b.maxZ);
      if (apart && 4 * h * h < theta2 * (dx * dx + dy * dy + dz * dz)) {
        this.push(gx, gy, gz, t.mass[node]);
      } else if (t.firstChild[node] < 0) {
        for (let s = t.leafStart[node], e = s + t.leafCount[node]; s < e; s++) {
          const i = t.order[s];
          this.push(src.x[i], src.y[i], src.z[i], src.m[i]);
        }
      } else {
        for (let c = 0; c < t.childCount[node]; c++) stack[top++] = t.firstChild[node] + c;
      }
    }
  }
}

const pointBox = (x: number, y: number, z: number): TargetBox => ({ minX: x, minY: y, minZ: z, maxX: x, maxY: y, maxZ: z });

function leafBox(t: Octree, src: Points, leaf: number): TargetBox {
  const b = { minX: Infinity, minY: Infinity, minZ: Infinity, maxX: -Infinity, maxY: -Infinity, maxZ: -Infinity };
  for (let s = t.leafStart[leaf], e = s + t.leafCount[leaf]; s < e; s++) {
    const i = t.order[s];
    b.minX = min(b.minX, src.x[i]); b.maxX = max(b.maxX, src.x[i]);
    b.minY = min(b.minY, src.y[i]); b.maxY = max(b.maxY, src.y[i]);
    b.minZ = min(b.minZ, src.z[i]); b.maxZ = max(b.maxZ, src.z[i]);
  }
  return b;
}

/** Leaf nodes in build order: the unit a self-field walk is shared over and split across threads by. */
export function treeLeaves(t: Octree): Int32Array {
  const leaves: number[] = [];
  for (let k = 0; k < t.nodes; k++) if (t.firstChild[k] < 0) leaves.push(k);
  return Int32Array.from(leaves);
}

/**
 * Calls `each(targetIndex, list)` for every target a range of the work
 * covers. Self-fields (targets are the sources) walk once per leaf, over
 * leaves[iStart..iEnd); other targets (probes) walk one by one over
 * iStart..iEnd. Either way each target's list depends only on the tree and
 * its group, so splitting ranges across threads gives identical results.
 */
function forEachTarget(
  tree: Octree, sources: Sources, targets: Points, theta: number, iStart: number, iEnd: number,
  each: (i: number, list: InteractionList) => void,
): void {
  const list = new InteractionList();
  const theta2 = theta * theta;
  if (targets === sources) {
    const leaves = treeLeaves(tree);
    for (let k = iStart; k < iEnd; k++) {
      const leaf = leaves[k];
      list.collect(tree, sources, theta2, leafBox(tree, sources, leaf));
      for (let s = tree.leafStart[leaf], e = s + tree.leafCount[leaf]; s < e; s++) each(tree.order[s], list);
    }
  } else {
    for (let i = iStart; i < iEnd; i++) {
      list.collect(tree, sources, theta2, pointBox(targets.x[i], targets.y[i], targets.z[i]));
      each(i, list);
    }
  }
}

/** How many work units treeFieldRange / treePotentialRange split over: leaves for a self-field, targets otherwise. */
export const treeWorkUnits = (tree: Octree, sources: Sources, targets: Points): number =>
  targets === sources ? treeLeaves(tree).length : targets.x.length;

/** Tree field for work units iStart..iEnd (see treeWorkUnits). */
export function treeFieldRange(
  tree: Octree, sources: Sources, targets: Points, kernel: PairKernel, theta: number, iStart: number, iEnd: number, out: Accelerations,
): void {
  const acc = new Float64Array(3);
  forEachTarget(tree, sources, targets, theta, iStart, iEnd, (i, list) => {
    acc.fill(0);
    sumPull(list.x, list.y, list.z, list.m, list.count, targets.x[i], targets.y[i], targets.z[i], kernel, acc);
    out.ax[i] = G * acc[0]; out.ay[i] = G * acc[1]; out.az[i] = G * acc[2];
  });
}

export function treePotentialRange(
  tree: Octree, sources: Sources, targets: Points, kernel: PairKernel, theta: number, iStart: number, iEnd: number, out: Float64Array,
): void {
  forEachTarget(tree, sources, targets, theta, iStart, iEnd, (i, list) => {
    out[i] = -G * sumPotential(list.x, list.y, list.z, list.m, list.count, targets.x[i], targets.y[i], targets.z[i], kernel);
  });
}

export function treeSolver(theta: number): FieldSolver {
  const whole = (sources: Sources, targets: Points) => {
    const tree = buildOctree(sources);
    return { tree, units: treeWorkUnits(tree, sources, targets) };
  };
  return {
    kind: 'tree',
    field(sources, targets, kernel, out) {
      const { tree, units } = whole(sources, targets);
      treeFieldRange(tree, sources, targets, kernel, theta, 0, units, out);
    },
    potential(sources, targets, kernel, out) {
      const { tree, units } = whole(sources, targets);
      treePotentialRange(tree, sources, targets, kernel, theta, 0, units, out);
    },
  };
}
