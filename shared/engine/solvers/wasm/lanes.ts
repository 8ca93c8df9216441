// Vector helpers the mixed-precision modules (direct.ts, tree.ts) share; inlined where used.

/** A float32 splatted to four lanes. */
// @ts-ignore: decorator
@inline export function f(v: f32): v128 { return f32x4.splat(v); }

/** Lanes 2 and 3 of a float32 vector as a float64 pair. */
// @ts-ignore: decorator
@inline export function high(v: v128): v128 { return f64x2.promote_low_f32x4(v128.shuffle<f32>(v, v, 2, 3, 2, 3)); }

/** Writes the float64 lanes of (lo, hi), four targets' sums, for the targets left of a pass. */
// @ts-ignore: decorator
@inline export function put(o: usize, lo: v128, hi: v128, left: i32): void {
  store<f64>(o, f64x2.extract_lane(lo, 0));
  if (left > 1) store<f64>(o, f64x2.extract_lane(lo, 1), 8);
  if (left > 2) store<f64>(o, f64x2.extract_lane(hi, 0), 16);
  if (left > 3) store<f64>(o, f64x2.extract_lane(hi, 1), 24);
}
