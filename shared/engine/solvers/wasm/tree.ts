// The softened-Newton tree's walk and sums for one target group in WebAssembly
// SIMD, compiled by `npm run build:wasm` into shared/engine/solvers/treeWasm.generated.ts.
//
// The octree (tree.ts's layout: 16 float64 numbers and 4 int32 links a cell,
// sources in tree order) is copied into linear memory once per force evaluation.
// One call walks for one group with tree.ts's acceptance test, in float64 and
// the same order, so it gathers the same list as the JS walk; then it sums the
// list in mixed precision: positions relative to the group's first target, in
// float64, rounded once to float32; pairs and cells (monopole plus quadrupole)
// summed in float32, four targets to a vector, and every BLOCK terms the float32
// partial sums added into float64 sums. A target's own slot in the list rounds to
// the same numbers as the target, so it adds exactly zero (eps > 0). The sums at
// a target depend only on the tree and its group, so threads do not change them.
/** Terms summed in float32 before the partial sums join the float64 ones. */
const BLOCK: i32 = 32;

// @ts-ignore: decorator
@inline function f(v: f32): v128 { return f32x4.splat(v); }

/** Lanes 2 and 3 of a float32 vector as a float64 pair. */
// @ts-ignore: decorator
@inline function high(v: v128): v128 { return f64x2.promote_low_f32x4(v128.shuffle<f32>(v, v, 2, 3, 2, 3)); }

// Cell layout (tree.ts): centre x, y, z, half size, (2h)^2, centre of mass x, y, z, mass, moments xx, yy, zz, xy, xz, yz.
const CELL_BYTES: usize = 128;
const LINK_BYTES: usize = 16;

/**
 * Walks the tree for the targets in tree slots [from, to) and writes their pull
 * (before the factor G) to o[0..to-from). `stack` has room for 8 x 49 int32,
 * `scratch` 16 bytes for every source and `cellScratch` 48 for every cell.
 */
export function groupField(
  cells: usize, links: usize, sx: usize, sy: usize, sz: usize, sm: usize,
  from: i32, to: i32, theta2: f64, few: i32, eps2: f64,
  ox: usize, oy: usize, oz: usize, stack: usize, scratch: usize, cellScratch: usize,
): void {
  let minX = Infinity, minY = Infinity, minZ = Infinity, maxX = -Infinity, maxY = -Infinity, maxZ = -Infinity;
  for (let q = from; q < to; q++) {
    const b = <usize>q << 3;
    const x = load<f64>(sx + b), y = load<f64>(sy + b), z = load<f64>(sz + b);
    minX = min(minX, x); maxX = max(maxX, x);
    minY = min(minY, y); maxY = max(maxY, y);
    minZ = min(minZ, z); maxZ = max(maxZ, z);
  }
  const r0 = <usize>from << 3;
  const rx = load<f64>(sx + r0), ry = load<f64>(sy + r0), rz = load<f64>(sz + r0);
  // Particles as float32 x, y, z, m (relative), 16 bytes each; cells as float32 centre of mass
  // (relative), mass, six second moments and 1.5 times their trace, 48 bytes each.
  const P = scratch, C = cellScratch;
  let np: i32 = 0, nc: i32 = 0;
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
      store<f32>(o, <f32>xx, 16); store<f32>(o, <f32>yy, 20); store<f32>(o, <f32>zz, 24);
      store<f32>(o, <f32>load<f64>(c, 96), 28); store<f32>(o, <f32>load<f64>(c, 104), 32); store<f32>(o, <f32>load<f64>(c, 112), 36);
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
  sum(P, np, C, nc, sx, sy, sz, from, to, rx, ry, rz, eps2, ox, oy, oz);
}

/** Target slot i of a group [from, to) relative to the reference: the last target repeated past the end (its lanes are not written back). */
// @ts-ignore: decorator
@inline function lane(t: usize, i: i32, to: i32, r: f64): f32 { return <f32>(load<f64>(t + (<usize>min(i, to - 1) << 3)) - r); }

function sum(
  P: usize, np: i32, C: usize, nc: i32, tx: usize, ty: usize, tz: usize, from: i32, to: i32, rx: f64, ry: f64, rz: f64, eps2: f64,
  ox: usize, oy: usize, oz: usize,
): void {
  const e = f(<f32>eps2), one = f(1), three = f(3), seven5 = f(7.5);
  for (let i: i32 = from; i < to; i += 4) {
    let xt = f(lane(tx, i, to, rx)), yt = f(lane(ty, i, to, ry)), zt = f(lane(tz, i, to, rz));
    xt = f32x4.replace_lane(xt, 1, lane(tx, i + 1, to, rx)); xt = f32x4.replace_lane(xt, 2, lane(tx, i + 2, to, rx)); xt = f32x4.replace_lane(xt, 3, lane(tx, i + 3, to, rx));
    yt = f32x4.replace_lane(yt, 1, lane(ty, i + 1, to, ry)); yt = f32x4.replace_lane(yt, 2, lane(ty, i + 2, to, ry)); yt = f32x4.replace_lane(yt, 3, lane(ty, i + 3, to, ry));
    zt = f32x4.replace_lane(zt, 1, lane(tz, i + 1, to, rz)); zt = f32x4.replace_lane(zt, 2, lane(tz, i + 2, to, rz)); zt = f32x4.replace_lane(zt, 3, lane(tz, i + 3, to, rz));
    // float64 sums: lanes 0-1 and 2-3 of each component.
    let X0 = f64x2.splat(0), X1 = f64x2.splat(0), Y0 = f64x2.splat(0), Y1 = f64x2.splat(0), Z0 = f64x2.splat(0), Z1 = f64x2.splat(0);
    for (let j0: i32 = 0; j0 < np; j0 += BLOCK) {
      const j1 = min(j0 + BLOCK, np);
      let ax = f(0), ay = f(0), az = f(0);
      for (let j = j0; j < j1; j++) {
        const o = P + (<usize>j << 4);
        const dx = f32x4.sub(v128.load32_splat(o), xt), dy = f32x4.sub(v128.load32_splat(o, 4), yt), dz = f32x4.sub(v128.load32_splat(o, 8), zt);
        const r2 = f32x4.add(f32x4.add(f32x4.add(f32x4.mul(dx, dx), f32x4.mul(dy, dy)), f32x4.mul(dz, dz)), e);
        const inv = f32x4.div(one, f32x4.sqrt(r2));
        const s = f32x4.mul(f32x4.mul(f32x4.mul(v128.load32_splat(o, 12), inv), inv), inv);
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
        const Ixx = v128.load32_splat(o, 16), Iyy = v128.load32_splat(o, 20), Izz = v128.load32_splat(o, 24);
        const Ixy = v128.load32_splat(o, 28), Ixz = v128.load32_splat(o, 32), Iyz = v128.load32_splat(o, 36);
        const Idx = f32x4.add(f32x4.add(f32x4.mul(Ixx, dx), f32x4.mul(Ixy, dy)), f32x4.mul(Ixz, dz));
        const Idy = f32x4.add(f32x4.add(f32x4.mul(Ixy, dx), f32x4.mul(Iyy, dy)), f32x4.mul(Iyz, dz));
        const Idz = f32x4.add(f32x4.add(f32x4.mul(Ixz, dx), f32x4.mul(Iyz, dy)), f32x4.mul(Izz, dz));
        const dId = f32x4.add(f32x4.add(f32x4.mul(dx, Idx), f32x4.mul(dy, Idy)), f32x4.mul(dz, Idz));
        // M / s^3 + 7.5 d.I.d / s^7 - 1.5 tr(I) / s^5, as in the JS loops (fast/newton.ts).
        const radial = f32x4.sub(
          f32x4.add(f32x4.mul(v128.load32_splat(o, 12), inv3), f32x4.mul(f32x4.mul(f32x4.mul(seven5, dId), inv5), inv2)),
          f32x4.mul(v128.load32_splat(o, 40), inv5),
        );
        const q = f32x4.mul(three, inv5);
        ax = f32x4.add(ax, f32x4.sub(f32x4.mul(radial, dx), f32x4.mul(q, Idx)));
        ay = f32x4.add(ay, f32x4.sub(f32x4.mul(radial, dy), f32x4.mul(q, Idy)));
        az = f32x4.add(az, f32x4.sub(f32x4.mul(radial, dz), f32x4.mul(q, Idz)));
      }
      X0 = f64x2.add(X0, f64x2.promote_low_f32x4(ax)); X1 = f64x2.add(X1, high(ax));
      Y0 = f64x2.add(Y0, f64x2.promote_low_f32x4(ay)); Y1 = f64x2.add(Y1, high(ay));
      Z0 = f64x2.add(Z0, f64x2.promote_low_f32x4(az)); Z1 = f64x2.add(Z1, high(az));
    }
    const b = <usize>(i - from) << 3;
    const left = to - i;
    store<f64>(ox + b, f64x2.extract_lane(X0, 0)); store<f64>(oy + b, f64x2.extract_lane(Y0, 0)); store<f64>(oz + b, f64x2.extract_lane(Z0, 0));
    if (left > 1) { store<f64>(ox + b, f64x2.extract_lane(X0, 1), 8); store<f64>(oy + b, f64x2.extract_lane(Y0, 1), 8); store<f64>(oz + b, f64x2.extract_lane(Z0, 1), 8); }
    if (left > 2) { store<f64>(ox + b, f64x2.extract_lane(X1, 0), 16); store<f64>(oy + b, f64x2.extract_lane(Y1, 0), 16); store<f64>(oz + b, f64x2.extract_lane(Z1, 0), 16); }
    if (left > 3) { store<f64>(ox + b, f64x2.extract_lane(X1, 1), 24); store<f64>(oy + b, f64x2.extract_lane(Y1, 1), 24); store<f64>(oz + b, f64x2.extract_lane(Z1, 1), 24); }
  }
}

/** First byte the caller may use for its arrays. */
export function heapBase(): usize {
  return (__heap_base + 15) & ~15;
}
