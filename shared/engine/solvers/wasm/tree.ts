// The tree's walk and sums for one target group in WebAssembly SIMD, for softened
// Newton and for the Yukawa law (phi = (1 + alpha e^(-s/lambda)) / s), compiled by
// `npm run build:wasm` into shared/engine/solvers/treeWasm.generated.ts.
//
// The octree (tree.ts's layout: 16 float64 numbers and 4 int32 links a cell,
// sources in tree order) is copied into linear memory once per force evaluation.
// One call walks for one group of targets (a self-field group, or one probe) with
// tree.ts's acceptance test, in float64 and the same order, so it gathers the
// same list as the JS walk; then it sums the
// list in mixed precision: positions relative to the group's first target, in
// float64, rounded once to float32; pairs and cells (monopole plus quadrupole)
// summed in float32, four targets to a vector, and every BLOCK terms the float32
// partial sums added into float64 sums. A target's own slot in the list rounds to
// the same numbers as the target, so it adds exactly zero (eps > 0). The sums at
// a target depend only on the tree and its group, so threads do not change them.

import { f, high, put } from './lanes';

/** Terms summed in float32 before the partial sums join the float64 ones. */
const BLOCK: i32 = 32;

// Cell layout (tree.ts): centre x, y, z, half size, b_max^2, centre of mass x, y, z, mass, moments xx, yy, zz, xy, xz, yz.
const CELL_BYTES: usize = 128;
const LINK_BYTES: usize = 16;

/** What the last walk gathered: particles and cells. */
let np: i32 = 0, nc: i32 = 0;
/** The reference point of the last walk: the group's first target. */
let rx: f64 = 0, ry: f64 = 0, rz: f64 = 0;

/**
 * Pull (before the factor G) at the targets t[from..to) (the sources' own arrays for a
 * self-field group, whose slots they are), to o[0..to-from). `stack` has room for
 * 8 x 49 int32, `scratch` 16 bytes for every source and `cellScratch` 48 for every cell.
 */
export function groupField(
  cells: usize, links: usize, sx: usize, sy: usize, sz: usize, sm: usize,
  tx: usize, ty: usize, tz: usize, from: i32, to: i32, theta2: f64, few: i32, eps2: f64,
  ox: usize, oy: usize, oz: usize, stack: usize, scratch: usize, cellScratch: usize,
): void {
  gather(cells, links, sx, sy, sz, sm, tx, ty, tz, from, to, theta2, few, stack, scratch, cellScratch);
  sumField(scratch, cellScratch, tx, ty, tz, from, to, eps2, ox, oy, oz);
}

/** Sum of m phi over the list (the potential is -G times it) at the targets t[from..to), to o[0..to-from); coincident points skipped. */
export function groupPotential(
  cells: usize, links: usize, sx: usize, sy: usize, sz: usize, sm: usize,
  tx: usize, ty: usize, tz: usize, from: i32, to: i32, theta2: f64, few: i32, eps2: f64,
  o: usize, stack: usize, scratch: usize, cellScratch: usize,
): void {
  gather(cells, links, sx, sy, sz, sm, tx, ty, tz, from, to, theta2, few, stack, scratch, cellScratch);
  sumPotential(scratch, cellScratch, tx, ty, tz, from, to, eps2, o);
}

/** groupField under the Yukawa law, alpha and lambda its parameters. */
export function groupFieldYukawa(
  cells: usize, links: usize, sx: usize, sy: usize, sz: usize, sm: usize,
  tx: usize, ty: usize, tz: usize, from: i32, to: i32, theta2: f64, few: i32, eps2: f64, alpha: f64, lambda: f64,
  ox: usize, oy: usize, oz: usize, stack: usize, scratch: usize, cellScratch: usize,
): void {
  gather(cells, links, sx, sy, sz, sm, tx, ty, tz, from, to, theta2, few, stack, scratch, cellScratch);
  sumFieldYukawa(scratch, cellScratch, tx, ty, tz, from, to, eps2, alpha, lambda, ox, oy, oz);
}

/** groupPotential under the Yukawa law: the sum of m phi with phi = (1 + alpha e^(-s/lambda)) / s. */
export function groupPotentialYukawa(
  cells: usize, links: usize, sx: usize, sy: usize, sz: usize, sm: usize,
  tx: usize, ty: usize, tz: usize, from: i32, to: i32, theta2: f64, few: i32, eps2: f64, alpha: f64, lambda: f64,
  o: usize, stack: usize, scratch: usize, cellScratch: usize,
): void {
  gather(cells, links, sx, sy, sz, sm, tx, ty, tz, from, to, theta2, few, stack, scratch, cellScratch);
  sumPotentialYukawa(scratch, cellScratch, tx, ty, tz, from, to, eps2, alpha, lambda, o);
}

/** e^(-u) at u[0..n) (float32) to o[0..n): expMinus itself, for the tests of its accuracy. */
export function expMinusAt(u: usize, o: usize, n: i32): void {
  for (let k: i32 = 0; k < n; k += 4) {
    const b = <usize>k << 2;
    v128.store(o + b, expMinus(v128.load(u + b)));
  }
}

/** The walk: tree.ts's acceptance test, in its order; the list goes to the scratch as float32 records. */
function gather(
  cells: usize, links: usize, sx: usize, sy: usize, sz: usize, sm: usize,
  tx: usize, ty: usize, tz: usize, from: i32, to: i32, theta2: f64, few: i32, stack: usize, P: usize, C: usize,
): void {
  let minX = Infinity, minY = Infinity, minZ = Infinity, maxX = -Infinity, maxY = -Infinity, maxZ = -Infinity;
  for (let q = from; q < to; q++) {
    const b = <usize>q << 3;
    const x = load<f64>(tx + b), y = load<f64>(ty + b), z = load<f64>(tz + b);
    minX = min(minX, x); maxX = max(maxX, x);
    minY = min(minY, y); maxY = max(maxY, y);
    minZ = min(minZ, z); maxZ = max(maxZ, z);
  }
  const r0 = <usize>from << 3;
  rx = load<f64>(tx + r0); ry = load<f64>(ty + r0); rz = load<f64>(tz + r0);
  // Particles as float32 x, y, z, m (relative), 16 bytes each; cells as float32 centre of mass
  // (relative), mass, the six second moments times 3 (J = 3I) and 1.5 tr(I), 48 bytes each:
  // the factors the sums would otherwise apply at every term.
  np = 0; nc = 0;
  let top: i32 = 0;
  store<i32>(stack, 0);
  top = 1;
  while (top > 0) {
    top--;
    const node = load<i32>(stack + (<usize>top << 2));
    const c = cells + <usize>node * CELL_BYTES;
    const l = links + <usize>node * LINK_BYTES;
    const h = load<f64>(c, 24);
    const ox0 = load<f64>(c), oy0 = load<f64>(c, 8), oz0 = load<f64>(c, 16);
    const apart = minX > ox0 + h || maxX < ox0 - h || minY > oy0 + h || maxY < oy0 - h || minZ > oz0 + h || maxZ < oz0 - h;
    const gx = load<f64>(c, 40), gy = load<f64>(c, 48), gz = load<f64>(c, 56);
    const dx = max(max(minX - gx, 0), gx - maxX), dy = max(max(minY - gy, 0), gy - maxY), dz = max(max(minZ - gz, 0), gz - maxZ);
    const first = load<i32>(l), count = load<i32>(l, 12);
    const accept = apart && load<f64>(c, 32) < theta2 * (dx * dx + dy * dy + dz * dz);
    if (accept && count > few) {
      const o = C + <usize>nc * 48;
      store<f32>(o, <f32>(gx - rx)); store<f32>(o, <f32>(gy - ry), 4); store<f32>(o, <f32>(gz - rz), 8);
      store<f32>(o, <f32>load<f64>(c, 64), 12);
      const xx = load<f64>(c, 72), yy = load<f64>(c, 80), zz = load<f64>(c, 88);
      store<f32>(o, <f32>(3 * xx), 16); store<f32>(o, <f32>(3 * yy), 20); store<f32>(o, <f32>(3 * zz), 24);
      store<f32>(o, <f32>(3 * load<f64>(c, 96)), 28); store<f32>(o, <f32>(3 * load<f64>(c, 104)), 32); store<f32>(o, <f32>(3 * load<f64>(c, 112)), 36);
      store<f32>(o, <f32>(1.5 * (xx + yy + zz)), 40);
      nc++;
    } else if (accept || first < 0) {
      // An accepted cell of few particles, or an opened leaf: its particles.
      const s0 = load<i32>(l, 8);
      for (let s = s0, e = s0 + count; s < e; s++) {
        const b = <usize>s << 3, o = P + (<usize>np << 4);
        store<f32>(o, <f32>(load<f64>(sx + b) - rx));
        store<f32>(o, <f32>(load<f64>(sy + b) - ry), 4);
        store<f32>(o, <f32>(load<f64>(sz + b) - rz), 8);
        store<f32>(o, <f32>load<f64>(sm + b), 12);
        np++;
      }
    } else {
      for (let q = first + load<i32>(l, 4) - 1; q >= first; q--) {
        store<i32>(stack + (<usize>top << 2), q);
        top++;
      }
    }
  }
}

/** Target slot i of a group [from, to) relative to the reference: the last target repeated past the end (its lanes are not written back). */
// @ts-ignore: decorator
@inline function lane(t: usize, i: i32, to: i32, r: f64): f32 { return <f32>(load<f64>(t + (<usize>min(i, to - 1) << 3)) - r); }

/** Four targets' coordinates relative to the reference point, as a float32 vector. */
// @ts-ignore: decorator
@inline function targets(t: usize, i: i32, to: i32, r: f64): v128 {
  let v = f(lane(t, i, to, r));
  v = f32x4.replace_lane(v, 1, lane(t, i + 1, to, r));
  v = f32x4.replace_lane(v, 2, lane(t, i + 2, to, r));
  return f32x4.replace_lane(v, 3, lane(t, i + 3, to, r));
}

function sumField(P: usize, C: usize, tx: usize, ty: usize, tz: usize, from: i32, to: i32, eps2: f64, ox: usize, oy: usize, oz: usize): void {
  const e = f(<f32>eps2), one = f(1), five2 = f(2.5);
  for (let i: i32 = from; i < to; i += 4) {
    const xt = targets(tx, i, to, rx), yt = targets(ty, i, to, ry), zt = targets(tz, i, to, rz);
    // float64 sums: lanes 0-1 and 2-3 of each component.
    let X0 = f64x2.splat(0), X1 = f64x2.splat(0), Y0 = f64x2.splat(0), Y1 = f64x2.splat(0), Z0 = f64x2.splat(0), Z1 = f64x2.splat(0);
    for (let j0: i32 = 0; j0 < np; j0 += BLOCK) {
      const j1 = min(j0 + BLOCK, np);
      let ax = f(0), ay = f(0), az = f(0);
      for (let j = j0; j < j1; j++) {
        const o = P + (<usize>j << 4);
        const dx = f32x4.sub(v128.load32_splat(o), xt), dy = f32x4.sub(v128.load32_splat(o, 4), yt), dz = f32x4.sub(v128.load32_splat(o, 8), zt);
        const r2 = f32x4.add(f32x4.add(f32x4.add(f32x4.mul(dx, dx), f32x4.mul(dy, dy)), f32x4.mul(dz, dz)), e);
        // m / s^3 as one division: two multiplications fewer than m (1/s)^3.
        const s = f32x4.div(v128.load32_splat(o, 12), f32x4.mul(r2, f32x4.sqrt(r2)));
        ax = f32x4.add(ax, f32x4.mul(s, dx)); ay = f32x4.add(ay, f32x4.mul(s, dy)); az = f32x4.add(az, f32x4.mul(s, dz));
      }
      X0 = f64x2.add(X0, f64x2.promote_low_f32x4(ax)); X1 = f64x2.add(X1, high(ax));
      Y0 = f64x2.add(Y0, f64x2.promote_low_f32x4(ay)); Y1 = f64x2.add(Y1, high(ay));
      Z0 = f64x2.add(Z0, f64x2.promote_low_f32x4(az)); Z1 = f64x2.add(Z1, high(az));
    }
    for (let k0: i32 = 0; k0 < nc; k0 += BLOCK) {
      const k1 = min(k0 + BLOCK, nc);
      let ax = f(0), ay = f(0), az = f(0);
      for (let k = k0; k < k1; k++) {
        const o = C + <usize>k * 48;
        const dx = f32x4.sub(v128.load32_splat(o), xt), dy = f32x4.sub(v128.load32_splat(o, 4), yt), dz = f32x4.sub(v128.load32_splat(o, 8), zt);
        const r2 = f32x4.add(f32x4.add(f32x4.add(f32x4.mul(dx, dx), f32x4.mul(dy, dy)), f32x4.mul(dz, dz)), e);
        const inv = f32x4.div(one, f32x4.sqrt(r2));
        const inv2 = f32x4.mul(inv, inv), inv3 = f32x4.mul(inv2, inv), inv5 = f32x4.mul(inv3, inv2);
        const Jxx = v128.load32_splat(o, 16), Jyy = v128.load32_splat(o, 20), Jzz = v128.load32_splat(o, 24);
        const Jxy = v128.load32_splat(o, 28), Jxz = v128.load32_splat(o, 32), Jyz = v128.load32_splat(o, 36);
        const Jdx = f32x4.add(f32x4.add(f32x4.mul(Jxx, dx), f32x4.mul(Jxy, dy)), f32x4.mul(Jxz, dz));
        const Jdy = f32x4.add(f32x4.add(f32x4.mul(Jxy, dx), f32x4.mul(Jyy, dy)), f32x4.mul(Jyz, dz));
        const Jdz = f32x4.add(f32x4.add(f32x4.mul(Jxz, dx), f32x4.mul(Jyz, dy)), f32x4.mul(Jzz, dz));
        const dJd = f32x4.add(f32x4.add(f32x4.mul(dx, Jdx), f32x4.mul(dy, Jdy)), f32x4.mul(dz, Jdz));
        // M / s^3 + 7.5 d.I.d / s^7 - 1.5 tr(I) / s^5 as in the JS loops (fast/newton.ts), written
        // M / s^3 + (2.5 d.J.d / s^2 - 1.5 tr(I)) / s^5; the pull is that times d, less J.d / s^5.
        const radial = f32x4.add(
          f32x4.mul(v128.load32_splat(o, 12), inv3),
          f32x4.mul(f32x4.sub(f32x4.mul(f32x4.mul(five2, dJd), inv2), v128.load32_splat(o, 40)), inv5),
        );
        ax = f32x4.add(ax, f32x4.sub(f32x4.mul(radial, dx), f32x4.mul(inv5, Jdx)));
        ay = f32x4.add(ay, f32x4.sub(f32x4.mul(radial, dy), f32x4.mul(inv5, Jdy)));
        az = f32x4.add(az, f32x4.sub(f32x4.mul(radial, dz), f32x4.mul(inv5, Jdz)));
      }
      X0 = f64x2.add(X0, f64x2.promote_low_f32x4(ax)); X1 = f64x2.add(X1, high(ax));
      Y0 = f64x2.add(Y0, f64x2.promote_low_f32x4(ay)); Y1 = f64x2.add(Y1, high(ay));
      Z0 = f64x2.add(Z0, f64x2.promote_low_f32x4(az)); Z1 = f64x2.add(Z1, high(az));
    }
    const b = <usize>(i - from) << 3;
    put(ox + b, X0, X1, to - i); put(oy + b, Y0, Y1, to - i); put(oz + b, Z0, Z1, to - i);
  }
}

function sumPotential(P: usize, C: usize, tx: usize, ty: usize, tz: usize, from: i32, to: i32, eps2: f64, o: usize): void {
  const e = f(<f32>eps2), one = f(1), zero = f(0), half = f(0.5), third = f(<f32>(1.0 / 3));
  for (let i: i32 = from; i < to; i += 4) {
    const xt = targets(tx, i, to, rx), yt = targets(ty, i, to, ry), zt = targets(tz, i, to, rz);
    let S0 = f64x2.splat(0), S1 = f64x2.splat(0);
    for (let j0: i32 = 0; j0 < np; j0 += BLOCK) {
      const j1 = min(j0 + BLOCK, np);
      let sp = f(0);
      for (let j = j0; j < j1; j++) {
        const o = P + (<usize>j << 4);
        const dx = f32x4.sub(v128.load32_splat(o), xt), dy = f32x4.sub(v128.load32_splat(o, 4), yt), dz = f32x4.sub(v128.load32_splat(o, 8), zt);
        const r2 = f32x4.add(f32x4.add(f32x4.mul(dx, dx), f32x4.mul(dy, dy)), f32x4.mul(dz, dz));
        const term = f32x4.div(v128.load32_splat(o, 12), f32x4.sqrt(f32x4.add(r2, e)));
        // A coincident slot (the target's own) adds nothing.
        sp = f32x4.add(sp, v128.and(term, f32x4.ne(r2, zero)));
      }
      S0 = f64x2.add(S0, f64x2.promote_low_f32x4(sp)); S1 = f64x2.add(S1, high(sp));
    }
    for (let k0: i32 = 0; k0 < nc; k0 += BLOCK) {
      const k1 = min(k0 + BLOCK, nc);
      let sp = f(0);
      for (let k = k0; k < k1; k++) {
        const o = C + <usize>k * 48;
        const dx = f32x4.sub(v128.load32_splat(o), xt), dy = f32x4.sub(v128.load32_splat(o, 4), yt), dz = f32x4.sub(v128.load32_splat(o, 8), zt);
        const r2 = f32x4.add(f32x4.add(f32x4.add(f32x4.mul(dx, dx), f32x4.mul(dy, dy)), f32x4.mul(dz, dz)), e);
        const inv = f32x4.div(one, f32x4.sqrt(r2));
        const inv2 = f32x4.mul(inv, inv), inv3 = f32x4.mul(inv2, inv);
        const Jxx = v128.load32_splat(o, 16), Jyy = v128.load32_splat(o, 20), Jzz = v128.load32_splat(o, 24);
        const Jxy = v128.load32_splat(o, 28), Jxz = v128.load32_splat(o, 32), Jyz = v128.load32_splat(o, 36);
        const dJd = f32x4.add(f32x4.add(
          f32x4.mul(dx, f32x4.add(f32x4.add(f32x4.mul(Jxx, dx), f32x4.mul(Jxy, dy)), f32x4.mul(Jxz, dz))),
          f32x4.mul(dy, f32x4.add(f32x4.add(f32x4.mul(Jxy, dx), f32x4.mul(Jyy, dy)), f32x4.mul(Jyz, dz)))),
          f32x4.mul(dz, f32x4.add(f32x4.add(f32x4.mul(Jxz, dx), f32x4.mul(Jyz, dy)), f32x4.mul(Jzz, dz))));
        // M / s + 1.5 d.I.d / s^5 - 0.5 tr(I) / s^3 as in the JS loops (fast/newton.ts), written
        // M / s + (0.5 d.J.d / s^2 - (1.5 tr(I)) / 3) / s^3.
        sp = f32x4.add(sp, f32x4.add(
          f32x4.mul(v128.load32_splat(o, 12), inv),
          f32x4.mul(f32x4.sub(f32x4.mul(f32x4.mul(half, dJd), inv2), f32x4.mul(third, v128.load32_splat(o, 40))), inv3),
        ));
      }
      S0 = f64x2.add(S0, f64x2.promote_low_f32x4(sp)); S1 = f64x2.add(S1, high(sp));
    }
    put(o + (<usize>(i - from) << 3), S0, S1, to - i);
  }
}

// e^(-u) for u >= 0 in float32, four lanes: common practice, Cody & Waite style range reduction
// plus a polynomial (Cephes's expf, S. L. Moshier). -u = n ln2 + r with n an integer and |r| <= ln2/2,
// ln2 split in two so n ln2 is exact to float32; e^r from Cephes's degree-5 minimax polynomial;
// 2^n from exponent bits. u above 87 (e^-87 = 1.6e-38, near float32's smallest normal) flushes to 0.
// Measured max relative error against Math.exp: 7.9e-8 over u in [0, 80], 8.1e-8 on [80, 87] (tests/engine/tree.test.ts).
const LOG2E: f32 = 1.44269504088896341, LN2_HI: f32 = 0.693359375, LN2_LO: f32 = -2.12194440e-4, U_MAX: f32 = 87;

// @ts-ignore: decorator
@inline function expMinus(u: v128): v128 {
  const x = f32x4.neg(f32x4.min(u, f(U_MAX)));
  const n = f32x4.nearest(f32x4.mul(x, f(LOG2E)));
  const r = f32x4.sub(f32x4.sub(x, f32x4.mul(n, f(LN2_HI))), f32x4.mul(n, f(LN2_LO)));
  let p = f32x4.add(f32x4.mul(f(1.9875691500e-4), r), f(1.3981999507e-3));
  p = f32x4.add(f32x4.mul(p, r), f(8.3334519073e-3));
  p = f32x4.add(f32x4.mul(p, r), f(4.1665795894e-2));
  p = f32x4.add(f32x4.mul(p, r), f(1.6666665459e-1));
  p = f32x4.add(f32x4.mul(p, r), f(5.0000001201e-1));
  const er = f32x4.add(f32x4.add(f32x4.mul(f32x4.mul(p, r), r), r), f(1));
  // 2^n: n + 127 in the exponent field (n >= -126 here, so a normal number).
  const two = i32x4.shl(i32x4.add(i32x4.trunc_sat_f32x4_s(n), i32x4.splat(127)), 23);
  return v128.and(f32x4.mul(er, two), f32x4.le(u, f(U_MAX)));
}

// The Yukawa sums: the Newton sums' scheme with e = alpha e^(-u), u = s / lambda. Particles pull
// m (1 + e (1 + u)) / s^3 times d. Cells: fast/yukawa.ts's expansion in the derivatives in r^2,
// F1 = -0.5 g1 / s^3, F2 = 0.75 g2 / s^5, F3 = -1.875 g3 / s^7 with g1 = 1 + e (1 + u),
// g2 = 1 + e (u^2 + 3u + 3) / 3, g3 = 1 + e (u^3 + 6u^2 + 15u + 15) / 15 (each 1 under Newton).

function sumFieldYukawa(P: usize, C: usize, tx: usize, ty: usize, tz: usize, from: i32, to: i32, eps2: f64, alpha: f64, lambda: f64, ox: usize, oy: usize, oz: usize): void {
  const e = f(<f32>eps2), one = f(1), five2 = f(2.5), three = f(3), six = f(6), fifteen = f(15);
  const a = f(<f32>alpha), a3 = f(<f32>(alpha / 3)), a15 = f(<f32>(alpha / 15)), iL = f(<f32>(1 / lambda));
  for (let i: i32 = from; i < to; i += 4) {
    const xt = targets(tx, i, to, rx), yt = targets(ty, i, to, ry), zt = targets(tz, i, to, rz);
    let X0 = f64x2.splat(0), X1 = f64x2.splat(0), Y0 = f64x2.splat(0), Y1 = f64x2.splat(0), Z0 = f64x2.splat(0), Z1 = f64x2.splat(0);
    for (let j0: i32 = 0; j0 < np; j0 += BLOCK) {
      const j1 = min(j0 + BLOCK, np);
      let ax = f(0), ay = f(0), az = f(0);
      for (let j = j0; j < j1; j++) {
        const o = P + (<usize>j << 4);
        const dx = f32x4.sub(v128.load32_splat(o), xt), dy = f32x4.sub(v128.load32_splat(o, 4), yt), dz = f32x4.sub(v128.load32_splat(o, 8), zt);
        const r2 = f32x4.add(f32x4.add(f32x4.add(f32x4.mul(dx, dx), f32x4.mul(dy, dy)), f32x4.mul(dz, dz)), e);
        const s = f32x4.sqrt(r2), u = f32x4.mul(s, iL);
        const g1 = f32x4.add(one, f32x4.mul(f32x4.mul(a, expMinus(u)), f32x4.add(one, u)));
        const k = f32x4.div(f32x4.mul(v128.load32_splat(o, 12), g1), f32x4.mul(r2, s));
        ax = f32x4.add(ax, f32x4.mul(k, dx)); ay = f32x4.add(ay, f32x4.mul(k, dy)); az = f32x4.add(az, f32x4.mul(k, dz));
      }
      X0 = f64x2.add(X0, f64x2.promote_low_f32x4(ax)); X1 = f64x2.add(X1, high(ax));
      Y0 = f64x2.add(Y0, f64x2.promote_low_f32x4(ay)); Y1 = f64x2.add(Y1, high(ay));
      Z0 = f64x2.add(Z0, f64x2.promote_low_f32x4(az)); Z1 = f64x2.add(Z1, high(az));
    }
    for (let k0: i32 = 0; k0 < nc; k0 += BLOCK) {
      const k1 = min(k0 + BLOCK, nc);
      let ax = f(0), ay = f(0), az = f(0);
      for (let k = k0; k < k1; k++) {
        const o = C + <usize>k * 48;
        const dx = f32x4.sub(v128.load32_splat(o), xt), dy = f32x4.sub(v128.load32_splat(o, 4), yt), dz = f32x4.sub(v128.load32_splat(o, 8), zt);
        const r2 = f32x4.add(f32x4.add(f32x4.add(f32x4.mul(dx, dx), f32x4.mul(dy, dy)), f32x4.mul(dz, dz)), e);
        const s = f32x4.sqrt(r2), inv = f32x4.div(one, s), u = f32x4.mul(s, iL);
        const inv2 = f32x4.mul(inv, inv), inv3 = f32x4.mul(inv2, inv), inv5 = f32x4.mul(inv3, inv2);
        const E = expMinus(u);
        const g1 = f32x4.add(one, f32x4.mul(f32x4.mul(a, E), f32x4.add(one, u)));
        const g2 = f32x4.add(one, f32x4.mul(f32x4.mul(a3, E), f32x4.add(f32x4.mul(f32x4.add(u, three), u), three)));
        const g3 = f32x4.add(one, f32x4.mul(f32x4.mul(a15, E), f32x4.add(f32x4.mul(f32x4.add(f32x4.mul(f32x4.add(u, six), u), fifteen), u), fifteen)));
        const Jxx = v128.load32_splat(o, 16), Jyy = v128.load32_splat(o, 20), Jzz = v128.load32_splat(o, 24);
        const Jxy = v128.load32_splat(o, 28), Jxz = v128.load32_splat(o, 32), Jyz = v128.load32_splat(o, 36);
        const Jdx = f32x4.add(f32x4.add(f32x4.mul(Jxx, dx), f32x4.mul(Jxy, dy)), f32x4.mul(Jxz, dz));
        const Jdy = f32x4.add(f32x4.add(f32x4.mul(Jxy, dx), f32x4.mul(Jyy, dy)), f32x4.mul(Jyz, dz));
        const Jdz = f32x4.add(f32x4.add(f32x4.mul(Jxz, dx), f32x4.mul(Jyz, dy)), f32x4.mul(Jzz, dz));
        const dJd = f32x4.add(f32x4.add(f32x4.mul(dx, Jdx), f32x4.mul(dy, Jdy)), f32x4.mul(dz, Jdz));
        // -(2 M F1 + 2 F2 tr(I) + 4 F3 d.I.d) = M g1 / s^3 + (2.5 g3 d.J.d / s^2 - g2 1.5 tr(I)) / s^5;
        // the pull is that times d, less 4 F2 I.d = g2 J.d / s^5.
        const radial = f32x4.add(
          f32x4.mul(f32x4.mul(v128.load32_splat(o, 12), g1), inv3),
          f32x4.mul(f32x4.sub(f32x4.mul(f32x4.mul(f32x4.mul(five2, g3), dJd), inv2), f32x4.mul(g2, v128.load32_splat(o, 40))), inv5),
        );
        const q = f32x4.mul(g2, inv5);
        ax = f32x4.add(ax, f32x4.sub(f32x4.mul(radial, dx), f32x4.mul(q, Jdx)));
        ay = f32x4.add(ay, f32x4.sub(f32x4.mul(radial, dy), f32x4.mul(q, Jdy)));
        az = f32x4.add(az, f32x4.sub(f32x4.mul(radial, dz), f32x4.mul(q, Jdz)));
      }
      X0 = f64x2.add(X0, f64x2.promote_low_f32x4(ax)); X1 = f64x2.add(X1, high(ax));
      Y0 = f64x2.add(Y0, f64x2.promote_low_f32x4(ay)); Y1 = f64x2.add(Y1, high(ay));
      Z0 = f64x2.add(Z0, f64x2.promote_low_f32x4(az)); Z1 = f64x2.add(Z1, high(az));
    }
    const b = <usize>(i - from) << 3;
    put(ox + b, X0, X1, to - i); put(oy + b, Y0, Y1, to - i); put(oz + b, Z0, Z1, to - i);
  }
}

function sumPotentialYukawa(P: usize, C: usize, tx: usize, ty: usize, tz: usize, from: i32, to: i32, eps2: f64, alpha: f64, lambda: f64, o: usize): void {
  const e = f(<f32>eps2), one = f(1), zero = f(0), half = f(0.5), third = f(<f32>(1.0 / 3)), three = f(3);
  const a = f(<f32>alpha), a3 = f(<f32>(alpha / 3)), iL = f(<f32>(1 / lambda));
  for (let i: i32 = from; i < to; i += 4) {
    const xt = targets(tx, i, to, rx), yt = targets(ty, i, to, ry), zt = targets(tz, i, to, rz);
    let S0 = f64x2.splat(0), S1 = f64x2.splat(0);
    for (let j0: i32 = 0; j0 < np; j0 += BLOCK) {
      const j1 = min(j0 + BLOCK, np);
      let sp = f(0);
      for (let j = j0; j < j1; j++) {
        const oj = P + (<usize>j << 4);
        const dx = f32x4.sub(v128.load32_splat(oj), xt), dy = f32x4.sub(v128.load32_splat(oj, 4), yt), dz = f32x4.sub(v128.load32_splat(oj, 8), zt);
        const r2 = f32x4.add(f32x4.add(f32x4.mul(dx, dx), f32x4.mul(dy, dy)), f32x4.mul(dz, dz));
        const s = f32x4.sqrt(f32x4.add(r2, e));
        const g0 = f32x4.add(one, f32x4.mul(a, expMinus(f32x4.mul(s, iL))));
        const term = f32x4.div(f32x4.mul(v128.load32_splat(oj, 12), g0), s);
        // A coincident slot (the target's own) adds nothing.
        sp = f32x4.add(sp, v128.and(term, f32x4.ne(r2, zero)));
      }
      S0 = f64x2.add(S0, f64x2.promote_low_f32x4(sp)); S1 = f64x2.add(S1, high(sp));
    }
    for (let k0: i32 = 0; k0 < nc; k0 += BLOCK) {
      const k1 = min(k0 + BLOCK, nc);
      let sp = f(0);
      for (let k = k0; k < k1; k++) {
        const ok = C + <usize>k * 48;
        const dx = f32x4.sub(v128.load32_splat(ok), xt), dy = f32x4.sub(v128.load32_splat(ok, 4), yt), dz = f32x4.sub(v128.load32_splat(ok, 8), zt);
        const r2 = f32x4.add(f32x4.add(f32x4.add(f32x4.mul(dx, dx), f32x4.mul(dy, dy)), f32x4.mul(dz, dz)), e);
        const s = f32x4.sqrt(r2), inv = f32x4.div(one, s), u = f32x4.mul(s, iL);
        const inv2 = f32x4.mul(inv, inv), inv3 = f32x4.mul(inv2, inv);
        const E = expMinus(u);
        const aE = f32x4.mul(a, E);
        const g1 = f32x4.add(one, f32x4.mul(aE, f32x4.add(one, u)));
        const g2 = f32x4.add(one, f32x4.mul(f32x4.mul(a3, E), f32x4.add(f32x4.mul(f32x4.add(u, three), u), three)));
        const Jxx = v128.load32_splat(ok, 16), Jyy = v128.load32_splat(ok, 20), Jzz = v128.load32_splat(ok, 24);
        const Jxy = v128.load32_splat(ok, 28), Jxz = v128.load32_splat(ok, 32), Jyz = v128.load32_splat(ok, 36);
        const dJd = f32x4.add(f32x4.add(
          f32x4.mul(dx, f32x4.add(f32x4.add(f32x4.mul(Jxx, dx), f32x4.mul(Jxy, dy)), f32x4.mul(Jxz, dz))),
          f32x4.mul(dy, f32x4.add(f32x4.add(f32x4.mul(Jxy, dx), f32x4.mul(Jyy, dy)), f32x4.mul(Jyz, dz)))),
          f32x4.mul(dz, f32x4.add(f32x4.add(f32x4.mul(Jxz, dx), f32x4.mul(Jyz, dy)), f32x4.mul(Jzz, dz))));
        // M F0 + F1 tr(I) + 2 F2 d.I.d = M (1 + e) / s + (0.5 g2 d.J.d / s^2 - g1 (1.5 tr(I)) / 3) / s^3.
        sp = f32x4.add(sp, f32x4.add(
          f32x4.mul(f32x4.mul(v128.load32_splat(ok, 12), f32x4.add(one, aE)), inv),
          f32x4.mul(f32x4.sub(f32x4.mul(f32x4.mul(f32x4.mul(half, g2), dJd), inv2), f32x4.mul(f32x4.mul(third, g1), v128.load32_splat(ok, 40))), inv3),
        ));
      }
      S0 = f64x2.add(S0, f64x2.promote_low_f32x4(sp)); S1 = f64x2.add(S1, high(sp));
    }
    put(o + (<usize>(i - from) << 3), S0, S1, to - i);
  }
}

/** First byte the caller may use for its arrays. */
export function heapBase(): usize {
  return (__heap_base + 15) & ~15;
}
