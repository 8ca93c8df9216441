// The WebAssembly SIMD direct sum (wasm/direct.ts), instantiated once per
// thread on first use. It gives the same bits as the JS kernel in direct.ts
// (same operations, same per-target order), so which one ran never shows in a
// result. Where WebAssembly or its SIMD is missing, or the JS kernel is forced,
// `wasmDirect()` is null and direct.ts keeps to its own loops.
import type { Points, Sources } from '../state';
import { DIRECT_WASM_BYTES } from './directWasm.generated';

interface Exports {
  memory: WebAssembly.Memory;
  heapBase(): number;
  field(sx: number, sy: number, sz: number, sm: number, n: number, tx: number, ty: number, tz: number, count: number, eps2: number, ox: number, oy: number, oz: number): void;
  potential(sx: number, sy: number, sz: number, sm: number, n: number, tx: number, ty: number, tz: number, count: number, eps2: number, o: number): void;
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
const PAGE = 65536;

/**
 * Sums over targets iStart..iEnd-1 with an even count: the caller does the odd
 * target out. Inputs are copied into the module's memory on each call (linear in
 * N beside the N^2 sum); targets that are the sources themselves are not copied again.
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

  field(sources: Sources, targets: Points, eps2: number, iStart: number, count: number, ax: Float64Array, ay: Float64Array, az: Float64Array): void {
    const [t, o] = this.place(sources, targets, iStart, count, 3);
    this.ex.field(t[0], t[1], t[2], t[3], sources.m.length, t[4], t[5], t[6], count, eps2, o, o + count * BYTES, o + 2 * count * BYTES);
    const h = this.heap, k = o / BYTES;
    ax.set(h.subarray(k, k + count), iStart);
    ay.set(h.subarray(k + count, k + 2 * count), iStart);
    az.set(h.subarray(k + 2 * count, k + 3 * count), iStart);
  }

  /** Sums m / sqrt(r^2 + eps^2) over non-coincident sources (the potential before the factor -G). */
  potentialSums(sources: Sources, targets: Points, eps2: number, iStart: number, count: number, out: Float64Array): void {
    const [t, o] = this.place(sources, targets, iStart, count, 1);
    this.ex.potential(t[0], t[1], t[2], t[3], sources.m.length, t[4], t[5], t[6], count, eps2, o);
    const k = o / BYTES;
    out.set(this.heap.subarray(k, k + count), iStart);
  }

  /** Copies the inputs in; returns the byte offsets of source x, y, z, m and target x, y, z, and of the output. */
  private place(sources: Sources, targets: Points, iStart: number, count: number, outputs: number): [number[], number] {
    const n = sources.m.length;
    const same = targets === sources;
    // Each array starts on a 16-byte boundary for the vector loads.
    const stride = (len: number) => (len + 1) & ~1;
    const need = this.base + BYTES * (4 * stride(n) + (same ? 0 : 3 * stride(count)) + outputs * stride(count));
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
    return [offsets, at];
  }
}
