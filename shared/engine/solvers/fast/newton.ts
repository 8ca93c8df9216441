// Softened Newton's own loops: the WebAssembly SIMD direct sum (mixed precision,
// directWasm.ts) where it loads, else two targets per pass over the sources; the tree's self-field walked and
// summed group by group in WebAssembly SIMD (mixed precision, treeWasm.ts) where
// it loads, else its lists summed at two targets per pass. Each is the generic
// loops' arithmetic for phi = 1/s written out with the kernel's constants read
// once: no calls, no branch on the law.
import { G as G_UNITS } from '../../units';
import { wasmDirect } from '../directWasm';
import { putGroupField, putGroupPotential, wasmTree } from '../treeWasm';
import { MOMENTS, type PairLoops } from '../types';

// Module-local alias: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { sqrt } = Math;
// A module-local copy of G for the same reason: transpiled to CommonJS (tsx, Jest)
// an imported binding is a getter on the units module, called once per target.
const G = G_UNITS;

export const newtonLoops: PairLoops = {
  pull(x, y, z, m, count, xi, yi, zi, eps2, _p, acc) {
    let sx = 0, sy = 0, sz = 0;
    for (let j = 0; j < count; j++) {
      const dx = x[j] - xi, dy = y[j] - yi, dz = z[j] - zi;
      const r2 = dx * dx + dy * dy + dz * dz;
      if (r2 === 0) continue; // a particle does not act on itself
      const inv = 1 / sqrt(r2 + eps2);
      const f = m[j] * inv * inv * inv;
      sx += f * dx; sy += f * dy; sz += f * dz;
    }
    acc[0] += sx; acc[1] += sy; acc[2] += sz;
  },

  potential(x, y, z, m, count, xi, yi, zi, eps2) {
    let sp = 0;
    for (let j = 0; j < count; j++) {
      const dx = x[j] - xi, dy = y[j] - yi, dz = z[j] - zi;
      const r2 = dx * dx + dy * dy + dz * dz;
      if (r2 === 0) continue;
      sp += m[j] / sqrt(r2 + eps2);
    }
    return sp;
  },

  // D1 = -s^-3, D2 = 3 s^-5, D3 = -15 s^-7 in the generic expansion.
  cellPull(cl, cells, xi, yi, zi, eps2, _p, acc) {
    let sx = 0, sy = 0, sz = 0;
    for (let k = 0, n = MOMENTS * cells; k < n; k += MOMENTS) {
      const dx = cl[k] - xi, dy = cl[k + 1] - yi, dz = cl[k + 2] - zi, M = cl[k + 3];
      const inv = 1 / sqrt(dx * dx + dy * dy + dz * dz + eps2);
      const inv2 = inv * inv, inv3 = inv2 * inv, inv5 = inv3 * inv2;
      const Ixx = cl[k + 4], Iyy = cl[k + 5], Izz = cl[k + 6], Ixy = cl[k + 7], Ixz = cl[k + 8], Iyz = cl[k + 9];
      const Idx = Ixx * dx + Ixy * dy + Ixz * dz, Idy = Ixy * dx + Iyy * dy + Iyz * dz, Idz = Ixz * dx + Iyz * dy + Izz * dz;
      const radial = M * inv3 + 7.5 * (dx * Idx + dy * Idy + dz * Idz) * inv5 * inv2 - 1.5 * (Ixx + Iyy + Izz) * inv5;
      const q = 3 * inv5;
      sx += radial * dx - q * Idx; sy += radial * dy - q * Idy; sz += radial * dz - q * Idz;
    }
    acc[0] += sx; acc[1] += sy; acc[2] += sz;
  },

  cellPotential(cl, cells, xi, yi, zi, eps2) {
    let sp = 0;
    for (let k = 0, n = MOMENTS * cells; k < n; k += MOMENTS) {
      const dx = cl[k] - xi, dy = cl[k + 1] - yi, dz = cl[k + 2] - zi, M = cl[k + 3];
      const inv = 1 / sqrt(dx * dx + dy * dy + dz * dz + eps2);
      const inv2 = inv * inv, inv3 = inv2 * inv;
      const Ixx = cl[k + 4], Iyy = cl[k + 5], Izz = cl[k + 6], Ixy = cl[k + 7], Ixz = cl[k + 8], Iyz = cl[k + 9];
      const dId = dx * (Ixx * dx + Ixy * dy + Ixz * dz) + dy * (Ixy * dx + Iyy * dy + Iyz * dz) + dz * (Ixz * dx + Iyz * dy + Izz * dz);
      sp += M * inv + 1.5 * dId * inv3 * inv2 - 0.5 * (Ixx + Iyy + Izz) * inv3;
    }
    return sp;
  },

  // With eps > 0 only: the paired loops below rely on a coincident pair adding exactly +0 to the field.
  directField(sources, targets, eps2, p, iStart, iEnd, out) {
    if (!(eps2 > 0)) return 0;
    const { ax, ay, az } = out;
    const { x, y, z, m } = sources;
    const n = m.length;
    const tx = targets.x, ty = targets.y, tz = targets.z;
    const wasm = wasmDirect();
    if (wasm?.field(sources, targets, eps2, iStart, iEnd - iStart, ax, ay, az)) {
      const acc = new Float64Array(3);
      for (let k = iStart; k < iEnd; k++) {
        if (Number.isFinite(ax[k] + ay[k] + az[k])) {
          ax[k] *= G; ay[k] *= G; az[k] *= G;
          continue;
        }
        // Out of float32's reach: this target's float64 sum instead.
        acc[0] = 0; acc[1] = 0; acc[2] = 0;
        newtonLoops.pull(x, y, z, m, n, tx[k], ty[k], tz[k], eps2, p, acc);
        ax[k] = G * acc[0]; ay[k] = G * acc[1]; az[k] = G * acc[2];
      }
      return iEnd - iStart;
    }
    const even = (iEnd - iStart) & ~1;
    // Two targets per pass over the sources: each source is loaded once for both. With eps > 0 a
    // coincident pair adds exactly +0 (d = 0 times a finite factor), so the loop needs no test for it.
    for (let i = iStart; i < iStart + even; i += 2) {
      const xa = tx[i], ya = ty[i], za = tz[i], xb = tx[i + 1], yb = ty[i + 1], zb = tz[i + 1];
      let sxa = 0, sya = 0, sza = 0, sxb = 0, syb = 0, szb = 0;
      for (let j = 0; j < n; j++) {
        const xj = x[j], yj = y[j], zj = z[j], mj = m[j];
        const dxa = xj - xa, dya = yj - ya, dza = zj - za;
        const dxb = xj - xb, dyb = yj - yb, dzb = zj - zb;
        const ia = 1 / sqrt(dxa * dxa + dya * dya + dza * dza + eps2);
        const ib = 1 / sqrt(dxb * dxb + dyb * dyb + dzb * dzb + eps2);
        const fa = mj * ia * ia * ia, fb = mj * ib * ib * ib;
        sxa += fa * dxa; sya += fa * dya; sza += fa * dza;
        sxb += fb * dxb; syb += fb * dyb; szb += fb * dzb;
      }
      ax[i] = G * sxa; ay[i] = G * sya; az[i] = G * sza;
      ax[i + 1] = G * sxb; ay[i + 1] = G * syb; az[i + 1] = G * szb;
    }
    return even;
  },

  directPotential(sources, targets, eps2, p, iStart, iEnd, out) {
    if (!(eps2 > 0)) return 0;
    const { x, y, z, m } = sources;
    const n = m.length;
    const tx = targets.x, ty = targets.y, tz = targets.z;
    const wasm = wasmDirect();
    if (wasm?.potentialSums(sources, targets, eps2, iStart, iEnd - iStart, out)) {
      for (let k = iStart; k < iEnd; k++) {
        // A target out of float32's reach is redone in float64.
        out[k] = -G * (Number.isFinite(out[k]) ? out[k] : newtonLoops.potential(x, y, z, m, n, tx[k], ty[k], tz[k], eps2, p));
      }
      return iEnd - iStart;
    }
    const even = (iEnd - iStart) & ~1;
    // Two targets per pass, as in the field; here a coincident pair must be skipped (it would add m / eps).
    for (let i = iStart; i < iStart + even; i += 2) {
      const xa = tx[i], ya = ty[i], za = tz[i], xb = tx[i + 1], yb = ty[i + 1], zb = tz[i + 1];
      let pa = 0, pb = 0;
      for (let j = 0; j < n; j++) {
        const xj = x[j], yj = y[j], zj = z[j], mj = m[j];
        const dxa = xj - xa, dya = yj - ya, dza = zj - za;
        const dxb = xj - xb, dyb = yj - yb, dzb = zj - zb;
        const r2a = dxa * dxa + dya * dya + dza * dza, r2b = dxb * dxb + dyb * dyb + dzb * dzb;
        if (r2a !== 0) pa += mj / sqrt(r2a + eps2);
        if (r2b !== 0) pb += mj / sqrt(r2b + eps2);
      }
      out[i] = -G * pa; out[i + 1] = -G * pb;
    }
    return even;
  },

  // With eps > 0 only: a target's own slot must add exactly zero.
  treeGroupField(tree, targets, from, to, theta2, few, eps2, _p, out) {
    const wasm = eps2 > 0 ? wasmTree() : null;
    const sums = wasm?.groupField(tree, targets, from, to, theta2, few, eps2);
    if (!sums) return false;
    putGroupField(tree, targets, from, to, sums, out);
    return true;
  },

  treeGroupPotential(tree, targets, from, to, theta2, few, eps2, _p, out) {
    const wasm = eps2 > 0 ? wasmTree() : null;
    const sums = wasm?.groupPotential(tree, targets, from, to, theta2, few, eps2);
    if (!sums) return false;
    putGroupPotential(tree, targets, from, to, sums, out);
    return true;
  },

  listPullTwo(list, xa, ya, za, xb, yb, zb, eps2, _p, acc) {
    const { px, py, pz, pm, cl } = list;
    let ax = 0, ay = 0, az = 0, bx = 0, by = 0, bz = 0;
    for (let j = 0, n = list.particles; j < n; j++) {
      const sx = px[j], sy = py[j], sz = pz[j], m = pm[j];
      const dxa = sx - xa, dya = sy - ya, dza = sz - za, dxb = sx - xb, dyb = sy - yb, dzb = sz - zb;
      const ra = dxa * dxa + dya * dya + dza * dza, rb = dxb * dxb + dyb * dyb + dzb * dzb;
      // A particle does not act on itself.
      if (ra !== 0) {
        const inv = 1 / sqrt(ra + eps2), f = m * inv * inv * inv;
        ax += f * dxa; ay += f * dya; az += f * dza;
      }
      if (rb !== 0) {
        const inv = 1 / sqrt(rb + eps2), f = m * inv * inv * inv;
        bx += f * dxb; by += f * dyb; bz += f * dzb;
      }
    }
    let cax = 0, cay = 0, caz = 0, cbx = 0, cby = 0, cbz = 0;
    for (let k = 0, n = MOMENTS * list.cellCount; k < n; k += MOMENTS) {
      const gx = cl[k], gy = cl[k + 1], gz = cl[k + 2], M = cl[k + 3];
      const Ixx = cl[k + 4], Iyy = cl[k + 5], Izz = cl[k + 6], Ixy = cl[k + 7], Ixz = cl[k + 8], Iyz = cl[k + 9];
      const tr = 1.5 * (Ixx + Iyy + Izz);
      const dxa = gx - xa, dya = gy - ya, dza = gz - za, dxb = gx - xb, dyb = gy - yb, dzb = gz - zb;
      const ia = 1 / sqrt(dxa * dxa + dya * dya + dza * dza + eps2), ib = 1 / sqrt(dxb * dxb + dyb * dyb + dzb * dzb + eps2);
      const ia2 = ia * ia, ia3 = ia2 * ia, ia5 = ia3 * ia2, ib2 = ib * ib, ib3 = ib2 * ib, ib5 = ib3 * ib2;
      const Ixa = Ixx * dxa + Ixy * dya + Ixz * dza, Iya = Ixy * dxa + Iyy * dya + Iyz * dza, Iza = Ixz * dxa + Iyz * dya + Izz * dza;
      const Ixb = Ixx * dxb + Ixy * dyb + Ixz * dzb, Iyb = Ixy * dxb + Iyy * dyb + Iyz * dzb, Izb = Ixz * dxb + Iyz * dyb + Izz * dzb;
      const ra = M * ia3 + 7.5 * (dxa * Ixa + dya * Iya + dza * Iza) * ia5 * ia2 - tr * ia5, qa = 3 * ia5;
      const rb = M * ib3 + 7.5 * (dxb * Ixb + dyb * Iyb + dzb * Izb) * ib5 * ib2 - tr * ib5, qb = 3 * ib5;
      cax += ra * dxa - qa * Ixa; cay += ra * dya - qa * Iya; caz += ra * dza - qa * Iza;
      cbx += rb * dxb - qb * Ixb; cby += rb * dyb - qb * Iyb; cbz += rb * dzb - qb * Izb;
    }
    acc[0] = ax + cax; acc[1] = ay + cay; acc[2] = az + caz;
    acc[3] = bx + cbx; acc[4] = by + cby; acc[5] = bz + cbz;
  },

  listPotentialTwo(list, xa, ya, za, xb, yb, zb, eps2, _p, acc) {
    const { px, py, pz, pm, cl } = list;
    let pa = 0, pb = 0;
    for (let j = 0, n = list.particles; j < n; j++) {
      const sx = px[j], sy = py[j], sz = pz[j];
      const dxa = sx - xa, dya = sy - ya, dza = sz - za, dxb = sx - xb, dyb = sy - yb, dzb = sz - zb;
      const ra = dxa * dxa + dya * dya + dza * dza, rb = dxb * dxb + dyb * dyb + dzb * dzb;
      if (ra !== 0) pa += pm[j] / sqrt(ra + eps2);
      if (rb !== 0) pb += pm[j] / sqrt(rb + eps2);
    }
    let ca = 0, cb = 0;
    for (let k = 0, n = MOMENTS * list.cellCount; k < n; k += MOMENTS) {
      const gx = cl[k], gy = cl[k + 1], gz = cl[k + 2], M = cl[k + 3];
      const Ixx = cl[k + 4], Iyy = cl[k + 5], Izz = cl[k + 6], Ixy = cl[k + 7], Ixz = cl[k + 8], Iyz = cl[k + 9];
      const tr = Ixx + Iyy + Izz;
      const dxa = gx - xa, dya = gy - ya, dza = gz - za, dxb = gx - xb, dyb = gy - yb, dzb = gz - zb;
      const ia = 1 / sqrt(dxa * dxa + dya * dya + dza * dza + eps2), ib = 1 / sqrt(dxb * dxb + dyb * dyb + dzb * dzb + eps2);
      const ia2 = ia * ia, ia3 = ia2 * ia, ib2 = ib * ib, ib3 = ib2 * ib;
      const dIa = dxa * (Ixx * dxa + Ixy * dya + Ixz * dza) + dya * (Ixy * dxa + Iyy * dya + Iyz * dza) + dza * (Ixz * dxa + Iyz * dya + Izz * dza);
      const dIb = dxb * (Ixx * dxb + Ixy * dyb + Ixz * dzb) + dyb * (Ixy * dxb + Iyy * dyb + Iyz * dzb) + dzb * (Ixz * dxb + Iyz * dyb + Izz * dzb);
      ca += M * ia + 1.5 * dIa * ia3 * ia2 - 0.5 * tr * ia3;
      cb += M * ib + 1.5 * dIb * ib3 * ib2 - 0.5 * tr * ib3;
    }
    acc[0] = pa + ca; acc[1] = pb + cb;
  },
};
