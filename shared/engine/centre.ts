import type { Sources } from './state';
import type { Vector3 } from './diagnostics';

// Module-local alias: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { sqrt, min, max, ceil } = Math;

/** Each pass keeps the particles inside a sphere 2.5% smaller than the last (Power et al. 2003; from memory). */
const SHRINK = 0.975;
/**
 * The search stops once the sphere holds fewer than min(1000, 1% of N)
 * particles (Power et al. 2003; from memory), but never fewer than 100, our own
 * floor so that small runs do not end on a handful of particles.
 */
const STOP_MAX = 1000;
const STOP_FRACTION = 0.01;
const STOP_FLOOR = 100;

export interface DensityCentre extends Vector3 {
  /** Mass-weighted mean velocity of the particles in the final sphere, km/s (zero when no velocities were given). */
  vx: number;
  vy: number;
  vz: number;
  /** Radius of the final sphere, kpc, and how many particles it holds. */
  radius_kpc: number;
  count: number;
}

/** Particles the shrinking-sphere search ends on, for n particles. */
export const densityCentreCount = (n: number): number => min(n, max(STOP_FLOOR, min(STOP_MAX, ceil(STOP_FRACTION * n))));

/**
 * Density centre by shrinking spheres (Power et al. 2003, from memory): start
 * from the centre of mass and a sphere holding every particle, then repeatedly
 * shrink the sphere by 2.5% about the centre of mass of the particles inside
 * the previous one. Far particles, which drag the centre of mass, drop out in
 * the first passes, so the result sits on the densest part of the system.
 * Each pass only looks at the particles the previous one kept, copied together
 * in their original order (the sums, and so the result, are those of a pass
 * over the whole set); a pass that drops nobody leaves the centre where it was,
 * so the passes after it that would drop nobody either are skipped outright.
 */
export function densityCentre(p: Sources, velocities?: { vx: Float64Array; vy: Float64Array; vz: Float64Array }): DensityCentre {
  const n = p.m.length;
  const stop = densityCentreCount(n);
  // Two sets of buffers, the kept particles copied from one into the other: the last sphere's stay whole when a pass breaks off.
  let keep = new Uint32Array(n), x = Float64Array.from(p.x), y = Float64Array.from(p.y), z = Float64Array.from(p.z), m = Float64Array.from(p.m);
  let nKeep = new Uint32Array(n), nx = new Float64Array(n), ny = new Float64Array(n), nz = new Float64Array(n), nm = new Float64Array(n);
  for (let i = 0; i < n; i++) keep[i] = i;
  let count = n;
  let c = massCentre(x, y, z, m, count);
  let r2max = 0;
  for (let k = 0; k < count; k++) r2max = max(r2max, dist2(x[k], y[k], z[k], c));
  let radius = sqrt(r2max);
  while (count > stop && radius > 0) {
    const shrunk = radius * SHRINK, s2 = shrunk * shrunk;
    // Below the smallest double the sphere shrinks no more (particles all at one point): the search ends.
    if (!(shrunk < radius)) break;
    const cx = c.x, cy = c.y, cz = c.z;
    // The kept particles' centre of mass is summed as they are kept, in the order a pass over them would.
    let kept = 0, keptMax = 0, M = 0, sx = 0, sy = 0, sz = 0;
    for (let k = 0; k < count; k++) {
      const xk = x[k], yk = y[k], zk = z[k];
      const dx = xk - cx, dy = yk - cy, dz = zk - cz;
      const d2 = dx * dx + dy * dy + dz * dz;
      if (!(d2 <= s2)) continue;
      const mk = m[k];
      keptMax = max(keptMax, d2);
      M += mk; sx += mk * xk; sy += mk * yk; sz += mk * zk;
      nKeep[kept] = keep[k]; nx[kept] = xk; ny[kept] = yk; nz[kept] = zk; nm[kept] = mk;
      kept++;
    }
    if (kept < stop) break; // the last sphere that still held enough particles is the answer
    radius = shrunk;
    if (kept < count) {
      const tk = keep, tx = x, ty = y, tz = z, tm = m;
      keep = nKeep; x = nx; y = ny; z = nz; m = nm;
      nKeep = tk; nx = tx; ny = ty; nz = tz; nm = tm;
      count = kept;
      c = M > 0 ? { x: sx / M, y: sy / M, z: sz / M } : { x: 0, y: 0, z: 0 };
      continue;
    }
    // Nobody dropped: the same particles (where they were), so the same centre; skip the spheres that would still hold them all.
    for (let s = radius * SHRINK; s < radius && keptMax <= s * s; s = radius * SHRINK) radius = s;
  }
  let M = 0, vx = 0, vy = 0, vz = 0;
  if (velocities) {
    for (let k = 0; k < count; k++) {
      const i = keep[k], mi = p.m[i];
      M += mi; vx += mi * velocities.vx[i]; vy += mi * velocities.vy[i]; vz += mi * velocities.vz[i];
    }
  }
  return { ...c, vx: M > 0 ? vx / M : 0, vy: M > 0 ? vy / M : 0, vz: M > 0 ? vz / M : 0, radius_kpc: radius, count };
}

function massCentre(x: Float64Array, y: Float64Array, z: Float64Array, m: Float64Array, count: number): Vector3 {
  let M = 0, sx = 0, sy = 0, sz = 0;
  for (let k = 0; k < count; k++) {
    const mk = m[k];
    M += mk; sx += mk * x[k]; sy += mk * y[k]; sz += mk * z[k];
  }
  return M > 0 ? { x: sx / M, y: sy / M, z: sz / M } : { x: 0, y: 0, z: 0 };
}

function dist2(x: number, y: number, z: number, c: Vector3): number {
  const dx = x - c.x, dy = y - c.y, dz = z - c.z;
  return dx * dx + dy * dy + dz * dz;
}
