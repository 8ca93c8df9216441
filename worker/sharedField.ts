// One run's direct-sum field split across pool threads over shared memory.
//
// The run's own thread copies positions and masses into SharedArrayBuffer-backed
// arrays, opens a round, and then claims chunks of the target range alongside
// any helper threads; every chunk is computed by `directFieldRange`, whose
// per-target summation order does not depend on how the range is cut (in the
// WebAssembly kernel and the JS one alike, which give the same bits), so the
// result is bit-identical to one thread's. Chunks are claimed with an atomic
// counter, so a round finishes even when no helper is there (not started yet,
// or dismissed to make room for another run): the run's thread then claims
// them all.
//
// Every claim carries its round's tag, so a helper that claimed just as one
// round ran out can't mistake its claim for one of the next round. Helpers
// sleep on a wake counter that every change they must see bumps (a new round,
// the end of the run, a dismissal), so no wake-up is lost between a helper's
// last look and its sleep.
import { directFieldRange, directPotentialRange } from '../shared/engine/solvers';
import { directSolver } from '../shared/engine/solvers/direct';
import type { FieldSolver, PairKernel } from '../shared/engine/solvers';
import type { Accelerations, Points, Sources } from '../shared/engine/state';

/** The shared memory of one split run. Plain data: it reaches pool threads by structured clone, the buffers shared, not copied. */
export interface SharedField {
  /** Particles of the run: sources must number exactly this, targets at most this. */
  n: number;
  control: SharedArrayBuffer;
  data: SharedArrayBuffer;
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
const CONTROL_SLOTS = 11;

const FIELD = 0;
const POTENTIAL = 1;
/** Low bits of CLAIM and INFO: a round has at most threads x CHUNKS_PER_THREAD chunks, plus one spent claim per thread. */
const INDEX_BITS = 12;
const INDEX_MASK = (1 << INDEX_BITS) - 1;
/** Round tags wrap here; a stale claim would have to sleep through this many rounds to match again. */
const TAG_MASK = (1 << (31 - INDEX_BITS)) - 1;
/** Float64 slots before the arrays: softening^2, Yukawa alpha and lambda. */
const PARAMS = 3;
/** Arrays of n: source x, y, z, m; target x, y, z; output x, y, z (output x alone holds potentials). */
const ARRAYS = 10;
/** Chunks per thread and round: enough to even out threads that start late or run slow. */
const CHUNKS_PER_THREAD = 16;
const MIN_CHUNK_TARGETS = 16;
/** Leaves room in the claim index for the spent claims of a round. */
const MAX_CHUNKS = INDEX_MASK >> 1;

export function createSharedField(n: number, helpers: number): SharedField {
  const f: SharedField = {
    n,
    control: new SharedArrayBuffer(4 * CONTROL_SLOTS),
    data: new SharedArrayBuffer(8 * (PARAMS + ARRAYS * n)),
  };
  // All zeros is round 0 with no chunks: a claim before the first round gets nothing.
  new Int32Array(f.control)[WANTED] = helpers;
  return f;
}

interface Views {
  c: Int32Array;
  params: Float64Array;
  sources: Sources;
  targets: Points;
  out: Accelerations;
}

function views(f: SharedField): Views {
  const d = new Float64Array(f.data);
  const at = (k: number) => d.subarray(PARAMS + k * f.n, PARAMS + (k + 1) * f.n);
  return {
    c: new Int32Array(f.control),
    params: d.subarray(0, PARAMS),
    sources: { x: at(0), y: at(1), z: at(2), m: at(3) },
    targets: { x: at(4), y: at(5), z: at(6) },
    out: { ax: at(7), ay: at(8), az: at(9) },
  };
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
    const kernel: PairKernel = { softening2_kpc2: v.params[0], yukawaAlpha: v.params[1], yukawaLambda_kpc: v.params[2] };
    const targets = c[SAME] === 1 ? v.sources : v.targets;
    if (c[MODE] === FIELD) directFieldRange(v.sources, targets, kernel, start, end, v.out);
    else directPotentialRange(v.sources, targets, kernel, start, end, v.out.ax);
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
 * The direct-sum solver of a run whose field is split: used in the run's own
 * thread in place of the spec's direct solver. Without helpers present, or for
 * arrays that don't fit the shared buffers, it is the plain direct sum.
 */
export class SplitDirectSolver implements FieldSolver {
  readonly kind = 'direct' as const;
  private readonly v: Views;
  /** Rounds opened so far; only this thread opens them. */
  private rounds = 0;

  constructor(private readonly shared: SharedField) {
    this.v = views(shared);
  }

  field(sources: Sources, targets: Points, kernel: PairKernel, out: Accelerations): void {
    if (!this.splits(sources, targets)) return directSolver.field(sources, targets, kernel, out);
    const count = this.round(sources, targets, kernel, FIELD);
    out.ax.set(this.v.out.ax.subarray(0, count));
    out.ay.set(this.v.out.ay.subarray(0, count));
    out.az.set(this.v.out.az.subarray(0, count));
  }

  potential(sources: Sources, targets: Points, kernel: PairKernel, out: Float64Array): void {
    if (!this.splits(sources, targets)) return directSolver.potential(sources, targets, kernel, out);
    const count = this.round(sources, targets, kernel, POTENTIAL);
    out.set(this.v.out.ax.subarray(0, count));
  }

  private splits(sources: Sources, targets: Points): boolean {
    return Atomics.load(this.v.c, ACTIVE) > 0 && sources.m.length === this.shared.n && targets.x.length <= this.shared.n;
  }

  /** Publishes the inputs, opens a round, works in it and waits for the last chunk; returns the target count. */
  private round(sources: Sources, targets: Points, kernel: PairKernel, mode: number): number {
    const { c, params, sources: s, targets: t } = this.v;
    const count = targets.x.length;
    s.x.set(sources.x); s.y.set(sources.y); s.z.set(sources.z); s.m.set(sources.m);
    const same = targets === sources ? 1 : 0;
    if (!same) {
      t.x.set(targets.x); t.y.set(targets.y); t.z.set(targets.z);
    }
    params[0] = kernel.softening2_kpc2; params[1] = kernel.yukawaAlpha; params[2] = kernel.yukawaLambda_kpc;
    const threads = 1 + Atomics.load(c, ACTIVE);
    const size = Math.max(MIN_CHUNK_TARGETS, Math.ceil(count / Math.min(threads * CHUNKS_PER_THREAD, MAX_CHUNKS)));
    const chunks = Math.ceil(count / size);
    const tag = (++this.rounds & TAG_MASK) << INDEX_BITS;
    c[CHUNK_SIZE] = size; c[TARGETS] = count; c[MODE] = mode; c[SAME] = same;
    Atomics.store(c, DONE, 0);
    Atomics.store(c, INFO, tag | chunks);
    // Opening the claims last publishes everything above to any thread whose claim counts.
    Atomics.store(c, CLAIM, tag);
    wakeHelpers(c);
    work(this.v);
    for (let d = Atomics.load(c, DONE); d < chunks; d = Atomics.load(c, DONE)) Atomics.wait(c, DONE, d);
    return count;
  }
}
