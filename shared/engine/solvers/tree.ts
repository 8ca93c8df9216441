import type { Accelerations, Points, Sources } from '../state';
import { G } from '../units';
import { loopsFor } from './pair';
import { MOMENTS, type FieldSolver, type GatheredList, type PairKernel } from './types';

// Module-local aliases: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { min, max } = Math;

/**
 * Particles per leaf before it splits (common practice: small buckets beat
 * single-particle leaves). 16 rather than 8: a third fewer cells to build and
 * copy, and the walk no slower (our own measurement at 1e5 particles).
 */
const LEAF_SIZE = 16;
/**
 * Most particles sharing one walk of a self-field. Larger groups walk less
 * often but open more cells near them; with the WebAssembly walk, 64 (with
 * sibling cells merged up to it) was faster than 32 and 48 and no slower than
 * 96 at 1e5 particles (our own measurement, CPU time on a busy machine); the
 * larger group's walk is also more accurate (median error 1.3e-4 against 1.6e-4).
 */
const GROUP_SIZE = 64;
/** Beyond this depth coincident particles share a leaf rather than splitting forever. */
const MAX_DEPTH = 48;

/**
 * Barnes & Hut (1986) octree over the sources: cubic cells split into eight,
 * each holding its mass, centre of mass and second moments about it (for the
 * quadrupole term), and the box around its particles (its reach from the centre of mass is the size in the opening test). Built by partitioning an index array, so the same sources
 * always give the same tree. Each cell's numbers sit together (CELL doubles in
 * `cells`, LINK integers in `links`), so a walk that visits a cell touches one
 * or two cache lines rather than one per quantity; this is what makes walks
 * over large trees fast. The particles are copied in tree order, so a leaf's
 * particles are one contiguous run the pair loop sums directly.
 */
export interface Octree {
  nodes: number;
  /** Per cell: geometric centre x, y, z (kpc); half size h of the box around its particles; b_max^2, the squared distance from the centre of mass to that box's farthest corner; centre of mass x, y, z; mass (Msun); second moments xx, yy, zz, xy, xz, yz about the centre of mass (Msun kpc^2). */
  cells: Float64Array;
  /** Per cell: first child (-1 for a leaf; children are consecutive), child count, first particle slot, particle count (its particles are consecutive slots, leaf or not). */
  links: Int32Array;
  /** Tree-order slot to source index. */
  order: Uint32Array;
  /** Source positions and masses in tree order: a leaf's particles are slots [start, start + count). */
  sorted: Sources;
  /**
   * Target groups of a self-field, as (first slot, count) pairs in build order: runs of
   * consecutive sibling cells of at most GROUP_SIZE particles together (or a deepest leaf
   * holding more). One walk serves a whole group, and groups are the unit a self-field is
   * split across threads by.
   */
  groups: Int32Array;
  /**
   * Tells this tree's contents from another's in the same arrays (a tree rebuilt in
   * shared memory): a kernel that copies a tree elsewhere copies it again when the
   * arrays or the stamp differ.
   */
  stamp: number;
}

/** Layout of one cell in Octree.cells and Octree.links. */
const CELL = 16;
const CENTRE_X = 0, CENTRE_Y = 1, CENTRE_Z = 2, HALF = 3, BMAX2 = 4, COM_X = 5, COM_Y = 6, COM_Z = 7, MASS = 8;
const IXX = 9, IYY = 10, IZZ = 11, IXY = 12, IXZ = 13, IYZ = 14;
const LINK = 4;
/** Doubles and integers per cell, for copying a tree into memory shared between threads. */
export const CELL_DOUBLES = CELL, CELL_INTS = LINK;
const FIRST_CHILD = 0, CHILD_COUNT = 1, FIRST_SLOT = 2, SLOT_COUNT = 3;
// A cell's numbers that act on targets, COM_X to IYZ, are one record of an interaction list (MOMENTS of them).
/**
 * Accepted cells of at most this many particles act through their particles:
 * exact, and cheaper than one quadrupole term. Of 1, 2 and 3, 2 was fastest
 * (our own measurement, CPU time at 8e3 and 3e4 particles).
 */
const FEW = 2;

/** The build's working arrays, kept between builds: fresh ones every step cost more in collection than the build itself. */
let working = { scratch: new Uint32Array(0), octantOf: new Uint8Array(0), counts: new Int32Array(8 * (MAX_DEPTH + 1)) };
function buildScratch(n: number): typeof working {
  if (working.scratch.length < n) working = { scratch: new Uint32Array(n), octantOf: new Uint8Array(n), counts: working.counts };
  return working;
}

/** Trees built in this thread so far: each new tree's stamp. */
let builds = 0;

/**
 * Cells being built over the sources in slot order: each cell's numbers and links, and the box
 * around its particles (min x, y, z, max x, y, z; a parent's is its children's union), in arrays
 * that double when full; and the groups found so far.
 */
interface CellBuild {
  src: Sources;
  order: Uint32Array;
  cells: Float64Array;
  links: Int32Array;
  boxes: Float64Array;
  nodes: number;
  groups: number[];
}

function newBuild(src: Sources, order: Uint32Array, room: number): CellBuild {
  return { src, order, cells: new Float64Array(CELL * room), links: new Int32Array(LINK * room), boxes: new Float64Array(6 * room), nodes: 0, groups: [] };
}

function allocCell(b: CellBuild): number {
  const node = b.nodes;
  if (CELL * node === b.cells.length) {
    const room = 2 * node;
    const c = new Float64Array(CELL * room), l = new Int32Array(LINK * room), x = new Float64Array(6 * room);
    c.set(b.cells); l.set(b.links); x.set(b.boxes);
    b.cells = c; b.links = l; b.boxes = x;
  }
  // Arrays kept between builds hold older cells: every number of a new one starts as in fresh arrays.
  b.cells.fill(0, CELL * node, CELL * (node + 1));
  b.links.fill(0, LINK * node, LINK * (node + 1));
  b.links[LINK * node + FIRST_CHILD] = -1;
  b.nodes++;
  return node;
}

// The cell's size in the opening test is b_max, the farthest its particles' box reaches from its
// centre of mass (Salmon & Warren 1994, J. Comput. Phys. 111, 136): the multipole error grows
// with how far the mass lies from the centre of mass, so a lopsided cell (centre of mass near a
// corner) is opened sooner and a compact one later than with the box's side. The box, not the
// cube: in sparse regions it is much the smaller. Needs the centre of mass written first.
function sizeFromBox(cells: Float64Array, boxes: Float64Array, node: number): void {
  const c = node * CELL, b = 6 * node;
  const x0 = boxes[b], y0 = boxes[b + 1], z0 = boxes[b + 2], x1 = boxes[b + 3], y1 = boxes[b + 4], z1 = boxes[b + 5];
  const h = 0.5 * max(x1 - x0, y1 - y0, z1 - z0);
  cells[c + CENTRE_X] = 0.5 * (x0 + x1); cells[c + CENTRE_Y] = 0.5 * (y0 + y1); cells[c + CENTRE_Z] = 0.5 * (z0 + z1);
  const gx = cells[c + COM_X], gy = cells[c + COM_Y], gz = cells[c + COM_Z];
  const bx = max(x1 - gx, gx - x0), by = max(y1 - gy, gy - y0), bz = max(z1 - gz, gz - z0);
  cells[c + HALF] = h; cells[c + BMAX2] = bx * bx + by * by + bz * bz;
}

/** Writes a cell's mass, centre of mass, second moments and box, and its size from the box. */
function writeCell(
  cells: Float64Array, boxes: Float64Array, node: number, M: number, cx: number, cy: number, cz: number,
  xx: number, yy: number, zz: number, xy: number, xz: number, yz: number, x0: number, y0: number, z0: number, x1: number, y1: number, z1: number,
): void {
  const c = node * CELL, b = 6 * node;
  boxes[b] = x0; boxes[b + 1] = y0; boxes[b + 2] = z0; boxes[b + 3] = x1; boxes[b + 4] = y1; boxes[b + 5] = z1;
  cells[c + MASS] = M;
  cells[c + COM_X] = cx; cells[c + COM_Y] = cy; cells[c + COM_Z] = cz;
  cells[c + IXX] = xx; cells[c + IYY] = yy; cells[c + IZZ] = zz; cells[c + IXY] = xy; cells[c + IXZ] = xz; cells[c + IYZ] = yz;
  sizeFromBox(cells, boxes, node);
}

/** A leaf's mass, centre of mass, box and second moments, from its particles. */
function summariseLeaf(bd: CellBuild, node: number, start: number, end: number): void {
  const { order, cells, boxes } = bd;
  const { x, y, z, m } = bd.src;
  let M = 0, mx = 0, my = 0, mz = 0;
  let x0 = Infinity, y0 = Infinity, z0 = Infinity, x1 = -Infinity, y1 = -Infinity, z1 = -Infinity;
  for (let s = start; s < end; s++) {
    const i = order[s], mi = m[i], xi = x[i], yi = y[i], zi = z[i];
    M += mi; mx += mi * xi; my += mi * yi; mz += mi * zi;
    x0 = min(x0, xi); x1 = max(x1, xi); y0 = min(y0, yi); y1 = max(y1, yi); z0 = min(z0, zi); z1 = max(z1, zi);
  }
  const cx0 = mx / M, cy0 = my / M, cz0 = mz / M;
  let xx = 0, yy = 0, zz = 0, xy = 0, xz = 0, yz = 0;
  for (let s = start; s < end; s++) {
    const i = order[s], mi = m[i];
    const dx = x[i] - cx0, dy = y[i] - cy0, dz = z[i] - cz0;
    xx += mi * dx * dx; yy += mi * dy * dy; zz += mi * dz * dz; xy += mi * dx * dy; xz += mi * dx * dz; yz += mi * dy * dz;
  }
  writeCell(cells, boxes, node, M, cx0, cy0, cz0, xx, yy, zz, xy, xz, yz, x0, y0, z0, x1, y1, z1);
}

/**
 * A parent's numbers from its children's, without going over its particles again:
 * masses and boxes add up, and each child's second moments move to the parent's
 * centre of mass by the parallel-axis theorem (I + M d d^T, d the child's offset).
 */
function summariseParent(cells: Float64Array, boxes: Float64Array, node: number, first: number, kids: number): void {
  let M = 0, mx = 0, my = 0, mz = 0;
  let x0 = Infinity, y0 = Infinity, z0 = Infinity, x1 = -Infinity, y1 = -Infinity, z1 = -Infinity;
  for (let q = first; q < first + kids; q++) {
    const cq = q * CELL, bq = 6 * q, Mq = cells[cq + MASS];
    M += Mq; mx += Mq * cells[cq + COM_X]; my += Mq * cells[cq + COM_Y]; mz += Mq * cells[cq + COM_Z];
    x0 = min(x0, boxes[bq]); y0 = min(y0, boxes[bq + 1]); z0 = min(z0, boxes[bq + 2]);
    x1 = max(x1, boxes[bq + 3]); y1 = max(y1, boxes[bq + 4]); z1 = max(z1, boxes[bq + 5]);
  }
  const cx0 = mx / M, cy0 = my / M, cz0 = mz / M;
  let xx = 0, yy = 0, zz = 0, xy = 0, xz = 0, yz = 0;
  for (let q = first; q < first + kids; q++) {
    const cq = q * CELL, Mq = cells[cq + MASS];
    const dx = cells[cq + COM_X] - cx0, dy = cells[cq + COM_Y] - cy0, dz = cells[cq + COM_Z] - cz0;
    xx += cells[cq + IXX] + Mq * dx * dx; yy += cells[cq + IYY] + Mq * dy * dy; zz += cells[cq + IZZ] + Mq * dz * dz;
    xy += cells[cq + IXY] + Mq * dx * dy; xz += cells[cq + IXZ] + Mq * dx * dz; yz += cells[cq + IYZ] + Mq * dy * dz;
  }
  writeCell(cells, boxes, node, M, cx0, cy0, cz0, xx, yy, zz, xy, xz, yz, x0, y0, z0, x1, y1, z1);
}

/**
 * Sorts slots [start, end) of the order by octant of the cube centred on (cx, cy, cz)
 * (stable counting sort), leaving the eight counts at `counts[c0..c0 + 8)`.
 */
function sortByOctant(src: Sources, order: Uint32Array, start: number, end: number, cx: number, cy: number, cz: number, counts: Int32Array, c0: number): void {
  const { x, y, z } = src;
  const { scratch, octantOf } = working;
  counts.fill(0, c0, c0 + 8);
  for (let s = start; s < end; s++) {
    const i = order[s];
    const o = (x[i] >= cx ? 1 : 0) | (y[i] >= cy ? 2 : 0) | (z[i] >= cz ? 4 : 0);
    octantOf[s] = o;
    counts[c0 + o]++;
  }
  const offset = [0, 0, 0, 0, 0, 0, 0, 0];
  for (let o = 1; o < 8; o++) offset[o] = offset[o - 1] + counts[c0 + o - 1];
  for (let s = start; s < end; s++) scratch[start + offset[octantOf[s]]++] = order[s];
  order.set(scratch.subarray(start, end), start);
}

/**
 * Builds the cell `node` over slots [start, end) and everything below it. (cx, cy, cz) and h:
 * the centre and half size of the cube the node splits into octants.
 */
function split(bd: CellBuild, node: number, start: number, end: number, depth: number, grouped: boolean, cx: number, cy: number, cz: number, h: number): void {
  const l = node * LINK;
  bd.links[l + FIRST_SLOT] = start;
  bd.links[l + SLOT_COUNT] = end - start;
  const leaf = end - start <= LEAF_SIZE || depth >= MAX_DEPTH;
  if (!grouped && leaf) {
    bd.groups.push(start, end - start);
    grouped = true;
  }
  if (leaf) {
    summariseLeaf(bd, node, start, end);
    return;
  }
  // This depth's eight counters: the recursion below reuses deeper ones only.
  const counts = working.counts, c0 = 8 * depth;
  sortByOctant(bd.src, bd.order, start, end, cx, cy, cz, counts, c0);
  let first = -1, kids = 0;
  for (let o = 0; o < 8; o++) {
    if (counts[c0 + o] === 0) continue;
    const child = allocCell(bd);
    if (first < 0) first = child;
    kids++;
  }
  bd.links[l + FIRST_CHILD] = first;
  bd.links[l + CHILD_COUNT] = kids;
  // Ungrouped, consecutive children of at most GROUP_SIZE particles together are merged into groups;
  // a larger child is grouped further down.
  let runStart = start, runCount = 0;
  for (let o = 0, at = start, child = first; o <= 8; o++) {
    const k = o < 8 ? counts[c0 + o] : 0;
    if (!grouped && runCount > 0 && (o === 8 || runCount + k > GROUP_SIZE)) {
      bd.groups.push(runStart, runCount);
      runCount = 0;
    }
    if (o === 8 || k === 0) continue;
    const small = k <= GROUP_SIZE;
    if (small && runCount === 0) runStart = at;
    if (small) runCount += k;
    const q = 0.5 * h;
    split(bd, child++, at, at + k, depth + 1, grouped || small, cx + (o & 1 ? q : -q), cy + (o & 2 ? q : -q), cz + (o & 4 ? q : -q), q);
    at += k;
  }
  summariseParent(bd.cells, bd.boxes, node, first, kids);
}

/** Numbers per octant in OctreePlan.octants: first slot, end slot, grouped (1 or 0), cube centre x, y, z, half size. */
export const OCTANT = 7;

/**
 * The root's part of a build, the same for every way of building: the order set to the
 * sources sorted by the root's octants, and what the octants' subtrees need to be built
 * each on its own (by any thread) and then put together (joinOctree).
 */
export interface OctreePlan {
  n: number;
  /** Non-empty octants of the root, in order, OCTANT numbers each; none when the root is a leaf. */
  octants: Float64Array;
  count: number;
  /** The root's groups in build order: (first slot, count) pairs, and (-1, j) where octant j's own groups come. */
  groups: number[];
}

export function planOctree(src: Sources, order: Uint32Array): OctreePlan {
  const n = src.m.length;
  const { x, y, z } = src;
  for (let i = 0; i < n; i++) order[i] = i;
  let minX = Infinity, minY = Infinity, minZ = Infinity, maxX = -Infinity, maxY = -Infinity, maxZ = -Infinity;
  for (let i = 0; i < n; i++) {
    minX = min(minX, x[i]); maxX = max(maxX, x[i]);
    minY = min(minY, y[i]); maxY = max(maxY, y[i]);
    minZ = min(minZ, z[i]); maxZ = max(maxZ, z[i]);
  }
  const h = 0.5 * max(maxX - minX, maxY - minY, maxZ - minZ) * (1 + 1e-9) || 1e-9;
  const cx = 0.5 * (minX + maxX), cy = 0.5 * (minY + maxY), cz = 0.5 * (minZ + maxZ);
  const octants = new Float64Array(8 * OCTANT);
  if (n <= LEAF_SIZE) return { n, octants, count: 0, groups: [0, n] };
  const counts = buildScratch(n).counts;
  sortByOctant(src, order, 0, n, cx, cy, cz, counts, 0);
  // The grouping of split() at the root (which is never grouped itself).
  const groups: number[] = [];
  let count = 0, runStart = 0, runCount = 0;
  for (let o = 0, at = 0; o <= 8; o++) {
    const k = o < 8 ? counts[o] : 0;
    if (runCount > 0 && (o === 8 || runCount + k > GROUP_SIZE)) {
      groups.push(runStart, runCount);
      runCount = 0;
    }
    if (o === 8 || k === 0) continue;
    const small = k <= GROUP_SIZE;
    if (small && runCount === 0) runStart = at;
    if (small) runCount += k;
    else groups.push(-1, count);
    const q = 0.5 * h;
    octants.set([at, at + k, small ? 1 : 0, cx + (o & 1 ? q : -q), cy + (o & 2 ? q : -q), cz + (o & 4 ? q : -q), q], OCTANT * count++);
    at += k;
  }
  return { n, octants, count, groups };
}

/** Builds octant j of a plan below the cell `node` of `bd`, and copies its particles in tree order into `sorted`. */
function buildOctantAt(bd: CellBuild, node: number, octants: Float64Array, j: number, sorted: Sources): void {
  const o = OCTANT * j, start = octants[o], end = octants[o + 1];
  split(bd, node, start, end, 1, octants[o + 2] === 1, octants[o + 3], octants[o + 4], octants[o + 5], octants[o + 6]);
  const { x, y, z, m } = bd.src, order = bd.order;
  for (let s = start; s < end; s++) {
    const i = order[s];
    sorted.x[s] = x[i]; sorted.y[s] = y[i]; sorted.z[s] = z[i]; sorted.m[s] = m[i];
  }
}

/** An octant's subtree built on its own: its own cell first, then those below it; node numbers counted from its own cell. */
export interface OctantCells {
  nodes: number;
  cells: Float64Array;
  links: Int32Array;
  /** The box around the octant's particles. */
  box: Float64Array;
  /** (first slot, count) pairs in build order. */
  groups: ArrayLike<number>;
}

/** Each thread's arrays for the octants it builds. */
let octantBuild: CellBuild | null = null;

/**
 * Builds octant j of a plan made over the same sources and order (the order's slots of this
 * octant sorted further), by any thread; its particles go into their slots of `sorted`. The
 * result lives in arrays this thread reuses: copy it out before the next call.
 */
export function buildOctant(src: Sources, order: Uint32Array, octants: Float64Array, j: number, sorted: Sources): OctantCells {
  buildScratch(src.m.length);
  const bd = (octantBuild ??= newBuild(src, order, 256));
  bd.src = src;
  bd.order = order;
  bd.nodes = 0;
  bd.groups.length = 0;
  buildOctantAt(bd, allocCell(bd), octants, j, sorted);
  return { nodes: bd.nodes, cells: bd.cells, links: bd.links, box: bd.boxes.subarray(0, 6), groups: bd.groups };
}

/**
 * Puts a plan's octants, built apart, together into the tree one build would have made: the
 * root, its octants' cells after it, then each octant's cells below it in turn. `into` must
 * have room for all the cells (see joinedCells); returns the tree's cell and group counts.
 */
export function joinOctree(plan: OctreePlan, octant: (j: number) => OctantCells, into: { cells: Float64Array; links: Int32Array; groups: Int32Array }): { nodes: number; groups: number } {
  const { cells, links } = into;
  const k = plan.count;
  const boxes = new Float64Array(6 * (k + 1));
  let next = 1 + k;
  for (let j = 0; j < k; j++) {
    const o = octant(j), at = 1 + j;
    // Below its own cell, the octant's cell q (q >= 1) is the tree's next - 1 + q.
    const shift = next - 1;
    cells.set(o.cells.subarray(0, CELL), CELL * at);
    cells.set(o.cells.subarray(CELL, CELL * o.nodes), CELL * next);
    links.set(o.links.subarray(0, LINK), LINK * at);
    links.set(o.links.subarray(LINK, LINK * o.nodes), LINK * next);
    for (let q = 0; q < o.nodes; q++) {
      const l = LINK * (q === 0 ? at : shift + q) + FIRST_CHILD;
      if (links[l] >= 0) links[l] += shift;
    }
    boxes.set(o.box, 6 * at);
    next += o.nodes - 1;
  }
  const nodes = next;
  links.fill(0, 0, LINK);
  links[FIRST_CHILD] = 1; links[CHILD_COUNT] = k; links[FIRST_SLOT] = 0; links[SLOT_COUNT] = plan.n;
  cells.fill(0, 0, CELL);
  summariseParent(cells, boxes, 0, 1, k);
  let g = 0;
  for (let e = 0; e < plan.groups.length; e += 2) {
    if (plan.groups[e] >= 0) {
      into.groups[g++] = plan.groups[e]; into.groups[g++] = plan.groups[e + 1];
      continue;
    }
    const own = octant(plan.groups[e + 1]).groups;
    for (let q = 0; q < own.length; q++) into.groups[g++] = own[q];
  }
  return { nodes, groups: g / 2 };
}

/** Cells of the tree joinOctree makes from these octants' cell counts. */
export const joinedCells = (plan: OctreePlan, octantNodes: (j: number) => number): number => {
  let nodes = 1 + plan.count;
  for (let j = 0; j < plan.count; j++) nodes += octantNodes(j) - 1;
  return nodes;
};

/** A new stamp for a tree put together in place (joinOctree). */
export const nextStamp = (): number => ++builds;

export function buildOctree(src: Sources): Octree {
  const n = src.m.length;
  const order = new Uint32Array(n);
  const plan = planOctree(src, order);
  // Cells go into typed arrays that double when full (a smooth distribution needs about 0.25 cells a particle).
  const bd = newBuild(src, order, (n >> 2) + 64);
  const root = allocCell(bd);
  const sorted: Sources = { x: new Float64Array(n), y: new Float64Array(n), z: new Float64Array(n), m: new Float64Array(n) };
  if (plan.count === 0) {
    split(bd, root, 0, n, 0, false, 0, 0, 0, 0); // a leaf: no cube to split
    for (let s = 0; s < n; s++) {
      sorted.x[s] = src.x[s]; sorted.y[s] = src.y[s]; sorted.z[s] = src.z[s]; sorted.m[s] = src.m[s];
    }
  } else {
    // The octants are built one after the other straight into place, which is the numbering
    // joinOctree gives octants built apart: their cells, then each one's cells below it in turn.
    const k = plan.count;
    for (let j = 0; j < k; j++) allocCell(bd);
    const own: number[][] = [];
    for (let j = 0; j < k; j++) {
      const from = bd.groups.length;
      buildOctantAt(bd, 1 + j, plan.octants, j, sorted);
      own.push(bd.groups.splice(from));
    }
    const l = LINK * root;
    bd.links[l + FIRST_CHILD] = 1; bd.links[l + CHILD_COUNT] = k; bd.links[l + FIRST_SLOT] = 0; bd.links[l + SLOT_COUNT] = n;
    summariseParent(bd.cells, bd.boxes, root, 1, k);
    for (let e = 0; e < plan.groups.length; e += 2) {
      if (plan.groups[e] >= 0) bd.groups.push(plan.groups[e], plan.groups[e + 1]);
      else for (const v of own[plan.groups[e + 1]]) bd.groups.push(v);
    }
  }
  const { nodes, cells, links, groups } = bd;
  return { nodes, cells: cells.subarray(0, CELL * nodes), links: links.subarray(0, LINK * nodes), order, sorted, groups: Int32Array.from(groups), stamp: ++builds };
}

const list = (): Float64Array => new Float64Array(256);

/** Grows a list array to hold at least `need` entries, keeping its contents. */
function room(a: Float64Array, need: number): Float64Array {
  if (need <= a.length) return a;
  const b = new Float64Array(max(need, 2 * a.length));
  b.set(a);
  return b;
}

/**
 * What a group of targets interacts with, gathered by one walk: accepted
 * cells with their moments, and the particles of leaves that had to be
 * opened. A cell is accepted when b_max < theta * (distance from its centre
 * of mass to the nearest point of the target box), b_max being the distance
 * from its centre of mass to the farthest corner of the box around its
 * particles (sizeFromBox), and when its cube around that box does
 * not overlap the target box (the second condition is a common-practice guard against targets
 * inside large, lopsided cells). Sharing the walk among a group's particles is
 * the grouping of Barnes (1990); for a single point it is the 1986 criterion.
 * Accepted cells act through monopole plus quadrupole terms of the pair
 * kernel (PairLoops.cellPull; the expansion is written out in pair.ts), except
 * cells of FEW particles or fewer, whose particles join the pair list.
 */
class InteractionList implements GatheredList {
  // Particles of opened leaves: summed by the pair loop.
  px = list(); py = list(); pz = list(); pm = list();
  particles = 0;
  /** Cells, MOMENTS numbers each (centre of mass, mass, second moments), in the order of the cell record. */
  cl = list();
  cellCount = 0;
  private stack = new Int32Array(8 * MAX_DEPTH + 8);

  private pushParticles(sx: Float64Array, sy: Float64Array, sz: Float64Array, sm: Float64Array, from: number, count: number): void {
    const need = this.particles + count;
    if (need > this.px.length) {
      this.px = room(this.px, need); this.py = room(this.py, need); this.pz = room(this.pz, need); this.pm = room(this.pm, need);
    }
    const { px, py, pz, pm } = this;
    for (let k = this.particles, s = from, e = from + count; s < e; s++, k++) {
      px[k] = sx[s]; py[k] = sy[s]; pz[k] = sz[s]; pm[k] = sm[s];
    }
    this.particles = need;
  }

  private pushCell(cells: Float64Array, c: number): void {
    const k = MOMENTS * this.cellCount++;
    if (k + MOMENTS > this.cl.length) this.cl = room(this.cl, k + MOMENTS);
    const cl = this.cl;
    for (let q = 0; q < MOMENTS; q++) cl[k + q] = cells[c + COM_X + q];
  }

  collect(t: Octree, theta2: number, minX: number, minY: number, minZ: number, maxX: number, maxY: number, maxZ: number): void {
    this.particles = 0;
    this.cellCount = 0;
    const { cells, links } = t;
    const { x: sx, y: sy, z: sz, m: sm } = t.sorted;
    const stack = this.stack;
    let top = 0;
    stack[top++] = 0;
    while (top > 0) {
      const node = stack[--top];
      const c = node * CELL;
      const h = cells[c + HALF];
      const ox = cells[c + CENTRE_X], oy = cells[c + CENTRE_Y], oz = cells[c + CENTRE_Z];
      const apart = minX > ox + h || maxX < ox - h || minY > oy + h || maxY < oy - h || minZ > oz + h || maxZ < oz - h;
      // Distance from the centre of mass to the nearest point of the box.
      const gx = cells[c + COM_X], gy = cells[c + COM_Y], gz = cells[c + COM_Z];
      const dx = max(minX - gx, 0, gx - maxX), dy = max(minY - gy, 0, gy - maxY), dz = max(minZ - gz, 0, gz - maxZ);
      const l = node * LINK;
      if (apart && cells[c + BMAX2] < theta2 * (dx * dx + dy * dy + dz * dz)) {
        if (links[l + SLOT_COUNT] <= FEW) this.pushParticles(sx, sy, sz, sm, links[l + FIRST_SLOT], links[l + SLOT_COUNT]);
        else this.pushCell(cells, c);
      } else if (links[l + FIRST_CHILD] < 0) {
        this.pushParticles(sx, sy, sz, sm, links[l + FIRST_SLOT], links[l + SLOT_COUNT]);
      } else {
        for (let q = links[l + FIRST_CHILD] + links[l + CHILD_COUNT] - 1; q >= links[l + FIRST_CHILD]; q--) stack[top++] = q;
      }
    }
  }
}

/**
 * One list per thread, kept between walks so a split walk's many small ranges
 * don't each grow a new one (walks never nest, so sharing it is safe).
 */
const reusedList = new InteractionList();

/** Target groups of a self-field (see Octree.groups): how many there are. */
export const treeGroups = (t: Octree): number => t.groups.length / 2;

/**
 * Calls `each(list, ids, from, to)` for every walk a range of the work needs:
 * targets ids[from..to-1] (or from..to-1 themselves when ids is null) share
 * the list. Self-fields (targets are the sources) walk once per group, over
 * groups iStart..iEnd-1; other targets (probes) walk one by one over
 * iStart..iEnd. Either way each target's list depends only on the tree and
 * its group, so splitting ranges across threads gives identical results.
 * `ownWalk(targets, from, to)`, when given, may walk and sum a group itself
 * (returning true): a self-field group (targets null) or one probe, with the
 * same dependence on the tree and the group alone.
 */
function forEachWalk(
  tree: Octree, sources: Sources, targets: Points, theta: number, iStart: number, iEnd: number,
  each: (list: InteractionList, ids: Uint32Array | null, from: number, to: number) => void,
  ownWalk?: (targets: Points | null, from: number, to: number) => boolean,
): void {
  const list = reusedList;
  const theta2 = theta * theta;
  if (targets === sources) {
    const { order, groups } = tree;
    const { x, y, z } = tree.sorted;
    for (let k = iStart; k < iEnd; k++) {
      const s = groups[2 * k], e = s + groups[2 * k + 1];
      if (ownWalk?.(null, s, e)) continue;
      let minX = Infinity, minY = Infinity, minZ = Infinity, maxX = -Infinity, maxY = -Infinity, maxZ = -Infinity;
      for (let q = s; q < e; q++) {
        minX = min(minX, x[q]); maxX = max(maxX, x[q]);
        minY = min(minY, y[q]); maxY = max(maxY, y[q]);
        minZ = min(minZ, z[q]); maxZ = max(maxZ, z[q]);
      }
      list.collect(tree, theta2, minX, minY, minZ, maxX, maxY, maxZ);
      each(list, order, s, e);
    }
  } else {
    for (let i = iStart; i < iEnd; i++) {
      if (ownWalk?.(targets, i, i + 1)) continue;
      const xi = targets.x[i], yi = targets.y[i], zi = targets.z[i];
      list.collect(tree, theta2, xi, yi, zi, xi, yi, zi);
      each(list, null, i, i + 1);
    }
  }
}

/** How many work units treeFieldRange / treePotentialRange split over: groups for a self-field, targets otherwise. */
export const treeWorkUnits = (tree: Octree, sources: Sources, targets: Points): number =>
  targets === sources ? treeGroups(tree) : targets.x.length;

/** Tree field for work units iStart..iEnd (see treeWorkUnits). */
export function treeFieldRange(
  tree: Octree, sources: Sources, targets: Points, kernel: PairKernel, theta: number, iStart: number, iEnd: number, out: Accelerations,
): void {
  const acc = new Float64Array(6);
  const { x, y, z } = targets;
  const loops = loopsFor(kernel), eps2 = kernel.softening2_kpc2, p = kernel.params;
  const two = loops.listPullTwo, group = loops.treeGroupField;
  const theta2 = theta * theta;
  // Where the kernel walks and sums whole groups and probes itself (Newton in WebAssembly), it does.
  const own = group && ((t: Points | null, from: number, to: number) => group(tree, t, from, to, theta2, FEW, eps2, p, out));
  forEachWalk(tree, sources, targets, theta, iStart, iEnd, (list, ids, from, to) => {
    let q = from;
    // Where the kernel has a loop for it, targets two at a time: one pass over the list serves both.
    for (; two && q + 1 < to; q += 2) {
      const i = ids ? ids[q] : q, j = ids ? ids[q + 1] : q + 1;
      two(list, x[i], y[i], z[i], x[j], y[j], z[j], eps2, p, acc);
      out.ax[i] = G * acc[0]; out.ay[i] = G * acc[1]; out.az[i] = G * acc[2];
      out.ax[j] = G * acc[3]; out.ay[j] = G * acc[4]; out.az[j] = G * acc[5];
    }
    for (; q < to; q++) {
      const i = ids ? ids[q] : q;
      const xi = x[i], yi = y[i], zi = z[i];
      acc[0] = 0; acc[1] = 0; acc[2] = 0;
      loops.pull(list.px, list.py, list.pz, list.pm, list.particles, xi, yi, zi, eps2, p, acc);
      loops.cellPull(list.cl, list.cellCount, xi, yi, zi, eps2, p, acc);
      out.ax[i] = G * acc[0]; out.ay[i] = G * acc[1]; out.az[i] = G * acc[2];
    }
  }, own);
}

export function treePotentialRange(
  tree: Octree, sources: Sources, targets: Points, kernel: PairKernel, theta: number, iStart: number, iEnd: number, out: Float64Array,
): void {
  const { x, y, z } = targets;
  const acc = new Float64Array(2);
  const loops = loopsFor(kernel), eps2 = kernel.softening2_kpc2, p = kernel.params;
  const two = loops.listPotentialTwo, group = loops.treeGroupPotential;
  const theta2 = theta * theta;
  const own = group && ((t: Points | null, from: number, to: number) => group(tree, t, from, to, theta2, FEW, eps2, p, out));
  forEachWalk(tree, sources, targets, theta, iStart, iEnd, (list, ids, from, to) => {
    let q = from;
    for (; two && q + 1 < to; q += 2) {
      const i = ids ? ids[q] : q, j = ids ? ids[q + 1] : q + 1;
      two(list, x[i], y[i], z[i], x[j], y[j], z[j], eps2, p, acc);
      out[i] = -G * acc[0]; out[j] = -G * acc[1];
    }
    for (; q < to; q++) {
      const i = ids ? ids[q] : q;
      const xi = x[i], yi = y[i], zi = z[i];
      out[i] = -G * (loops.potential(list.px, list.py, list.pz, list.pm, list.particles, xi, yi, zi, eps2, p)
        + loops.cellPotential(list.cl, list.cellCount, xi, yi, zi, eps2, p));
    }
  }, own);
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
