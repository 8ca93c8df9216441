import type { DiskSpec, LawSpec } from '../../spec/runSpec';
import { modelAcceleration } from '../laws/registry';
import type { RngState } from '../rng';
import { isotropicDirection, normal, uniform, uniformOpen } from '../rng';
import { i0e, i1e, k0e, k1e } from '../special';
import type { ParticleState } from '../state';
import { G } from '../units';
import { hernquistModel, sampleHernquistRadius } from './hernquist';
import { combinedModel, type MassModel } from './massModel';
import type { Component } from './types';

// Module-local aliases: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { cos, sqrt, exp, log, PI } = Math;

/** Default cut at 10 scale lengths, which holds 99.95% of an exponential disk's mass (common practice). */
const DEFAULT_TRUNCATION_SCALE_LENGTHS = 10;
/** Toomre (1964): Q = sigma_R kappa / (3.36 G Sigma) for a stellar disk. */
export const TOOMRE_STELLAR = 3.36;

export const diskTruncation = (d: DiskSpec): number => d.truncationRadius_kpc ?? DEFAULT_TRUNCATION_SCALE_LENGTHS * d.scaleLength_kpc;

export const diskSurfaceDensity = (d: DiskSpec, R: number): number =>
  (d.mass_Msun / (2 * Math.PI * d.scaleLength_kpc ** 2)) * exp(-R / d.scaleLength_kpc);

/** Composite Simpson rule over [0, 1] with an even number of intervals. */
function simpson01(f: (t: number) => number, intervals: number): number {
  let sum = 0;
  for (let k = 0; k <= intervals; k++) sum += (k === 0 || k === intervals ? 1 : k % 2 ? 4 : 2) * f(k / intervals);
  return sum / (3 * intervals);
}

/**
 * In-plane pull of the Yukawa term of a thin exponential disk, per unit
 * alpha, by summing rings. The disk's thickness and the run's softening
 * smooth the kernel (s^2 = d^2 + z0^2 + eps^2): an approximation, stated in
 * the SPEC. Nodes cluster at the target radius, where the kernel peaks.
 */
function diskScreenedPull(d: DiskSpec, smoothing2: number, R: number, lambda: number): number {
  const Rt = diskTruncation(d);
  const ringPull = (s: number): number => {
    // Azimuth phi = pi u^2 clusters nodes at the near side of the ring; the far half mirrors it.
    const ring = simpson01((u) => {
      const phi = PI * u * u;
      const c = cos(phi);
      const S2 = R * R + s * s - 2 * R * s * c + smoothing2;
      const S = sqrt(S2);
      const x = S / lambda;
      return ((R - s * c) * exp(-x) * (1 + x)) / (S2 * S) * 2 * PI * u;
    }, 64);
    return 2 * ring * diskSurfaceDensity(d, s) * s;
  };
  const inner = R > 0 ? simpson01((t) => ringPull(R - R * t * t) * 2 * R * t, 128) : 0;
  const outer = R < Rt ? simpson01((t) => ringPull(R + (Rt - R) * t * t) * 2 * (Rt - R) * t, 128) : 0;
  return G * (inner + outer);
}

/** The razor-thin exponential disk (Freeman 1970): g = 2 pi G Sigma0 y [I0 K0 - I1 K1](y), y = R / (2 R_d). */
export function freemanDiskModel(d: DiskSpec, softening_kpc: number): MassModel {
  const Rd = d.scaleLength_kpc, M = d.mass_Msun;
  const sigma0 = M / (2 * Math.PI * Rd * Rd);
  const smoothing2 = d.scaleHeight_kpc ** 2 + softening_kpc ** 2;
  // The ring sum is costly, so each lambda gets one table over ln R, interpolated after.
  const tables = new Map<number, { lnR: Float64Array; g: Float64Array }>();
  const Rt = diskTruncation(d);
  const lo = log(1e-3 * Rd), hi = log(2 * Rt);
  const NODES = 96;
  const screened = (R: number, lambda: number): number => {
    if (R === 0) return 0;
    let t = tables.get(lambda);
    if (!t) {
      const lnR = Float64Array.from({ length: NODES }, (_, k) => lo + ((hi - lo) * k) / (NODES - 1));
      t = { lnR, g: lnR.map((l) => diskScreenedPull(d, smoothing2, exp(l), lambda)) };
      tables.set(lambda, t);
    }
    return interpolate(t.lnR, t.g, log(R));
  };
  return {
    totalMass_Msun: M,
    extent_kpc: Math.min(5 * Rd, Rt),
    newtonAccel(R) {
      if (R === 0) return 0;
      const y = R / (2 * Rd);
      return 2 * Math.PI * G * sigma0 * y * (i0e(y) * k0e(y) - i1e(y) * k1e(y));
    },
    screenedAccel: screened,
    enclosedMass: (R) => M * (1 - (1 + R / Rd) * exp(-R / Rd)),
    enclosedMassSlope: (R) => ((M * R) / (Rd * Rd)) * exp(-R / Rd),
  };
}

/** Linear interpolation on an increasing grid, clamped at both ends. */
function interpolate(xs: Float64Array, ys: Float64Array, x: number): number {
  if (x <= xs[0]) return ys[0];
  const last = xs.length - 1;
  if (x >= xs[last]) return ys[last];
  let lo = 0, hi = last;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (xs[mid] <= x) lo = mid;
    else hi = mid;
  }
  const f = (x - xs[lo]) / (xs[hi] - xs[lo]);
  return ys[lo] + f * (ys[hi] - ys[lo]);
}

const bulgeParams = (d: DiskSpec) => (d.bulge ? { mass_Msun: d.bulge.mass_Msun, scale_kpc: d.bulge.scale_kpc } : null);

/** Disk plus optional bulge. */
export function diskGalaxyModel(d: DiskSpec, softening_kpc: number): MassModel {
  const b = bulgeParams(d);
  const disk = freemanDiskModel(d, softening_kpc);
  if (!b) return disk;
  const combined = combinedModel([disk, hernquistModel(b)]);
  return { ...combined, extent_kpc: disk.extent_kpc };
}

/** Particles per part: equal particle masses as far as rounding allows. */
export function diskParticleSplit(d: DiskSpec): { disk: number; bulge: number } {
  if (!d.bulge) return { disk: d.n, bulge: 0 };
  const bulge = Math.min(d.n - 1, Math.max(1, Math.round((d.n * d.bulge.mass_Msun) / (d.mass_Msun + d.bulge.mass_Msun))));
  return { disk: d.n - bulge, bulge };
}

/** Inverse of the exponential disk's cumulative mass 1 - (1 + x) e^-x, by Newton's method. */
function exponentialRadius(F: number): number {
  let x = F < 0.5 ? sqrt(2 * F) : -log(1 - F) + 1; // asymptotic starting points
  for (let it = 0; it < 50; it++) {
    const err = 1 - (1 + x) * exp(-x) - F;
    const slope = x * exp(-x);
    const step = err / Math.max(slope, 1e-300);
    x = Math.max(x - step, 0.5 * x);
    if (Math.abs(step) < 1e-14 * Math.max(1, x)) break;
  }
  return x;
}

/**
 * Kinematics on a grid in ln R: circular speed of `law` for the whole model,
 * epicyclic frequency, sigma_R from Toomre's Q, and the mean azimuthal speed
 * from the thin-disk asymmetric-drift equation (Binney & Tremaine 2008,
 * eq. 4.227, tilt term dropped).
 */
function diskKinematics(d: DiskSpec, law: LawSpec, model: MassModel) {
  const Rd = d.scaleLength_kpc;
  const NODES = 256;
  const lo = log(1e-3 * Rd), hi = log(diskTruncation(d));
  const lnR = Float64Array.from({ length: NODES }, (_, k) => lo + ((hi - lo) * k) / (NODES - 1));
  const vc2 = (R: number) => R * modelAcceleration(law, model, R);
  const sigmaR = new Float64Array(NODES), sigmaPhi = new Float64Array(NODES), vPhi = new Float64Array(NODES);
  const kappa2 = new Float64Array(NODES), omega2 = new Float64Array(NODES), lnSS = new Float64Array(NODES);
  lnR.forEach((l, k) => {
    const R = exp(l);
    const h = 1e-4 * R;
    const v2 = vc2(R);
    // kappa^2 = R^-3 d(R^4 Omega^2)/dR = 2 vc^2 / R^2 + (1/R) d(vc^2)/dR
    kappa2[k] = Math.max(0, (2 * v2) / (R * R) + (vc2(R + h) - vc2(R - h)) / (2 * h * R));
    omega2[k] = v2 / (R * R);
    const sigma = diskSurfaceDensity(d, R);
    sigmaR[k] = kappa2[k] > 0 ? (d.toomreQ * TOOMRE_STELLAR * G * sigma) / sqrt(kappa2[k]) : 0;
    lnSS[k] = log(sigma * sigmaR[k] ** 2 + 1e-300);
  });
  for (let k = 0; k < NODES; k++) {
    const a = Math.max(0, k - 1), b = Math.min(NODES - 1, k + 1);
    const slope = (lnSS[b] - lnSS[a]) / (lnR[b] - lnR[a]);
    const ratio = omega2[k] > 0 ? kappa2[k] / (4 * omega2[k]) : 1;
    sigmaPhi[k] = sigmaR[k] * sqrt(ratio);
    const v2 = omega2[k] * exp(2 * lnR[k]);
    vPhi[k] = sqrt(Math.max(0, v2 + sigmaR[k] ** 2 * (1 - ratio + slope)));
  }
  return (R: number) => {
    const l = log(Math.max(R, 1e-300));
    return { vPhi: interpolate(lnR, vPhi, l), sigmaR: interpolate(lnR, sigmaR, l), sigmaPhi: interpolate(lnR, sigmaPhi, l) };
  };
}

/**
 * Isotropic Jeans dispersion of the bulge in the whole model's field under
 * `law`, treated as spherical: sigma^2(r) = (1/rho) int_r^inf rho g dr'.
 * Gaussian velocities from these moments are an approximation in common use
 * for composite galaxy models (Hernquist 1993, from memory).
 */
function bulgeDispersion(scale: number, law: LawSpec, model: MassModel): (r: number) => number {
  const NODES = 256;
  // rho g falls at least as r^-5 under every law here, so 1e4 scale radii stand in for infinity.
  const lo = log(1e-3 * scale), hi = log(1e4 * scale);
  const lnR = Float64Array.from({ length: NODES }, (_, k) => lo + ((hi - lo) * k) / (NODES - 1));
  const rho = (r: number) => 1 / (r * (r + scale) ** 3); // Hernquist shape; the normalisation cancels
  const integrand = lnR.map((l) => {
    const r = exp(l);
    return rho(r) * modelAcceleration(law, model, r) * r; // d r = r d ln r
  });
  const sigma = new Float64Array(NODES);
  let integral = 0;
  for (let k = NODES - 2; k >= 0; k--) {
    integral += 0.5 * (integrand[k] + integrand[k + 1]) * (lnR[k + 1] - lnR[k]);
    sigma[k] = sqrt(integral / rho(exp(lnR[k])));
  }
  return (r) => interpolate(lnR, sigma, log(Math.max(r, 1e-300)));
}

/**
 * Fills particles start..start+n-1 with the disk (first) and its bulge. The
 * disk lies in the x-y plane rotating counter-clockwise seen from +z.
 */
export function sampleDiskGalaxy(
  d: DiskSpec,
  runLaw: LawSpec,
  softening_kpc: number,
  rng: RngState,
  out: ParticleState,
  start: number,
): Component[] {
  const law = d.equilibriumLaw ?? runLaw;
  const model = diskGalaxyModel(d, softening_kpc);
  const split = diskParticleSplit(d);
  const kin = diskKinematics(d, law, model);
  const Rd = d.scaleLength_kpc, z0 = d.scaleHeight_kpc;
  const Fmax = 1 - (1 + diskTruncation(d) / Rd) * exp(-diskTruncation(d) / Rd);
  const mDisk = d.mass_Msun / split.disk;
  for (let i = start; i < start + split.disk; i++) {
    const R = Rd * exponentialRadius(uniformOpen(rng) * Fmax);
    const phi = 2 * Math.PI * uniform(rng);
    const z = z0 * Math.atanh(2 * uniformOpen(rng) - 1); // inverse of the sech^2 cumulative
    const k = kin(R);
    const sigmaZ = sqrt(Math.PI * G * diskSurfaceDensity(d, R) * z0); // isothermal sheet (Spitzer 1942)
    const vR = k.sigmaR * normal(rng);
    const vT = k.vPhi + k.sigmaPhi * normal(rng);
    const c = cos(phi), s = Math.sin(phi);
    out.x[i] = R * c; out.y[i] = R * s; out.z[i] = z;
    out.vx[i] = vR * c - vT * s; out.vy[i] = vR * s + vT * c; out.vz[i] = sigmaZ * normal(rng);
    out.m[i] = mDisk;
  }
  const components: Component[] = [{ label: 'disk', start, count: split.disk }];
  const b = bulgeParams(d);
  if (b) {
    const bStart = start + split.disk;
    const sigma = bulgeDispersion(b.scale_kpc, law, model);
    const mBulge = b.mass_Msun / split.bulge;
    for (let i = bStart; i < bStart + split.bulge; i++) {
      const r = sampleHernquistRadius(b, rng);
      const [ux, uy, uz] = isotropicDirection(rng);
      out.x[i] = r * ux; out.y[i] = r * uy; out.z[i] = r * uz;
      const sr = sigma(r);
      out.vx[i] = sr * normal(rng); out.vy[i] = sr * normal(rng); out.vz[i] = sr * normal(rng);
      out.m[i] = mBulge;
    }
    components.push({ label: 'bulge', start: bStart, count: split.bulge });
  }
  return components;
}
