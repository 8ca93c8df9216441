// The softened-Newton direct sum in WebAssembly SIMD, mixed precision, compiled by
// `npm run build:wasm` into shared/engine/solvers/directWasm.generated.ts.
//
// As in the tree's module (tree.ts here), pair terms in float32, four targets to a
// vector, and every BLOCK sources the float32 partial sums added into float64 sums.
// Positions are taken relative to the first source in float64 (a system far from the
// origin keeps its digits) and split into a float32 high part and the float32 rounding
// of what it leaves: a separation is (high - high) + (low - low), whose first difference
// is exact for close points, so a close pair's separation keeps float32's relative
// precision instead of float32's precision of the system's size (measured: 2e-7 of the
// field at worst against 1.4e-6 with high parts alone, and 1.5e-5 at 1e-3 kpc softening).
// A target's sums depend only on the sources and that target (not on which targets share
// its vector or call), so threads splitting the targets do not change them. A target on
// a source gives the same parts and adds exactly zero (eps > 0). The caller redoes in
// float64 any target out of float32's reach (directWasm.ts).
//
// Arrays are float64 in linear memory at the byte offsets given; `scratch` (P) has 32
// bytes for every source (its float32 record).

import { f, high, put } from './lanes';

/** Sources summed in float32 before the partial sums join the float64 ones. */
const BLOCK: i32 = 32;

/** Target i's coordinate relative to the reference (past the end, the last target again: its lanes are not written back). */
// @ts-ignore: decorator
@inline function rel(t: usize, i: i32, count: i32, r: f64): f64 { return load<f64>(t + (<usize>min(i, count - 1) << 3)) - r; }

/** The float32 high part of x, or with `low` the float32 rounding of what it leaves. */
// @ts-ignore: decorator
@inline function part(x: f64, low: bool): f32 { return low ? <f32>(x - <f64><f32>x) : <f32>x; }

/** Four targets' coordinates relative to the reference: their high parts, or their low parts. */
// @ts-ignore: decorator
@inline function targets(t: usize, i: i32, count: i32, r: f64, low: bool): v128 {
  let v = f(part(rel(t, i, count, r), low));
  v = f32x4.replace_lane(v, 1, part(rel(t, i + 1, count, r), low));
  v = f32x4.replace_lane(v, 2, part(rel(t, i + 2, count, r), low));
  return f32x4.replace_lane(v, 3, part(rel(t, i + 3, count, r), low));
}

/** A source's coordinate (record o, byte k) less four targets': the high parts (exact for close points) plus the low parts. */
// @ts-ignore: decorator
@inline function d(o: usize, k: usize, high: v128, low: v128): v128 {
  return f32x4.add(f32x4.sub(v128.load32_splat(o + k), high), f32x4.sub(v128.load32_splat(o + k + 16), low));
}

/** The sources as float32 records at P, 32 bytes each: x, y, z relative to the first source (high parts), m, then the low parts. */
function records(sx: usize, sy: usize, sz: usize, sm: usize, n: i32, P: usize): void {
  const rx = load<f64>(sx), ry = load<f64>(sy), rz = load<f64>(sz);
  for (let j: i32 = 0; j < n; j++) {
    const b = <usize>j << 3, o = P + (<usize>j << 5);
    const x = load<f64>(sx + b) - rx, y = load<f64>(sy + b) - ry, z = load<f64>(sz + b) - rz;
    const xh = <f32>x, yh = <f32>y, zh = <f32>z;
    store<f32>(o, xh); store<f32>(o, yh, 4); store<f32>(o, zh, 8);
    store<f32>(o, <f32>load<f64>(sm + b), 12);
    store<f32>(o, <f32>(x - <f64>xh), 16); store<f32>(o, <f32>(y - <f64>yh), 20); store<f32>(o, <f32>(z - <f64>zh), 24);
    store<f32>(o, 0, 28);
  }
}

/** Pull (before the factor G) at targets t[0..count) from sources s[0..n), written to o. */
export function field(
  sx: usize, sy: usize, sz: usize, sm: usize, n: i32,
  tx: usize, ty: usize, tz: usize, count: i32, eps2: f64,
  ox: usize, oy: usize, oz: usize, P: usize,
): void {
  if (n < 1) return;
  records(sx, sy, sz, sm, n, P);
  const rx = load<f64>(sx), ry = load<f64>(sy), rz = load<f64>(sz);
  const e = f(<f32>eps2);
  // Four targets per pass: a second vector of targets sharing the source loads runs out of
  // registers (measured slower); two sources per step instead (measured faster than one).
  for (let i: i32 = 0; i < count; i += 4) {
    const xt = targets(tx, i, count, rx, false), yt = targets(ty, i, count, ry, false), zt = targets(tz, i, count, rz, false);
    const xl = targets(tx, i, count, rx, true), yl = targets(ty, i, count, ry, true), zl = targets(tz, i, count, rz, true);
    let X0 = f64x2.splat(0), X1 = f64x2.splat(0), Y0 = f64x2.splat(0), Y1 = f64x2.splat(0), Z0 = f64x2.splat(0), Z1 = f64x2.splat(0);
    for (let j0: i32 = 0; j0 < n; j0 += BLOCK) {
      const j1 = min(j0 + BLOCK, n);
      let ax = f(0), ay = f(0), az = f(0);
      let j = j0;
      // m / (s^2 sqrt(s^2)), one divide a pair. Two sources per step, each with its own float32 sums (joined per block): two divides in flight.
      let bx = f(0), by = f(0), bz = f(0);
      for (; j + 1 < j1; j += 2) {
        const o = P + (<usize>j << 5);
        const dx = d(o, 0, xt, xl), dy = d(o, 4, yt, yl), dz = d(o, 8, zt, zl);
        const ex = d(o, 32, xt, xl), ey = d(o, 36, yt, yl), ez = d(o, 40, zt, zl);
        const r2 = f32x4.add(f32x4.add(f32x4.add(f32x4.mul(dx, dx), f32x4.mul(dy, dy)), f32x4.mul(dz, dz)), e);
        const q2 = f32x4.add(f32x4.add(f32x4.add(f32x4.mul(ex, ex), f32x4.mul(ey, ey)), f32x4.mul(ez, ez)), e);
        const s = f32x4.div(v128.load32_splat(o, 12), f32x4.mul(r2, f32x4.sqrt(r2)));
        const t = f32x4.div(v128.load32_splat(o, 44), f32x4.mul(q2, f32x4.sqrt(q2)));
        ax = f32x4.add(ax, f32x4.mul(s, dx)); ay = f32x4.add(ay, f32x4.mul(s, dy)); az = f32x4.add(az, f32x4.mul(s, dz));
        bx = f32x4.add(bx, f32x4.mul(t, ex)); by = f32x4.add(by, f32x4.mul(t, ey)); bz = f32x4.add(bz, f32x4.mul(t, ez));
      }
      if (j < j1) {
        const o = P + (<usize>j << 5);
        const dx = d(o, 0, xt, xl), dy = d(o, 4, yt, yl), dz = d(o, 8, zt, zl);
        const r2 = f32x4.add(f32x4.add(f32x4.add(f32x4.mul(dx, dx), f32x4.mul(dy, dy)), f32x4.mul(dz, dz)), e);
        const s = f32x4.div(v128.load32_splat(o, 12), f32x4.mul(r2, f32x4.sqrt(r2)));
        ax = f32x4.add(ax, f32x4.mul(s, dx)); ay = f32x4.add(ay, f32x4.mul(s, dy)); az = f32x4.add(az, f32x4.mul(s, dz));
      }
      ax = f32x4.add(ax, bx); ay = f32x4.add(ay, by); az = f32x4.add(az, bz);
      X0 = f64x2.add(X0, f64x2.promote_low_f32x4(ax)); X1 = f64x2.add(X1, high(ax));
      Y0 = f64x2.add(Y0, f64x2.promote_low_f32x4(ay)); Y1 = f64x2.add(Y1, high(ay));
      Z0 = f64x2.add(Z0, f64x2.promote_low_f32x4(az)); Z1 = f64x2.add(Z1, high(az));
    }
    const b = <usize>i << 3;
    put(ox + b, X0, X1, count - i); put(oy + b, Y0, Y1, count - i); put(oz + b, Z0, Z1, count - i);
  }
}

/** Sum of m / sqrt(r^2 + eps^2) over sources not coincident with the target (in float32), at targets t[0..count), written to o. */
export function potential(
  sx: usize, sy: usize, sz: usize, sm: usize, n: i32,
  tx: usize, ty: usize, tz: usize, count: i32, eps2: f64,
  o: usize, P: usize,
): void {
  if (n < 1) return;
  records(sx, sy, sz, sm, n, P);
  const rx = load<f64>(sx), ry = load<f64>(sy), rz = load<f64>(sz);
  const e = f(<f32>eps2), zero = f(0);
  for (let i: i32 = 0; i < count; i += 4) {
    const xt = targets(tx, i, count, rx, false), yt = targets(ty, i, count, ry, false), zt = targets(tz, i, count, rz, false);
    const xl = targets(tx, i, count, rx, true), yl = targets(ty, i, count, ry, true), zl = targets(tz, i, count, rz, true);
    let S0 = f64x2.splat(0), S1 = f64x2.splat(0);
    for (let j0: i32 = 0; j0 < n; j0 += BLOCK) {
      const j1 = min(j0 + BLOCK, n);
      let sp = f(0);
      for (let j = j0; j < j1; j++) {
        const q = P + (<usize>j << 5);
        const dx = d(q, 0, xt, xl), dy = d(q, 4, yt, yl), dz = d(q, 8, zt, zl);
        const r2 = f32x4.add(f32x4.add(f32x4.mul(dx, dx), f32x4.mul(dy, dy)), f32x4.mul(dz, dz));
        const term = f32x4.div(v128.load32_splat(q, 12), f32x4.sqrt(f32x4.add(r2, e)));
        // A coincident source (the target itself) adds nothing.
        sp = f32x4.add(sp, v128.and(term, f32x4.ne(r2, zero)));
      }
      S0 = f64x2.add(S0, f64x2.promote_low_f32x4(sp)); S1 = f64x2.add(S1, high(sp));
    }
    put(o + (<usize>i << 3), S0, S1, count - i);
  }
}

/** First byte the caller may use for its arrays. */
export function heapBase(): usize {
  return (__heap_base + 15) & ~15;
}
