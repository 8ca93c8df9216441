// The tree's walk and sums in WebAssembly (wasm/tree.ts), for softened Newton and
// the Yukawa law, instantiated once per thread on first use. The octree is copied into the
// module's memory once per tree (a tree in shared memory is recognised by its
// stamp), then each target group (or probe) is one call. Mixed precision (float32 terms,
// float64 sums; see wasm/tree.ts), so its sums differ from the float64 JS loops
// by about 1e-6 relative: a run's numbers depend on which of the two ran, never
// on how many threads split it. It is off wherever the direct-sum WebAssembly
// kernel is off (INFALL_DIRECT_KERNEL=js, setDirectKernel('js'), WebAssembly or
// its SIMD missing): then the JS walk and loops run.
import { G as G_UNITS } from '../units';
import { wasmDirect } from './directWasm';
import { TREE_WASM_BYTES } from './treeWasm.generated';
import type { Accelerations, Points } from '../state';
import type { Octree } from './tree';

// A module-local copy of G: transpiled to CommonJS (tsx, Jest) an imported binding is a getter, called once per target.
const G = G_UNITS;

interface Exports {
  memory: WebAssembly.Memory;
  heapBase(): number;
  groupField(cells: number, links: number, sx: number, sy: number, sz: number, sm: number, tx: number, ty: number, tz: number,
    from: number, to: number, theta2: number, few: number, eps2: number, ox: number, oy: number, oz: number, stack: number, scratch: number, cellScratch: number): void;
  groupPotential(cells: number, links: number, sx: number, sy: number, sz: number, sm: number, tx: number, ty: number, tz: number,
    from: number, to: number, theta2: number, few: number, eps2: number, o: number, stack: number, scratch: number, cellScratch: number): void;
  groupFieldYukawa(cells: number, links: number, sx: number, sy: number, sz: number, sm: number, tx: number, ty: number, tz: number,
    from: number, to: number, theta2: number, few: number, eps2: number, alpha: number, lambda: number,
    ox: number, oy: number, oz: number, stack: number, scratch: number, cellScratch: number): void;
  groupPotentialYukawa(cells: number, links: number, sx: number, sy: number, sz: number, sm: number, tx: number, ty: number, tz: number,
    from: number, to: number, theta2: number, few: number, eps2: number, alpha: number, lambda: number,
    o: number, stack: number, scratch: number, cellScratch: number): void;
}

const PAGE = 65536;
/** Bytes of a cell's numbers and links in tree.ts's layout, and of its float32 record in the module. */
const CELL_BYTES = 128, LINK_BYTES = 16, CELL_SCRATCH = 48;
/** Bytes a source takes: x, y, z, m as float64, and its float32 record in the module. */
const SOURCE_BYTES = 32, SOURCE_SCRATCH = 16;
/** The walk's stack: 8 x 49 int32 (tree.ts's MAX_DEPTH is 48), rounded up. */
const STACK_BYTES = 2048;
/** Targets that are not the tree's sources (probes) walk in groups of at most this many. */
const PROBES = 64;

/** undefined: not tried yet in this thread; null: unavailable here. */
let loaded: WasmTree | null | undefined;

/** The module for this thread, or null where the JS walk and loops must run. */
export function wasmTree(): WasmTree | null {
  if (!wasmDirect()) return null;
  if (loaded === undefined) loaded = WasmTree.load();
  return loaded;
}

/** A group's pulls from groupField(Yukawa), times G, where a PairLoops.treeGroupField hook writes them. */
export function putGroupField(tree: Octree, targets: Points | null, from: number, to: number, sums: Float64Array[], out: Accelerations): void {
  const [sx, sy, sz] = sums;
  const { ax, ay, az } = out;
  const order = tree.order;
  for (let q = from; q < to; q++) {
    const i = targets ? q : order[q], k = q - from;
    ax[i] = G * sx[k]; ay[i] = G * sy[k]; az[i] = G * sz[k];
  }
}

/** A group's sums of m phi from groupPotential(Yukawa), as potentials (-G times them), where treeGroupPotential writes them. */
export function putGroupPotential(tree: Octree, targets: Points | null, from: number, to: number, sums: Float64Array, out: Float64Array): void {
  const order = tree.order;
  for (let q = from; q < to; q++) out[targets ? q : order[q]] = -G * sums[q - from];
}

export class WasmTree {
  private readonly base: number;
  /** The tree now in memory: its cells array's buffer and stamp. */
  private held: { buffer: ArrayBufferLike; stamp: number } | null = null;
  private at = { cells: 0, links: 0, sx: 0, sy: 0, sz: 0, sm: 0, tx: 0, ty: 0, tz: 0, ox: 0, oy: 0, oz: 0, stack: 0, scratch: 0, cellScratch: 0 };
  private out: Float64Array[] = [];

  private constructor(private readonly ex: Exports) {
    this.base = ex.heapBase();
  }

  static load(): WasmTree | null {
    try {
      if (typeof WebAssembly !== 'object' || !WebAssembly.validate(TREE_WASM_BYTES)) return null;
      const instance = new WebAssembly.Instance(new WebAssembly.Module(TREE_WASM_BYTES), {});
      return new WasmTree(instance.exports as unknown as Exports);
    } catch {
      return null;
    }
  }

  /**
   * Pull (before the factor G) at targets [from, to) walked as one group with
   * tree.ts's test (theta^2, cells of at most `few` particles as particles): the
   * tree's own slots when `targets` is null, else those points (at most PROBES).
   * Out x, y, z [0, to - from); null if a float32 sum overflowed or the points
   * are too many (the caller then walks and sums in float64).
   */
  groupField(tree: Octree, targets: Points | null, from: number, to: number, theta2: number, few: number, eps2: number): Float64Array[] | null {
    const t = this.targets(tree, targets, from, to);
    if (!t) return null;
    const a = this.at;
    this.ex.groupField(a.cells, a.links, a.sx, a.sy, a.sz, a.sm, t[0], t[1], t[2], t[3], t[4], theta2, few, eps2, a.ox, a.oy, a.oz, a.stack, a.scratch, a.cellScratch);
    return this.fieldOut(to - from);
  }

  /** The same walk's sum of m phi (the potential is -G times it): out[0..to - from), or null as above. */
  groupPotential(tree: Octree, targets: Points | null, from: number, to: number, theta2: number, few: number, eps2: number): Float64Array | null {
    const t = this.targets(tree, targets, from, to);
    if (!t) return null;
    const a = this.at;
    this.ex.groupPotential(a.cells, a.links, a.sx, a.sy, a.sz, a.sm, t[0], t[1], t[2], t[3], t[4], theta2, few, eps2, a.ox, a.stack, a.scratch, a.cellScratch);
    return this.potentialOut(to - from);
  }

  /** groupField under the Yukawa law, phi = (1 + alpha e^(-s/lambda)) / s. */
  groupFieldYukawa(tree: Octree, targets: Points | null, from: number, to: number, theta2: number, few: number, eps2: number, alpha: number, lambda: number): Float64Array[] | null {
    const t = this.targets(tree, targets, from, to);
    if (!t) return null;
    const a = this.at;
    this.ex.groupFieldYukawa(a.cells, a.links, a.sx, a.sy, a.sz, a.sm, t[0], t[1], t[2], t[3], t[4], theta2, few, eps2, alpha, lambda, a.ox, a.oy, a.oz, a.stack, a.scratch, a.cellScratch);
    return this.fieldOut(to - from);
  }

  /** groupPotential under the Yukawa law. */
  groupPotentialYukawa(tree: Octree, targets: Points | null, from: number, to: number, theta2: number, few: number, eps2: number, alpha: number, lambda: number): Float64Array | null {
    const t = this.targets(tree, targets, from, to);
    if (!t) return null;
    const a = this.at;
    this.ex.groupPotentialYukawa(a.cells, a.links, a.sx, a.sy, a.sz, a.sm, t[0], t[1], t[2], t[3], t[4], theta2, few, eps2, alpha, lambda, a.ox, a.stack, a.scratch, a.cellScratch);
    return this.potentialOut(to - from);
  }

  /** The pulls the last call wrote, or null if a float32 sum overflowed. */
  private fieldOut(nt: number): Float64Array[] | null {
    const [ox, oy, oz] = this.out;
    for (let k = 0; k < nt; k++) if (!Number.isFinite(ox[k] + oy[k] + oz[k])) return null;
    return this.out;
  }

  /** The potential sums the last call wrote, or null as above. */
  private potentialOut(nt: number): Float64Array | null {
    const o = this.out[0];
    for (let k = 0; k < nt; k++) if (!Number.isFinite(o[k])) return null;
    return o;
  }

  /** Holds the tree; the targets' x, y, z offsets and their range there (probes copied in), or null if they don't fit. */
  private targets(tree: Octree, targets: Points | null, from: number, to: number): number[] | null {
    this.hold(tree);
    const a = this.at;
    if (!targets) return [a.sx, a.sy, a.sz, from, to];
    const nt = to - from;
    if (nt > PROBES) return null;
    const buffer = this.ex.memory.buffer;
    new Float64Array(buffer, a.tx, nt).set(targets.x.subarray(from, to));
    new Float64Array(buffer, a.ty, nt).set(targets.y.subarray(from, to));
    new Float64Array(buffer, a.tz, nt).set(targets.z.subarray(from, to));
    return [a.tx, a.ty, a.tz, 0, nt];
  }

  /** Copies the tree into memory unless it is there already. */
  private hold(tree: Octree): void {
    if (this.held && this.held.buffer === tree.cells.buffer && this.held.stamp === tree.stamp) return;
    const n = tree.sorted.m.length, nodes = tree.nodes;
    const outputs = Math.max(n, PROBES);
    const need = this.base + nodes * (CELL_BYTES + LINK_BYTES + CELL_SCRATCH) + n * (SOURCE_BYTES + SOURCE_SCRATCH) + 3 * 8 * (outputs + PROBES) + STACK_BYTES;
    const memory = this.ex.memory;
    if (need > memory.buffer.byteLength) memory.grow(Math.ceil((need - memory.buffer.byteLength) / PAGE));
    let at = this.base;
    const take = (bytes: number) => {
      const offset = at;
      at += bytes;
      return offset;
    };
    const a = this.at;
    a.cells = take(nodes * CELL_BYTES);
    a.sx = take(8 * n); a.sy = take(8 * n); a.sz = take(8 * n); a.sm = take(8 * n);
    a.tx = take(8 * PROBES); a.ty = take(8 * PROBES); a.tz = take(8 * PROBES);
    a.ox = take(8 * outputs); a.oy = take(8 * outputs); a.oz = take(8 * outputs);
    a.links = take(nodes * LINK_BYTES);
    a.stack = take(STACK_BYTES);
    a.scratch = take(n * SOURCE_SCRATCH);
    a.cellScratch = take(nodes * CELL_SCRATCH);
    const buffer = memory.buffer;
    new Float64Array(buffer, a.cells, 16 * nodes).set(tree.cells.subarray(0, 16 * nodes));
    new Int32Array(buffer, a.links, 4 * nodes).set(tree.links.subarray(0, 4 * nodes));
    new Float64Array(buffer, a.sx, n).set(tree.sorted.x); new Float64Array(buffer, a.sy, n).set(tree.sorted.y);
    new Float64Array(buffer, a.sz, n).set(tree.sorted.z); new Float64Array(buffer, a.sm, n).set(tree.sorted.m);
    this.out = [new Float64Array(buffer, a.ox, outputs), new Float64Array(buffer, a.oy, outputs), new Float64Array(buffer, a.oz, outputs)];
    this.held = { buffer: tree.cells.buffer, stamp: tree.stamp };
  }
}
