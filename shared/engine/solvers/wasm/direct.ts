// The softened-Newton direct sum in WebAssembly SIMD, compiled by `npm run build:wasm`
// into shared/engine/solvers/directWasm.generated.ts.
//
// Each f64x2 lane is one target, and every target sums its sources in index
// order with exactly the operations of the JS kernel in ../shared/engine/solvers/direct.ts
// (IEEE float64, correctly rounded sqrt and divide, no fused multiply-add), so
// the two give the same bits. The caller passes an even target count; the odd
// target out stays in JS.
//
// Arrays are float64 in linear memory at the byte offsets given; the caller lays them out.

// @ts-ignore: decorator
@inline function splat(v: f64): v128 { return f64x2.splat(v); }

/** Pull (before the factor G) at targets t[0..count) from sources s[0..n), written to o. */
export function field(
  sx: usize, sy: usize, sz: usize, sm: usize, n: i32,
  tx: usize, ty: usize, tz: usize, count: i32, eps2: f64,
  ox: usize, oy: usize, oz: usize,
): void {
  const e = splat(eps2);
  const one = splat(1.0);
  let i: i32 = 0;
  // Four targets per pass: two vectors share each source load.
  for (; i + 3 < count; i += 4) {
    const b = <usize>i << 3;
    const xa = v128.load(tx + b), ya = v128.load(ty + b), za = v128.load(tz + b);
    const xb = v128.load(tx + b, 16), yb = v128.load(ty + b, 16), zb = v128.load(tz + b, 16);
    let axa = splat(0), aya = splat(0), aza = splat(0);
    let axb = splat(0), ayb = splat(0), azb = splat(0);
    for (let j: i32 = 0; j < n; j++) {
      const q = <usize>j << 3;
      const xj = v128.load64_splat(sx + q), yj = v128.load64_splat(sy + q), zj = v128.load64_splat(sz + q);
      const mj = v128.load64_splat(sm + q);
      const dxa = f64x2.sub(xj, xa), dya = f64x2.sub(yj, ya), dza = f64x2.sub(zj, za);
      const dxb = f64x2.sub(xj, xb), dyb = f64x2.sub(yj, yb), dzb = f64x2.sub(zj, zb);
      const r2a = f64x2.add(f64x2.add(f64x2.add(f64x2.mul(dxa, dxa), f64x2.mul(dya, dya)), f64x2.mul(dza, dza)), e);
      const r2b = f64x2.add(f64x2.add(f64x2.add(f64x2.mul(dxb, dxb), f64x2.mul(dyb, dyb)), f64x2.mul(dzb, dzb)), e);
      const ia = f64x2.div(one, f64x2.sqrt(r2a));
      const ib = f64x2.div(one, f64x2.sqrt(r2b));
      const fa = f64x2.mul(f64x2.mul(f64x2.mul(mj, ia), ia), ia);
      const fb = f64x2.mul(f64x2.mul(f64x2.mul(mj, ib), ib), ib);
      axa = f64x2.add(axa, f64x2.mul(fa, dxa)); aya = f64x2.add(aya, f64x2.mul(fa, dya)); aza = f64x2.add(aza, f64x2.mul(fa, dza));
      axb = f64x2.add(axb, f64x2.mul(fb, dxb)); ayb = f64x2.add(ayb, f64x2.mul(fb, dyb)); azb = f64x2.add(azb, f64x2.mul(fb, dzb));
    }
    v128.store(ox + b, axa); v128.store(oy + b, aya); v128.store(oz + b, aza);
    v128.store(ox + b, axb, 16); v128.store(oy + b, ayb, 16); v128.store(oz + b, azb, 16);
  }
  for (; i + 1 < count; i += 2) {
    const b = <usize>i << 3;
    const xa = v128.load(tx + b), ya = v128.load(ty + b), za = v128.load(tz + b);
    let axa = splat(0), aya = splat(0), aza = splat(0);
    for (let j: i32 = 0; j < n; j++) {
      const q = <usize>j << 3;
      const xj = v128.load64_splat(sx + q), yj = v128.load64_splat(sy + q), zj = v128.load64_splat(sz + q);
      const mj = v128.load64_splat(sm + q);
      const dxa = f64x2.sub(xj, xa), dya = f64x2.sub(yj, ya), dza = f64x2.sub(zj, za);
      const r2a = f64x2.add(f64x2.add(f64x2.add(f64x2.mul(dxa, dxa), f64x2.mul(dya, dya)), f64x2.mul(dza, dza)), e);
      const ia = f64x2.div(one, f64x2.sqrt(r2a));
      const fa = f64x2.mul(f64x2.mul(f64x2.mul(mj, ia), ia), ia);
      axa = f64x2.add(axa, f64x2.mul(fa, dxa)); aya = f64x2.add(aya, f64x2.mul(fa, dya)); aza = f64x2.add(aza, f64x2.mul(fa, dza));
    }
    v128.store(ox + b, axa); v128.store(oy + b, aya); v128.store(oz + b, aza);
  }
}

/** Sum of m / sqrt(r^2 + eps^2) over sources not coincident with the target, at targets t[0..count), written to o. */
export function potential(
  sx: usize, sy: usize, sz: usize, sm: usize, n: i32,
  tx: usize, ty: usize, tz: usize, count: i32, eps2: f64,
  o: usize,
): void {
  const e = splat(eps2);
  const zero = splat(0);
  for (let i: i32 = 0; i + 1 < count; i += 2) {
    const b = <usize>i << 3;
    const xa = v128.load(tx + b), ya = v128.load(ty + b), za = v128.load(tz + b);
    let p = splat(0);
    for (let j: i32 = 0; j < n; j++) {
      const q = <usize>j << 3;
      const dx = f64x2.sub(v128.load64_splat(sx + q), xa);
      const dy = f64x2.sub(v128.load64_splat(sy + q), ya);
      const dz = f64x2.sub(v128.load64_splat(sz + q), za);
      const r2 = f64x2.add(f64x2.add(f64x2.mul(dx, dx), f64x2.mul(dy, dy)), f64x2.mul(dz, dz));
      const term = f64x2.div(v128.load64_splat(sm + q), f64x2.sqrt(f64x2.add(r2, e)));
      // A coincident pair adds +0, which leaves the sum's bits as they are.
      p = f64x2.add(p, v128.and(term, f64x2.ne(r2, zero)));
    }
    v128.store(o + b, p);
  }
}

/** First byte the caller may use for its arrays. */
export function heapBase(): usize {
  return (__heap_base + 15) & ~15;
}
