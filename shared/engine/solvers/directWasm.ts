// The WebAssembly SIMD direct sum (wasm/direct.ts), instantiated once per
// thread on first use. Mixed precision (float32 terms, float64 sums; see
// wasm/direct.ts), so its sums differ from the float64 JS loops by about 1e-7
// relative: a run's numbers depend on which of the two ran, never on how many
// threads split it. Where WebAssembly or its SIMD is missing, or the JS kernel is
// forced, `wasmDirect()` is null and direct.ts keeps to its own loops.
import type { Points, Sources } from '../state';
import { DIRECT_WASM_BYTES } from './directWasm.generated';

interface Exports {
  memory: WebAssembly.Memory;
  heapBase(): number;
  field(sx: number, sy: number, sz: number, sm: number, n: number, tx: number, ty: number, tz: number, count: number, eps2: number, ox: number, oy: number, oz: number, scratch: number): void;
  potential(sx: number, sy: number, sz: number, sm: number, n: number, tx: number, ty: number, tz: number, count: number, eps2: number, o: number, scratch: number): void;
}

export type DirectKernelChoice = 'wasm' | 'js';

let choice: DirectKernelChoice = 'wasm';
/** undefined: not tried yet in this thread; null: unavailable here. */
let loaded: WasmDirect | null | undefined;

/** Picks the direct-sum kernel for this thread: 'js' forces the typed-array loops (tests, comparisons). Returns the previous choice. */
export function setDirectKernel(next: DirectKernelChoice): DirectKernelChoice {
  const previous = choice;
  choice = next;
  return previous;
}

/**
 * Applies the INFALL_DIRECT_KERNEL setting (read by the CLI and the pool threads):
 * unset or empty keeps the default, WebAssembly where it loads.
 */
export function applyDirectKernelSetting(value: string | undefined): void {
  if (value === undefined || value === '') return;
  if (value !== 'wasm' && value !== 'js') throw new Error(`INFALL_DIRECT_KERNEL must be "wasm" or "js", got "${value}"`);
  setDirectKernel(value);
}

/** The kernel direct sums in this thread actually use. */
export function directKernelInUse(): DirectKernelChoice {
  return wasmDirect() ? 'wasm' : 'js';
}

export function wasmDirect(): WasmDirect | null {
  if (choice === 'js') return null;
  if (loaded === undefined) loaded = WasmDirect.load();
  return loaded;
}

const BYTES = 8;
/** Bytes of a source's float32 record in the module: high parts and mass, low parts. */
const RECORD = 32;
const PAGE = 65536;

/**
 * float32 holds a pair's terms when coordinates relative to the first source stay
 * within REACH (kpc; the cube of the largest separation, (2 sqrt 3 REACH)^3 = 4e37,
 * fits below float32's 3.4e38), masses and eps^2 within [TINY, HUGE] (normal float32
 * numbers, with room for m / eps^3), or a mass is 0.
 */
const REACH = 1e12, TINY = 1e-30, HUGE = 1e30;

/**
 * Sums over targets iStart..iStart+count-1. Inputs are copied into the module's
 * memory on each call (linear in N beside the N^2 sum); targets that are the
 * sources themselves are not copied again. Returns false, having summed nothing,
 * when the sources or eps^2 are out of float32's reach (the caller sums in float64);
 * a target out of reach, or whose float32 sums overflowed, comes back NaN or
 * infinite, and the caller redoes it in float64. Each decision looks at the sources
 * and that target only, so it does not depend on how threads split the targets.
 */
export class WasmDirect {
  private heap: Float64Array;
  private readonly base: number;

  private constructor(private readonly ex: Exports) {
    this.base = ex.heapBase();
    this.heap = new Float64Array(ex.memory.buffer);
  }

  static load(): WasmDirect | null {
    try {
      if (typeof WebAssembly !== 'object' || !WebAssembly.validate(DIRECT_WASM_BYTES)) return null;
      // Synchronous compile: the module is small enough for a browser's main thread.
      const instance = new WebAssembly.Instance(new WebAssembly.Module(DIRECT_WASM_BYTES), {});
      return new WasmDirect(instance.exports as unknown as Exports);
    } catch {
      return null;
    }
  }

  field(sources: Sources, targets: Points, eps2: number, iStart: number, count: number, ax: Float64Array, ay: Float64Array, az: Float64Array): boolean {
    if (!inReach(sources, eps2)) return false;
    const [t, o] = this.place(sources, targets, iStart, count, 3);
    this.ex.field(t[0], t[1], t[2], t[3], sources.m.length, t[4], t[5], t[6], count, eps2, o, o + count * BYTES, o + 2 * count * BYTES, t[7]);
    const h = this.heap, k = o / BYTES;
    ax.set(h.subarray(k, k + count), iStart);
    ay.set(h.subarray(k + count, k + 2 * count), iStart);
    az.set(h.subarray(k + 2 * count, k + 3 * count), iStart);
    markOutOfReach(sources, targets, iStart, count, ax);
    return true;
  }

  /** Sums m / sqrt(r^2 + eps^2) over non-coincident sources (the potential before the factor -G); false and NaN as for the field. */
  potentialSums(sources: Sources, targets: Points, eps2: number, iStart: number, count: number, out: Float64Array): boolean {
    if (!inReach(sources, eps2)) return false;
    const [t, o] = this.place(sources, targets, iStart, count, 1);
    this.ex.potential(t[0], t[1], t[2], t[3], sources.m.length, t[4], t[5], t[6], count, eps2, o, t[7]);
    const k = o / BYTES;
    out.set(this.heap.subarray(k, k + count), iStart);
    markOutOfReach(sources, targets, iStart, count, out);
    return true;
  }

  /** Copies the inputs in; returns the byte offsets of source x, y, z, m, target x, y, z and the records' scratch, and of the output. */
  private place(sources: Sources, targets: Points, iStart: number, count: number, outputs: number): [number[], number] {
    const n = sources.m.length;
    const same = targets === sources;
    // Each array starts on a 16-byte boundary for the vector loads.
    const stride = (len: number) => (len + 1) & ~1;
    const need = this.base + BYTES * (4 * stride(n) + (same ? 0 : 3 * stride(count)) + outputs * stride(count)) + RECORD * n;
    const memory = this.ex.memory;
    if (need > memory.buffer.byteLength) memory.grow(Math.ceil((need - memory.buffer.byteLength) / PAGE));
    if (this.heap.buffer !== memory.buffer) this.heap = new Float64Array(memory.buffer);
    const h = this.heap;
    let at = this.base;
    const put = (a: Float64Array, from: number, len: number) => {
      h.set(from === 0 && len === a.length ? a : a.subarray(from, from + len), at / BYTES);
      const offset = at;
      at += BYTES * stride(len);
      return offset;
    };
    const offsets = [put(sources.x, 0, n), put(sources.y, 0, n), put(sources.z, 0, n), put(sources.m, 0, n)];
    if (same) offsets.push(offsets[0] + iStart * BYTES, offsets[1] + iStart * BYTES, offsets[2] + iStart * BYTES);
    else offsets.push(put(targets.x, iStart, count), put(targets.y, iStart, count), put(targets.z, iStart, count));
    offsets.push(at + BYTES * outputs * stride(count));
    return [offsets, at];
  }
}

function inReach(s: Sources, eps2: number): boolean {
  if (!(eps2 >= TINY && eps2 <= HUGE) || s.m.length === 0) return false;
  const rx = s.x[0], ry = s.y[0], rz = s.z[0];
  for (let j = 0; j < s.m.length; j++) {
    const m = s.m[j];
    if (!(Math.abs(s.x[j] - rx) <= REACH && Math.abs(s.y[j] - ry) <= REACH && Math.abs(s.z[j] - rz) <= REACH)) return false;
    if (m !== 0 && !(m >= TINY && m <= HUGE)) return false;
  }
  return true;
}

/** NaN in `out` at the targets beyond REACH of the first source, for the caller's float64 redo. */
function markOutOfReach(s: Sources, t: Points, iStart: number, count: number, out: Float64Array): void {
  const rx = s.x[0], ry = s.y[0], rz = s.z[0];
  for (let i = iStart; i < iStart + count; i++) {
    if (!(Math.abs(t.x[i] - rx) <= REACH && Math.abs(t.y[i] - ry) <= REACH && Math.abs(t.z[i] - rz) <= REACH)) out[i] = NaN;
  }
}
