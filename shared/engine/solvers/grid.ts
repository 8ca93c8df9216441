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

/**
 * Threads that share a grid's work (the worker's pool lends them); without them one thread does it all.
 * A grid splits its work into passes separated by barriers, each a count of units (lines of nodes,
 * lines of a transform) that any thread may compute in any split, because each unit is computed
 * by the same code whichever thread takes it: the result is the same bits as one thread's.
 */
export interface GridThreads {
  /**
   * Working arrays of these lengths in memory every thread sees, after publishing `setup`, from which
   * each thread builds its own view of the grid; undefined when this host has no room for them.
   */
  open(setup: object, lengths: readonly number[]): Float64Array[] | undefined;
  /** Computes units [0, count) of `pass` across the threads (each calling its view's range) and returns when all are done. */
  run(pass: number, count: number): void;
}

/** Node lines (i, j) of a grid: the units of the node-wise passes below. */
export const nodeLines = (g: GridGeometry): number => g.n * g.n;

/** g = -grad(phi) on the nodes of lines [from, to) (see `derivative` for the stencils). */
export function negativeGradientLines(g: GridGeometry, phi: Float64Array, out: GridVectors, from: number, to: number): void {
  const n = g.n, nn = n * n, h = g.h;
  for (let line = from; line < to; line++) {
    const i = floor(line / n), j = line - i * n, base = line * n;
    for (let k = 0; k < n; k++) {
      const idx = base + k;
      out.x[idx] = -derivative(phi, idx, i, n, nn, h);
      out.y[idx] = -derivative(phi, idx, j, n, n, h);
      out.z[idx] = -derivative(phi, idx, k, n, 1, h);
    }
  }
}

/** div(w) at the interior nodes of lines [from, to) (stencils as in `derivative`); zero on the faces (no source is placed beyond the interior). */
export function divergenceLines(g: GridGeometry, w: GridVectors, out: Float64Array, from: number, to: number): void {
  const n = g.n, nn = n * n, h = g.h;
  for (let line = from; line < to; line++) {
    const i = floor(line / n), j = line - i * n, base = line * n;
    out[base] = 0;
    out[base + n - 1] = 0;
    const face = i === 0 || i === n - 1 || j === 0 || j === n - 1;
    for (let k = 1; k < n - 1; k++) {
      const idx = base + k;
      out[idx] = face ? 0 : derivative(w.x, idx, i, n, nn, h) + derivative(w.y, idx, j, n, n, h) + derivative(w.z, idx, k, n, 1, h);
    }
  }
}

/** Doubles of an isolated Poisson solve's working array for n nodes a side. */
export const poissonWorkLength = (n: number): number => n * 2 * n * (n + 1) * 2;
/** Doubles of a kernel's transform for n nodes a side. */
export const kernelLength = (n: number): number => (n + 1) ** 3;

/** The passes of one solve, in order, with a barrier between each: see `IsolatedPoisson.pass`. */
export const POISSON_PASSES = 5;
/** The passes of a kernel's transform, each of (n+1)^2 lines: see `IsolatedPoisson.kernelPass`. */
export const KERNEL_PASSES = 5;

/**
 * Isolated Poisson solver on an n^3 node grid (n a power of two): the node
 * masses are convolved with the free-space Green's function -G/r (optionally
 * softened) sampled on the nodes, by FFT over a grid doubled in every direction and zero-padded
 * (the method of Hockney & Eastwood 1981, from memory), so no periodic images
 * act. Transforms run line by line, skip lines known to be zero and keep half
 * the spectrum along z (the input is real), so the working array holds
 * n * 2n * (n + 1) complex values rather than (2n)^3. Each line is independent
 * of the others in its pass, so threads may share a pass, each with its own
 * solver over one shared working array.
 */
export class IsolatedPoisson {
  readonly n: number;
  private readonly fft: FFT;
  private readonly a: Float64Array;
  private readonly b: Float64Array;

  constructor(n: number, private readonly work: Float64Array = new Float64Array(poissonWorkLength(n))) {
    if (!(n >= 2 && (n & (n - 1)) === 0)) throw new Error(`grid size must be a power of two, got ${n}`);
    if (work.length !== poissonWorkLength(n)) throw new Error(`a ${n}-node solve needs ${poissonWorkLength(n)} doubles of work, got ${work.length}`);
    this.n = n;
    const m = 2 * n;
    this.fft = new FFT(m);
    this.a = new Float64Array(2 * m);
    this.b = new Float64Array(2 * m);
  }

  /**
   * Transform of the Plummer-softened kernel 1/sqrt(r^2 + e^2), e in node spacings (0: plain
   * 1/r), written into `k` (kernelLength(n) doubles), all passes in this thread (see `kernelPass`).
   */
  kernel(e: number, windowPower: number, k: Float64Array = new Float64Array(kernelLength(this.n))): Float64Array {
    const lines = (this.n + 1) ** 2;
    for (let p = 0; p < KERNEL_PASSES; p++) this.kernelPass(p, e, windowPower, k, 0, lines);
    return k;
  }

  /**
   * Lines [from, to) of the (n+1)^2 of pass `p` of a kernel's transform: 0 samples the kernel;
   * 1 to 3 transform along x, y, z; 4 divides out the cloud-in-cell window, sinc^2(k h / 2) per
   * axis, to the power `windowPower` (1: sinc^2 itself; 0: nothing).
   * The self-term blends the cube's 1/r average with 1/e, so it tends to each in its limit.
   * The kernel is even in each axis, so each 1-D transform maps a half line [0, n] to a real half line [0, n].
   */
  kernelPass(p: number, e: number, windowPower: number, k: Float64Array, from: number, to: number): void {
    const n = this.n, m = 2 * n, s = n + 1, e2 = e * e;
    if (p === 0) {
      for (let line = from; line < to; line++) {
        const i = floor(line / s), j = line - i * s;
        for (let l = 0; l <= n; l++) {
          const r2 = i * i + j * j + l * l;
          k[line * s + l] = r2 === 0 ? 1 / sqrt(e2 + 1 / (CUBE_CENTRE_POTENTIAL * CUBE_CENTRE_POTENTIAL)) : 1 / sqrt(r2 + e2);
        }
      }
    } else if (p <= 3) {
      const { a, b } = this;
      const st = p === 1 ? s * s : p === 2 ? s : 1;
      for (let line = from; line < to; line++) {
        const u = floor(line / s), v = line - u * s;
        const base = p === 1 ? u * s + v : p === 2 ? u * s * s + v : line * s;
        for (let q = 0; q < m; q++) { a[2 * q] = k[base + min(q, m - q) * st]; a[2 * q + 1] = 0; }
        this.fft.transform(b, a);
        for (let q = 0; q <= n; q++) k[base + q * st] = b[2 * q];
      }
    } else if (windowPower !== 0) {
      // Dividing out the cloud-in-cell window once (power 1) is a common-practice correction that
      // undoes the smoothing of the deposit, so fields stay sharp a few cells from a mass.
      const window = new Float64Array(s);
      for (let q = 0; q <= n; q++) {
        const x = (Math.PI * q) / m;
        window[q] = q === 0 ? 1 : (Math.sin(x) / x) ** (2 * windowPower);
      }
      for (let line = from; line < to; line++) {
        const i = floor(line / s), j = line - i * s;
        for (let l = 0; l <= n; l++) k[line * s + l] /= window[i] * window[j] * window[l];
      }
    }
  }

  /** Lines in pass `p` of a solve (0 to POISSON_PASSES - 1). */
  lines(p: number): number {
    const n = this.n;
    return p === 0 || p === 4 ? n * n : p === 2 ? 2 * n * (n + 1) : n * (n + 1);
  }

  /**
   * Lines [from, to) of pass `p` of the solve turning node masses (Msun) into the potential per
   * unit mass, (km/s)^2, at the nodes, for node spacing h (kpc), with a kernel from `kernel`:
   * 0: z lines forward, from `mass`; 1: y lines forward; 2: x lines forward, times the kernel, back;
   * 3: y lines back; 4: z lines back, into `out`.
   */
  pass(p: number, mass: Float64Array, h: number, out: Float64Array, green: Float64Array, from: number, to: number): void {
    const n = this.n, m = 2 * n, s = n + 1;
    const { work: W, a, b, fft } = this;
    // W holds x < n, every y (ky), and kz = 0..n: the masses are real, so the
    // value at 2n - kz is the conjugate of that at kz and is rebuilt at the end.
    // Every element is written by passes 0 and 1 before pass 2 reads it.
    const rowY = s * 2, rowX = m * rowY;
    if (p === 0) {
      // z lines (x, y) of the occupied octant.
      for (let line = from; line < to; line++) {
        a.fill(0);
        const src = line * n;
        for (let z = 0; z < n; z++) a[2 * z] = mass[src + z];
        fft.transform(b, a);
        const x = floor(line / n), y = line - x * n;
        W.set(b.subarray(0, rowY), x * rowX + y * rowY);
      }
    } else if (p === 1) {
      // y lines (x, kz); the upper half in y is still zero on input.
      for (let line = from; line < to; line++) {
        const x = floor(line / s), kz = line - x * s;
        const base = x * rowX + 2 * kz;
        a.fill(0);
        for (let y = 0; y < n; y++) { a[2 * y] = W[base + y * rowY]; a[2 * y + 1] = W[base + y * rowY + 1]; }
        fft.transform(b, a);
        for (let y = 0; y < m; y++) { W[base + y * rowY] = b[2 * y]; W[base + y * rowY + 1] = b[2 * y + 1]; }
      }
    } else if (p === 2) {
      // x lines (ky, kz): forward, multiply by the kernel's transform, back; only x < n is kept.
      for (let line = from; line < to; line++) {
        const ky = floor(line / s), kz = line - ky * s;
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
    } else if (p === 3) {
      for (let line = from; line < to; line++) {
        const x = floor(line / s), kz = line - x * s;
        const base = x * rowX + 2 * kz;
        for (let y = 0; y < m; y++) { a[2 * y] = W[base + y * rowY]; a[2 * y + 1] = W[base + y * rowY + 1]; }
        fft.inverseTransform(b, a);
        for (let y = 0; y < n; y++) { W[base + y * rowY] = b[2 * y]; W[base + y * rowY + 1] = b[2 * y + 1]; }
      }
    } else {
      const scale = -G / h;
      for (let line = from; line < to; line++) {
        const x = floor(line / n), y = line - x * n;
        const at = x * rowX + y * rowY;
        for (let q = 0; q < rowY; q++) a[q] = W[at + q];
        for (let kz = n + 1; kz < m; kz++) { a[2 * kz] = W[at + 2 * (m - kz)]; a[2 * kz + 1] = -W[at + 2 * (m - kz) + 1]; }
        fft.inverseTransform(b, a);
        const dst = line * n;
        for (let z = 0; z < n; z++) out[dst + z] = scale * b[2 * z];
      }
    }
  }

  /** The whole solve in this thread: potential per unit mass at the nodes due to node masses (see `pass`). */
  potential(mass: Float64Array, h: number, out: Float64Array, green: Float64Array): void {
    for (let p = 0; p < POISSON_PASSES; p++) this.pass(p, mass, h, out, green, 0, this.lines(p));
  }
}

/** Weights of the four nodes -1, 0, 1, 2 of cubic Lagrange interpolation at t in [0, 1]. */
function cubicWeights(t: number, w: Float64Array, at: number): void {
  w[at] = (-t * (t - 1) * (t - 2)) / 6;
  w[at + 1] = ((t + 1) * (t - 1) * (t - 2)) / 2;
  w[at + 2] = (-(t + 1) * t * (t - 2)) / 2;
  w[at + 3] = ((t + 1) * t * (t - 1)) / 6;
}

/**
 * Tricubic Lagrange interpolation of a node field to points (64 nodes each): exact for cubics,
 * so a field that bends on the scale of a few cells keeps its value, where the cloud-in-cell
 * weights would average it down. Writes out[p] for points at least one spacing inside the
 * node cloud (the stencil reaches one node below and two above); returns a flag per point.
 */
export function interpolateVectorsCubic(g: GridGeometry, f: GridVectors, pts: Points, ox: Float64Array, oy: Float64Array, oz: Float64Array, inside: Uint8Array): void {
  const n = g.n, nn = n * n, w = new Float64Array(12);
  for (let p = 0; p < pts.x.length; p++) {
    const u = (pts.x[p] - g.x0) / g.h, v = (pts.y[p] - g.y0) / g.h, s = (pts.z[p] - g.z0) / g.h;
    if (!(u >= 1 && u <= n - 2 && v >= 1 && v <= n - 2 && s >= 1 && s <= n - 2)) { inside[p] = 0; continue; }
    inside[p] = 1;
    const i = min(floor(u), n - 3), j = min(floor(v), n - 3), k = min(floor(s), n - 3);
    cubicWeights(u - i, w, 0); cubicWeights(v - j, w, 4); cubicWeights(s - k, w, 8);
    let sx = 0, sy = 0, sz = 0;
    for (let a = 0; a < 4; a++) {
      for (let b = 0; b < 4; b++) {
        const wab = w[a] * w[4 + b], row = (i - 1 + a) * nn + (j - 1 + b) * n + k - 1;
        for (let c = 0; c < 4; c++) {
          const wt = wab * w[8 + c];
          sx += wt * f.x[row + c]; sy += wt * f.y[row + c]; sz += wt * f.z[row + c];
        }
      }
    }
    ox[p] = sx; oy[p] = sy; oz[p] = sz;
  }
}
