// One run's direct-sum or tree field split across pool threads over shared memory.
//
// The run's own thread copies positions and masses into SharedArrayBuffer-backed
// arrays, opens a round, and then claims chunks of the target range alongside
// any helper threads; every chunk is computed by `directFieldRange`, whose
// per-target summation order does not depend on how the range is cut (in the
// WebAssembly kernel and the JS one alike, which give the same bits), so the
// result is bit-identical to one thread's. A tree run builds its octree in
// shared memory once per evaluation, in a round of its own: the run's thread
// sorts the particles by the root's octants, every thread claims octants whose
// subtrees it builds, and the run's thread puts them together into the very tree
// one thread's build makes (see SplitSolver.sharedBuild). The chunks of the
// walk's round are then ranges of target groups, each walked by
// `treeFieldRange`, whose groups' lists depend only on the tree, so the same holds. Chunks are claimed with an atomic
// counter, so a round finishes even when no helper is there (not started yet,
// or dismissed to make room for another run): the run's thread then claims
// them all.
//
// Every claim carries its round's tag, so a helper that claimed just as one
// round ran out can't mistake its claim for one of the next round. Helpers
// sleep on a wake counter that every change they must see bumps (a new round,
// the end of the run, a dismissal), so no wake-up is lost between a helper's
// last look and its sleep.
//
// The pair kernel crosses as data: its registered name (ASCII bytes), softening
// and parameters; each thread's solvers look the kernel's loops up by that name.
//
// A field-form run's grid passes are rounds too (mode GRID, see sharedGrid.ts).
import { buildOctree, directFieldRange, directPotentialRange, treeFieldRange, treePotentialRange, treeWorkUnits, type Octree } from '../shared/engine/solvers';
import { directSolver } from '../shared/engine/solvers/direct';
import { buildOctant, CELL_DOUBLES, CELL_INTS, joinedCells, joinOctree, nextStamp, OCTANT, planOctree, treeSolver, type OctantCells } from '../shared/engine/solvers/tree';
import type { FieldSolver, PairKernel } from '../shared/engine/solvers';
import { pairKernelDefinition } from '../shared/engine/laws/kernels';
import { MAX_KERNEL_NAME, MAX_KERNEL_PARAMS } from '../shared/engine/solvers/types';
import type { Accelerations, Points, Sources } from '../shared/engine/state';
import { gridWorker, SplitGrid, type SharedGrid } from './sharedGrid';

/** The shared memory of one split run. Plain data: it reaches pool threads by structured clone, the buffers shared, not copied. */
export interface SharedField {
  /** Particles of the run: sources must number exactly this, targets at most this. */
  n: number;
  control: SharedArrayBuffer;
  data: SharedArrayBuffer;
  /**
   * Present for a tree run: room for one octree of at most `capacity` cells, rebuilt every
   * evaluation, and for the root's octants built apart before they are put together (`parts`).
   */
  tree?: { theta: number; capacity: number; doubles: SharedArrayBuffer; ints: SharedArrayBuffer; parts: { doubles: SharedArrayBuffer; ints: SharedArrayBuffer } };
  /** Present for a field-form run: its grid's working arrays. */
  grid?: SharedGrid;
}

// Int32 slots of `control`.
const WAKE = 0; // bumped by a new round, the run's end and a dismissal; helpers sleep on it
const CLAIM = 1; // round tag << INDEX_BITS | next chunk to claim
const INFO = 2; // round tag << INDEX_BITS | chunks of that round, written before CLAIM opens
const DONE = 3; // chunks finished this round
const CHUNK_SIZE = 4;
const TARGETS = 5;
const MODE = 6;
const SAME = 7; // 1 when the targets are the sources themselves (no copy)
const STOP = 8; // 1 once the run is over
const ACTIVE = 9; // helpers inside serveSharedField
const WANTED = 10; // helpers the pool still wants; above it, helpers leave
const NODES = 11; // cells of this round's tree
const GROUPS = 12; // target groups of this round's tree
const PASS = 13; // the grid pass of a GRID round
const STAMP = 14; // this round's tree's stamp (Octree.stamp): a thread's copy of an older tree is not reused
const CONTROL_SLOTS = 15;

const FIELD = 0;
const POTENTIAL = 1;
const GRID = 2;
const BUILD = 3; // a tree's octants, one a chunk
/** Low bits of CLAIM and INFO: a round has at most threads x CHUNKS_PER_THREAD chunks, plus one spent claim per thread. */
const INDEX_BITS = 12;
const INDEX_MASK = (1 << INDEX_BITS) - 1;
/** Round tags wrap here; a stale claim would have to sleep through this many rounds to match again. */
const TAG_MASK = (1 << (31 - INDEX_BITS)) - 1;
/** Float64 slots before the arrays: softening^2, name length, parameter count, generic-loops flag, the parameters, then the name's bytes. */
const PARAMS = 4 + MAX_KERNEL_PARAMS + MAX_KERNEL_NAME / 8;
const NAME_BYTE = 8 * (4 + MAX_KERNEL_PARAMS);
/** Arrays of n: source x, y, z, m; target x, y, z; output x, y, z (output x alone holds potentials). */
const ARRAYS = 10;
/** Chunks per thread and round: enough to even out threads that start late or run slow. */
const CHUNKS_PER_THREAD = 16;
const MIN_CHUNK_TARGETS = 16;
/** Leaves room in the claim index for the spent claims of a round. */
const MAX_CHUNKS = INDEX_MASK >> 1;

/**
 * Cells a shared tree has room for. Trees of smooth distributions have about
 * 0.4 cells per particle; a rarer, deeper one is walked by the run's thread alone.
 */
const treeCapacity = (n: number) => n + 64;
/**
 * Cells the octants' parts have room for: octant j's from slot `start + j` of its first particle,
 * as many as it has particles, plus one. A deeper octant makes the run's thread build alone.
 */
const partCells = (n: number) => n + 8;

/** Shared memory for a run of n particles; `theta` when its solver is the tree. */
export function createSharedField(n: number, helpers: number, theta?: number, grid?: SharedGrid): SharedField {
  const f: SharedField = {
    n,
    control: new SharedArrayBuffer(4 * CONTROL_SLOTS),
    data: new SharedArrayBuffer(8 * (PARAMS + ARRAYS * n)),
    ...(grid ? { grid } : {}),
  };
  if (theta !== undefined) {
    const capacity = treeCapacity(n);
    // Doubles: cells, then sources in tree order (x, y, z, m). Integers: cell links, tree order, groups (two each).
    // The parts: the plan's octants, their boxes and cells; their cell and group counts, links and groups.
    f.tree = {
      theta,
      capacity,
      doubles: new SharedArrayBuffer(8 * (CELL_DOUBLES * capacity + 4 * n)),
      ints: new SharedArrayBuffer(4 * (CELL_INTS * capacity + 3 * n)),
      parts: { doubles: new SharedArrayBuffer(8 * (8 * OCTANT + 8 * 6 + CELL_DOUBLES * partCells(n))), ints: new SharedArrayBuffer(4 * (8 * 2 + CELL_INTS * partCells(n) + 2 * n)) },
    };
  }
  // All zeros is round 0 with no chunks: a claim before the first round gets nothing.
  new Int32Array(f.control)[WANTED] = helpers;
  return f;
}

interface Views {
  c: Int32Array;
  params: Float64Array;
  name: Uint8Array;
  sources: Sources;
  targets: Points;
  out: Accelerations;
  tree?: { theta: number; capacity: number; d: Float64Array; i: Int32Array; parts: Parts };
  grid?: (pass: number, from: number, to: number) => void;
}

function views(f: SharedField): Views {
  const d = new Float64Array(f.data);
  const at = (k: number) => d.subarray(PARAMS + k * f.n, PARAMS + (k + 1) * f.n);
  return {
    c: new Int32Array(f.control),
    params: d.subarray(0, PARAMS),
    name: new Uint8Array(f.data, NAME_BYTE, MAX_KERNEL_NAME),
    sources: { x: at(0), y: at(1), z: at(2), m: at(3) },
    targets: { x: at(4), y: at(5), z: at(6) },
    out: { ax: at(7), ay: at(8), az: at(9) },
    ...(f.tree ? { tree: { theta: f.tree.theta, capacity: f.tree.capacity, d: new Float64Array(f.tree.doubles), i: new Int32Array(f.tree.ints), parts: partViews(f.tree.parts, f.n) } } : {}),
    ...(f.grid ? { grid: gridWorker(f.grid) } : {}),
  };
}

/** The root's octants of the round's tree, built apart: the plan's octants, and each one's cells where buildPart left them. */
interface Parts {
  plan: Float64Array;
  boxes: Float64Array;
  cells: Float64Array;
  /** Per octant: its cells (-1 when they outgrew its part) and its groups. */
  sizes: Int32Array;
  links: Int32Array;
  groups: Int32Array;
}

function partViews(p: { doubles: SharedArrayBuffer; ints: SharedArrayBuffer }, n: number): Parts {
  const d = new Float64Array(p.doubles), i = new Int32Array(p.ints);
  const cells = CELL_DOUBLES * partCells(n), links = CELL_INTS * partCells(n);
  return {
    plan: d.subarray(0, 8 * OCTANT),
    boxes: d.subarray(8 * OCTANT, 8 * OCTANT + 48),
    cells: d.subarray(8 * OCTANT + 48, 8 * OCTANT + 48 + cells),
    sizes: i.subarray(0, 16),
    links: i.subarray(16, 16 + links),
    groups: i.subarray(16 + links, 16 + links + 2 * n),
  };
}

/** The whole room for a tree in shared memory: cells and links of `capacity` cells, then the sources in tree order, the order and groups for n. */
function treeRoom(t: NonNullable<Views['tree']>, n: number): Omit<Octree, 'nodes' | 'stamp'> {
  const { d, i, capacity } = t;
  const s = CELL_DOUBLES * capacity, l = CELL_INTS * capacity;
  return {
    cells: d.subarray(0, s),
    links: i.subarray(0, l),
    sorted: { x: d.subarray(s, s + n), y: d.subarray(s + n, s + 2 * n), z: d.subarray(s + 2 * n, s + 3 * n), m: d.subarray(s + 3 * n, s + 4 * n) },
    order: new Uint32Array(i.buffer, 4 * l, n),
    groups: i.subarray(l + n, l + 3 * n),
  };
}

/** The round's tree in its room: its first `nodes` cells and `groups` groups. */
function sharedTree(t: NonNullable<Views['tree']>, n: number, nodes: number, groups: number, stamp: number): Octree {
  const room = treeRoom(t, n);
  return { ...room, nodes, cells: room.cells.subarray(0, CELL_DOUBLES * nodes), links: room.links.subarray(0, CELL_INTS * nodes), groups: room.groups.subarray(0, 2 * groups), stamp };
}

/** Builds octant j of the round's plan (see SplitSolver.sharedBuild) into its part. */
function buildPart(v: Views, j: number): void {
  const t = v.tree!, p = t.parts, room = treeRoom(t, v.sources.m.length);
  const o = buildOctant(v.sources, room.order, p.plan, j, room.sorted);
  const start = p.plan[OCTANT * j], at = start + j;
  if (o.nodes > p.plan[OCTANT * j + 1] - start + 1) {
    p.sizes[2 * j] = -1;
    return;
  }
  p.cells.set(o.cells.subarray(0, CELL_DOUBLES * o.nodes), CELL_DOUBLES * at);
  p.links.set(o.links.subarray(0, CELL_INTS * o.nodes), CELL_INTS * at);
  p.boxes.set(o.box, 6 * j);
  p.groups.set(o.groups, 2 * start);
  p.sizes[2 * j] = o.nodes;
  p.sizes[2 * j + 1] = o.groups.length;
}

/** Publishes the round's kernel; a name not registered is refused here, before any helper would meet it. */
function writeKernel(v: Views, kernel: PairKernel): void {
  const def = pairKernelDefinition(kernel.name);
  if (kernel.params.length !== def.params.length) throw new Error(`pair kernel "${kernel.name}" takes ${def.params.length} parameters, got ${kernel.params.length}`);
  v.params[0] = kernel.softening2_kpc2;
  v.params[1] = kernel.name.length;
  v.params[2] = kernel.params.length;
  v.params[3] = kernel.generic ? 1 : 0;
  v.params.set(kernel.params, 4);
  for (let k = 0; k < kernel.name.length; k++) v.name[k] = kernel.name.charCodeAt(k);
}

function readKernel(v: Views): PairKernel {
  const params = Array.from(v.params.subarray(4, 4 + v.params[2]));
  return { name: String.fromCharCode(...v.name.subarray(0, v.params[1])), softening2_kpc2: v.params[0], params, generic: v.params[3] === 1 };
}

/** Claims and computes chunks of the open round until none is left; returns how many this thread did. */
function work(v: Views): number {
  const c = v.c;
  let done = 0;
  for (;;) {
    const claim = Atomics.add(c, CLAIM, 1);
    const info = Atomics.load(c, INFO);
    // A claim counts only if its round is still the one described, and only within that round's chunks;
    // while a counted claim is out, the run's thread waits for it and changes nothing below.
    if (claim >>> INDEX_BITS !== info >>> INDEX_BITS) return done;
    const chunk = claim & INDEX_MASK;
    const chunks = info & INDEX_MASK;
    if (chunk >= chunks) return done;
    const size = c[CHUNK_SIZE];
    const start = chunk * size;
    const end = Math.min(c[TARGETS], start + size);
    const mode = c[MODE];
    if (mode === GRID) v.grid!(c[PASS], start, end);
    else if (mode === BUILD) for (let j = start; j < end; j++) buildPart(v, j);
    else {
      const kernel = readKernel(v);
      const targets = c[SAME] === 1 ? v.sources : v.targets;
      if (v.tree) {
        const tree = sharedTree(v.tree, v.sources.m.length, c[NODES], c[GROUPS], c[STAMP]);
        if (mode === FIELD) treeFieldRange(tree, v.sources, targets, kernel, v.tree.theta, start, end, v.out);
        else treePotentialRange(tree, v.sources, targets, kernel, v.tree.theta, start, end, v.out.ax);
      } else if (mode === FIELD) directFieldRange(v.sources, targets, kernel, start, end, v.out);
      else directPotentialRange(v.sources, targets, kernel, start, end, v.out.ax);
    }
    done++;
    if (Atomics.add(c, DONE, 1) + 1 === chunks) Atomics.notify(c, DONE);
  }
}

/**
 * A helper thread's loop: sleeps until a round opens, takes chunks, and leaves
 * when the run ends or the pool wants its thread back. Returns the chunks it computed.
 */
export function serveSharedField(f: SharedField): number {
  const v = views(f);
  const c = v.c;
  let total = 0;
  Atomics.add(c, ACTIVE, 1);
  for (;;) {
    // Read before looking at anything else: whatever changes after this read also bumps WAKE and ends the sleep below.
    const wake = Atomics.load(c, WAKE);
    if (Atomics.load(c, STOP) === 1) {
      Atomics.sub(c, ACTIVE, 1);
      return total;
    }
    const active = Atomics.load(c, ACTIVE);
    if (active > Atomics.load(c, WANTED)) {
      if (Atomics.compareExchange(c, ACTIVE, active, active - 1) === active) return total;
      continue;
    }
    total += work(v);
    Atomics.wait(c, WAKE, wake);
  }
}

/** Helpers currently serving the run's rounds. */
export function activeHelpers(f: SharedField): number {
  return Atomics.load(new Int32Array(f.control), ACTIVE);
}

/** The octree of the latest tree round, as the helpers read it. */
export function latestTree(f: SharedField): Octree {
  const v = views(f), c = v.c;
  return sharedTree(v.tree!, f.n, c[NODES], c[GROUPS], c[STAMP]);
}

/** Chunks finished so far in the latest round, by any thread. */
export function chunksDone(f: SharedField): number {
  return Atomics.load(new Int32Array(f.control), DONE);
}

/** Ends the run's rounds: helpers return. Safe to call more than once, from any thread. */
export function stopSharedField(f: SharedField): void {
  const c = new Int32Array(f.control);
  Atomics.store(c, STOP, 1);
  wakeHelpers(c);
}

/** Asks one helper to leave (the pool needs its thread for another run); the run goes on with fewer threads. */
export function dismissHelper(f: SharedField): void {
  const c = new Int32Array(f.control);
  Atomics.sub(c, WANTED, 1);
  wakeHelpers(c);
}

function wakeHelpers(c: Int32Array): void {
  Atomics.add(c, WAKE, 1);
  Atomics.notify(c, WAKE);
}

/**
 * The solver of a run whose field is split: used in the run's own thread in
 * place of the spec's direct or tree solver. Without helpers present, for
 * arrays that don't fit the shared buffers, or for a tree too deep for its
 * shared room, it is the spec's solver on this thread alone.
 */
export class SplitSolver implements FieldSolver {
  readonly kind: 'direct' | 'tree';
  private readonly v: Views;
  private readonly alone: FieldSolver;
  /** Rounds opened so far; only this thread opens them. */
  private rounds = 0;
  /** The caller's work waiting for the next round to open (see overlap). */
  private aside: (() => void) | null = null;
  readonly gridThreads?: SplitGrid;

  constructor(private readonly shared: SharedField) {
    this.v = views(shared);
    this.kind = shared.tree ? 'tree' : 'direct';
    this.alone = shared.tree ? treeSolver(shared.tree.theta) : directSolver;
    if (shared.grid) {
      this.gridThreads = new SplitGrid(shared.grid, (pass, count) => {
        this.v.c[PASS] = pass;
        this.round(count, false, GRID);
      });
    }
  }

  field(sources: Sources, targets: Points, kernel: PairKernel, out: Accelerations): void {
    if (!this.splits(sources, targets)) return this.alone.field(sources, targets, kernel, out);
    const { v } = this;
    this.compute(sources, targets, kernel, FIELD);
    const count = targets.x.length;
    out.ax.set(v.out.ax.subarray(0, count));
    out.ay.set(v.out.ay.subarray(0, count));
    out.az.set(v.out.az.subarray(0, count));
  }

  potential(sources: Sources, targets: Points, kernel: PairKernel, out: Float64Array): void {
    if (!this.splits(sources, targets)) return this.alone.potential(sources, targets, kernel, out);
    this.compute(sources, targets, kernel, POTENTIAL);
    out.set(this.v.out.ax.subarray(0, targets.x.length));
  }

  /** Runs `aside` in the first round `sums` opens, after waking the helpers; without a round, after `sums`. */
  overlap(sums: () => void, aside: () => void): void {
    this.aside = aside;
    try {
      sums();
    } catch (err) {
      this.aside = null;
      throw err;
    }
    const left = this.aside;
    this.aside = null;
    left?.();
  }

  private splits(sources: Sources, targets: Points): boolean {
    return Atomics.load(this.v.c, ACTIVE) > 0 && sources.m.length === this.shared.n && targets.x.length <= this.shared.n;
  }

  /**
   * Publishes the inputs (and the tree, built here once) and runs a round over
   * them, leaving the results in the shared output. A tree too large for its
   * shared room is walked here alone, straight into the shared output as well.
   */
  private compute(sources: Sources, targets: Points, kernel: PairKernel, mode: number): void {
    const { c, sources: s, targets: t } = this.v;
    writeKernel(this.v, kernel);
    s.x.set(sources.x); s.y.set(sources.y); s.z.set(sources.z); s.m.set(sources.m);
    const same = targets === sources;
    if (!same) {
      t.x.set(targets.x); t.y.set(targets.y); t.z.set(targets.z);
    }
    let units = targets.x.length;
    const room = this.v.tree;
    if (room) {
      const built = this.sharedBuild();
      if (built) {
        units = treeWorkUnits(built, sources, targets);
        return this.round(units, same, mode);
      }
      // Built alone: a root that is one leaf, or a tree too deep for its parts or its room.
      const tree = buildOctree(sources);
      units = treeWorkUnits(tree, sources, targets);
      if (tree.nodes > room.capacity) {
        const own = same ? s : t;
        if (mode === FIELD) treeFieldRange(tree, s, own, kernel, room.theta, 0, units, this.v.out);
        else treePotentialRange(tree, s, own, kernel, room.theta, 0, units, this.v.out.ax);
        return;
      }
      const shared = sharedTree(room, sources.m.length, tree.nodes, tree.groups.length / 2, tree.stamp);
      shared.cells.set(tree.cells); shared.links.set(tree.links); shared.order.set(tree.order);
      shared.sorted.x.set(tree.sorted.x); shared.sorted.y.set(tree.sorted.y); shared.sorted.z.set(tree.sorted.z); shared.sorted.m.set(tree.sorted.m);
      shared.groups.set(tree.groups);
      c[NODES] = tree.nodes; c[GROUPS] = tree.groups.length / 2; c[STAMP] = tree.stamp;
    }
    this.round(units, same, mode);
  }

  /**
   * Builds the round's octree in shared memory with the helpers: this thread sorts the particles
   * by the root's octants (planOctree), every thread claims octants and builds their subtrees
   * (buildOctant) into their parts, and this thread puts the parts together (joinOctree) into the
   * tree one thread's buildOctree makes, cell for cell. Null, with nothing published, when the
   * root is a leaf or an octant outgrew its part or the tree its room.
   */
  private sharedBuild(): Octree | null {
    const { c, tree: t, sources } = this.v;
    const p = t!.parts, n = this.shared.n;
    const room = treeRoom(t!, n);
    const plan = planOctree(sources, room.order);
    if (plan.count === 0) return null;
    p.plan.set(plan.octants);
    this.round(plan.count, false, BUILD);
    const size = (j: number) => p.sizes[2 * j];
    for (let j = 0; j < plan.count; j++) if (size(j) < 0) return null;
    if (joinedCells(plan, size) > t!.capacity) return null;
    const part = (j: number): OctantCells => {
      const start = plan.octants[OCTANT * j], at = start + j;
      return {
        nodes: size(j),
        cells: p.cells.subarray(CELL_DOUBLES * at, CELL_DOUBLES * (at + size(j))),
        links: p.links.subarray(CELL_INTS * at, CELL_INTS * (at + size(j))),
        box: p.boxes.subarray(6 * j, 6 * j + 6),
        groups: p.groups.subarray(2 * start, 2 * start + p.sizes[2 * j + 1]),
      };
    };
    const { nodes, groups } = joinOctree(plan, part, room);
    const stamp = nextStamp();
    c[NODES] = nodes; c[GROUPS] = groups; c[STAMP] = stamp;
    return sharedTree(t!, n, nodes, groups, stamp);
  }

  /** Opens a round over `count` work units, works in it and waits for the last chunk. */
  private round(count: number, same: boolean, mode: number): void {
    const c = this.v.c;
    const threads = 1 + Atomics.load(c, ACTIVE);
    // A build's chunks are its octants, one each: few, and each far larger than a walk's groups.
    const size = mode === BUILD ? 1 : Math.max(MIN_CHUNK_TARGETS, Math.ceil(count / Math.min(threads * CHUNKS_PER_THREAD, MAX_CHUNKS)));
    const chunks = Math.ceil(count / size);
    const tag = (++this.rounds & TAG_MASK) << INDEX_BITS;
    c[CHUNK_SIZE] = size; c[TARGETS] = count; c[MODE] = mode; c[SAME] = same ? 1 : 0;
    Atomics.store(c, DONE, 0);
    Atomics.store(c, INFO, tag | chunks);
    // Opening the claims last publishes everything above to any thread whose claim counts.
    Atomics.store(c, CLAIM, tag);
    wakeHelpers(c);
    // A build's round is short: the aside waits for the walk's.
    const aside = mode === BUILD ? null : this.aside;
    if (aside) this.aside = null;
    try {
      // The helpers claim chunks meanwhile; whatever they leave, this thread takes after.
      aside?.();
    } finally {
      work(this.v);
      for (let d = Atomics.load(c, DONE); d < chunks; d = Atomics.load(c, DONE)) Atomics.wait(c, DONE, d);
    }
  }
}
