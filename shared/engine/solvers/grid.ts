import FFT from 'fft.js';
import type { Points, Sources } from '../state';
import { G } from '../units';

// Module-local aliases: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { floor, min, sqrt } = Math;

/**
 * Potential at the centre of a uniform cube of unit side and unit density, in
 * units of G (2.3800772, from memory): the self-term of the sampled Green's
 * function, so mass deposited on a node acts on that node as a cell-sized cube.
 */
const CUBE_CENTRE_POTENTIAL = 2.3800772;

/**
 * A cubic grid of n^3 nodes spaced h apart: node (i, j, k) sits at
 * (x0 + i h, y0 + j h, z0 + k h) and is element (i n + j) n + k of a grid array.
 */
export interface GridGeometry {
  n: number;
  h: number;
  x0: number;
  y0: number;
  z0: number;
}

/** Components of a vector field on the nodes. */
export interface GridVectors {
  x: Float64Array;
  y: Float64Array;
  z: Float64Array;
}

export const allocateGridVectors = (n: number): GridVectors => ({
  x: new Float64Array(n * n * n), y: new Float64Array(n * n * n), z: new Float64Array(n * n * n),
});

/** Cloud-in-cell position of a point: lower node index and weight of the upper node per axis; null outside the node cloud. */
function cicCell(g: GridGeometry, px: number, py: number, pz: number, out: Float64Array): boolean {
  const u = (px - g.x0) / g.h, v = (py - g.y0) / g.h, w = (pz - g.z0) / g.h;
  const last = g.n - 1;
  if (!(u >= 0 && u <= last && v >= 0 && v <= last && w >= 0 && w <= last)) return false;
  // A point on the last node uses the cell below it with weight 1 on its upper corner.
  const i = min(floor(u), last - 1), j = min(floor(v), last - 1), k = min(floor(w), last - 1);
  out[0] = i; out[1] = j; out[2] = k; out[3] = u - i; out[4] = v - j; out[5] = w - k;
  return true;
}

/**
 * Cloud-in-cell deposit (Hockney & Eastwood 1981): each source's mass is shared
 * among the eight nodes around it, trilinearly. Writes node masses (Msun) and
 * returns for each source whether it lies inside the node cloud (outside ones are left out).
 */
export function depositMass(g: GridGeometry, src: Sources, mass: Float64Array, inside: Uint8Array): void {
  mass.fill(0);
  const n = g.n, c = new Float64Array(6);
  for (let p = 0; p < src.m.length; p++) {
    if (!cicCell(g, src.x[p], src.y[p], src.z[p], c)) { inside[p] = 0; continue; }
    inside[p] = 1;
    const i = c[0], j = c[1], k = c[2], fx = c[3], fy = c[4], fz = c[5], m = src.m[p];
    const b = (i * n + j) * n + k;
    const m0 = m * (1 - fx), m1 = m * fx;
    const a00 = (1 - fy) * (1 - fz), a01 = (1 - fy) * fz, a10 = fy * (1 - fz), a11 = fy * fz;
    mass[b] += m0 * a00; mass[b + 1] += m0 * a01; mass[b + n] += m0 * a10; mass[b + n + 1] += m0 * a11;
    const b1 = b + n * n;
    mass[b1] += m1 * a00; mass[b1 + 1] += m1 * a01; mass[b1 + n] += m1 * a10; mass[b1 + n + 1] += m1 * a11;
  }
}

/**
 * Cloud-in-cell interpolation of a node field to points, the adjoint of the
 * deposit (so a particle feels no force from its own deposit under a symmetric
 * Green's function and central differences). Writes out[p] for points inside
 * the node cloud; returns a flag per point.
 */
export function interpolateVectors(g: GridGeometry, f: GridVectors, pts: Points, ox: Float64Array, oy: Float64Array, oz: Float64Array, inside: Uint8Array): void {
  const n = g.n, c = new Float64Array(6);
  for (let p = 0; p < pts.x.length; p++) {
    if (!cicCell(g, pts.x[p], pts.y[p], pts.z[p], c)) { inside[p] = 0; continue; }
    inside[p] = 1;
    const i = c[0], j = c[1], k = c[2], fx = c[3], fy = c[4], fz = c[5];
    const b = (i * n + j) * n + k, b1 = b + n * n;
    const w000 = (1 - fx) * (1 - fy) * (1 - fz), w001 = (1 - fx) * (1 - fy) * fz, w010 = (1 - fx) * fy * (1 - fz), w011 = (1 - fx) * fy * fz;
    const w100 = fx * (1 - fy) * (1 - fz), w101 = fx * (1 - fy) * fz, w110 = fx * fy * (1 - fz), w111 = fx * fy * fz;
    const at = (a: Float64Array) =>
      w000 * a[b] + w001 * a[b + 1] + w010 * a[b + n] + w011 * a[b + n + 1] +
      w100 * a[b1] + w101 * a[b1 + 1] + w110 * a[b1 + n] + w111 * a[b1 + n + 1];
    ox[p] = at(f.x); oy[p] = at(f.y); oz[p] = at(f.z);
  }
}

/**
 * d/dx along one axis at node idx (position pos of n, stride s): fourth-order
 * central differences inside, second-order central one node from a face, and
 * second-order one-sided (three nodes) on the faces.
 */
function derivative(f: Float64Array, idx: number, pos: number, n: number, s: number, h: number): number {
  if (pos >= 2 && pos <= n - 3) return (8 * (f[idx + s] - f[idx - s]) - (f[idx + 2 * s] - f[idx - 2 * s])) / (12 * h);
  if (pos === 0) return (4 * f[idx + s] - 3 * f[idx] - f[idx + 2 * s]) / (2 * h);
  if (pos === n - 1) return (3 * f[idx] - 4 * f[idx - s] + f[idx - 2 * s]) / (2 * h);
  return (f[idx + s] - f[idx - s]) / (2 * h);
}

/** g = -grad(phi) on the nodes (see `derivative` for the stencils). */
export function negativeGradient(g: GridGeometry, phi: Float64Array, out: GridVectors): void {
  const n = g.n;
  const strides = [n * n, n, 1];
  const comps = [out.x, out.y, out.z];
  for (let axis = 0; axis < 3; axis++) {
    const s = strides[axis], o = comps[axis];
    for (let idx = 0; idx < phi.length; idx++) o[idx] = -derivative(phi, idx, floor(idx / s) % n, n, s, g.h);
  }
}

/** div(w) at interior nodes (stencils as in `derivative`); zero on the faces (no source is placed beyond the interior). */
export function divergence(g: GridGeometry, w: GridVectors, out: Float64Array): void {
  const n = g.n, nn = n * n, h = g.h;
  out.fill(0);
  for (let i = 1; i < n - 1; i++) {
    for (let j = 1; j < n - 1; j++) {
      for (let k = 1; k < n - 1; k++) {
        const idx = (i * n + j) * n + k;
        out[idx] = derivative(w.x, idx, i, n, nn, h) + derivative(w.y, idx, j, n, n, h) + derivative(w.z, idx, k, n, 1, h);
      }
    }
  }
}

/**
 * Isolated Poisson solver on an n^3 node grid (n a power of two): the node
 * masses are convolved with the free-space Green's function -G/r (optionally
 * softened) sampled on the nodes, by FFT over a grid doubled in every direction and zero-padded
 * (the method of Hockney & Eastwood 1981, from memory), so no periodic images
 * act. Transforms run line by line, skip lines known to be zero and keep half
 * the spectrum along z (the input is real), so the working array holds
 * n * 2n * (n + 1) complex values rather than (2n)^3.
 */
export class IsolatedPoisson {
  readonly n: number;
  /** Transform of 1/r (unit spacing) on the doubled grid, window divided out; real and even, so (n+1)^3 values hold it. */
  readonly plain: Float64Array;
  private readonly work: Float64Array;
  private readonly fft: FFT;
  private readonly a: Float64Array;
  private readonly b: Float64Array;

  constructor(n: number) {
    if (!(n >= 2 && (n & (n - 1)) === 0)) throw new Error(`grid size must be a power of two, got ${n}`);
    this.n = n;
    const m = 2 * n;
    this.fft = new FFT(m);
    this.a = new Float64Array(2 * m);
    this.b = new Float64Array(2 * m);
    this.work = new Float64Array(n * m * (n + 1) * 2);
    this.plain = this.kernel(0);
  }

  /**
   * Transform of the Plummer-softened kernel 1/sqrt(r^2 + e^2), e in node spacings (0: plain
   * 1/r). The self-term blends the cube's 1/r average with 1/e, so it tends to each in its limit.
   * With `deconvolve` the cloud-in-cell window is divided out (see below).
   * The kernel is even in each axis, so each 1-D transform maps a half line [0, n] to a real half line [0, n].
   */
  kernel(e: number, deconvolve = true): Float64Array {
    const n = this.n, m = 2 * n, s = n + 1, e2 = e * e;
    const k = new Float64Array(s * s * s);
    for (let i = 0; i <= n; i++) for (let j = 0; j <= n; j++) for (let l = 0; l <= n; l++) {
      const r2 = i * i + j * j + l * l;
      k[(i * s + j) * s + l] = r2 === 0 ? 1 / sqrt(e2 + 1 / (CUBE_CENTRE_POTENTIAL * CUBE_CENTRE_POTENTIAL)) : 1 / sqrt(r2 + e2);
    }
    const { a, b } = this;
    const strides = [s * s, s, 1];
    for (let axis = 0; axis < 3; axis++) {
      const st = strides[axis];
      for (let base = 0; base < k.length; base++) {
        if (floor(base / st) % s !== 0) continue; // one line per start point of this axis
        for (let q = 0; q < m; q++) { a[2 * q] = k[base + min(q, m - q) * st]; a[2 * q + 1] = 0; }
        this.fft.transform(b, a);
        for (let q = 0; q <= n; q++) k[base + q * st] = b[2 * q];
      }
    }
    if (!deconvolve) return k;
    // Divide out the cloud-in-cell window, sinc^2(k h / 2) per axis, once: a common-practice
    // correction that undoes the smoothing of the deposit (first solve) or of the
    // interpolation that follows (second solve), so fields stay sharp a few cells from a mass.
    const window = new Float64Array(s);
    for (let q = 0; q <= n; q++) {
      const x = (Math.PI * q) / m;
      window[q] = q === 0 ? 1 : (Math.sin(x) / x) ** 2;
    }
    for (let i = 0; i <= n; i++) for (let j = 0; j <= n; j++) for (let l = 0; l <= n; l++) k[(i * s + j) * s + l] /= window[i] * window[j] * window[l];
    return k;
  }

  /** Potential per unit mass, (km/s)^2, at the nodes due to node masses (Msun), for node spacing h (kpc), with a kernel from `kernel`. */
  potential(mass: Float64Array, h: number, out: Float64Array, green: Float64Array = this.plain): void {
    const n = this.n, m = 2 * n, s = n + 1;
    const { work: W, a, b, fft } = this;
    // W holds x < n, every y (ky), and kz = 0..n: the masses are real, so the
    // value at 2n - kz is the conjugate of that at kz and is rebuilt at the end.
    const rowY = s * 2, rowX = m * rowY;
    W.fill(0);
    // z lines of the occupied octant.
    for (let x = 0; x < n; x++) for (let y = 0; y < n; y++) {
      a.fill(0);
      const src = (x * n + y) * n;
      for (let z = 0; z < n; z++) a[2 * z] = mass[src + z];
      fft.transform(b, a);
      W.set(b.subarray(0, rowY), x * rowX + y * rowY);
    }
    // y lines (the upper half in y is still zero on input).
    for (let x = 0; x < n; x++) for (let kz = 0; kz <= n; kz++) {
      const base = x * rowX + 2 * kz;
      a.fill(0);
      for (let y = 0; y < n; y++) { a[2 * y] = W[base + y * rowY]; a[2 * y + 1] = W[base + y * rowY + 1]; }
      fft.transform(b, a);
      for (let y = 0; y < m; y++) { W[base + y * rowY] = b[2 * y]; W[base + y * rowY + 1] = b[2 * y + 1]; }
    }
    // x lines: forward, multiply by the kernel's transform, back; only x < n is kept.
    for (let ky = 0; ky < m; ky++) for (let kz = 0; kz <= n; kz++) {
      const base = ky * rowY + 2 * kz;
      const gBase = min(ky, m - ky) * s + kz;
      a.fill(0);
      for (let x = 0; x < n; x++) { a[2 * x] = W[base + x * rowX]; a[2 * x + 1] = W[base + x * rowX + 1]; }
      fft.transform(b, a);
      for (let kx = 0; kx < m; kx++) {
        const gk = green[min(kx, m - kx) * s * s + gBase];
        b[2 * kx] *= gk; b[2 * kx + 1] *= gk;
      }
      fft.inverseTransform(a, b);
      for (let x = 0; x < n; x++) { W[base + x * rowX] = a[2 * x]; W[base + x * rowX + 1] = a[2 * x + 1]; }
    }
    for (let x = 0; x < n; x++) for (let kz = 0; kz <= n; kz++) {
      const base = x * rowX + 2 * kz;
      for (let y = 0; y < m; y++) { a[2 * y] = W[base + y * rowY]; a[2 * y + 1] = W[base + y * rowY + 1]; }
      fft.inverseTransform(b, a);
      for (let y = 0; y < n; y++) { W[base + y * rowY] = b[2 * y]; W[base + y * rowY + 1] = b[2 * y + 1]; }
    }
    const scale = -G / h;
    for (let x = 0; x < n; x++) for (let y = 0; y < n; y++) {
      const at = x * rowX + y * rowY;
      for (let q = 0; q < rowY; q++) a[q] = W[at + q];
      for (let kz = n + 1; kz < m; kz++) { a[2 * kz] = W[at + 2 * (m - kz)]; a[2 * kz + 1] = -W[at + 2 * (m - kz) + 1]; }
      fft.inverseTransform(b, a);
      const dst = (x * n + y) * n;
      for (let z = 0; z < n; z++) out[dst + z] = scale * b[2 * z];
    }
  }
}
