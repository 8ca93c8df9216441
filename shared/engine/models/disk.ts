import { z } from 'zod';
import { createLaw, localCoupling, modelAcceleration, type LawSpec } from '../laws/registry';
import type { LawContext } from '../laws/types';
import type { RngState } from '../rng';
import { normal, uniform, uniformOpen } from '../rng';
import { allocateAccelerations, type ParticleState, type Sources } from '../state';
import { G } from '../units';
import { haloProfile, sampleHaloPositions } from './halo';
import { hernquistProfile, sampleHernquistPositions } from './hernquist';
import { assignIsotropicVelocities, interpolate, isotropicSpeedSampler, softenedSphericalModel } from './isotropic';
import { makeSolver } from '../solvers';
import { densityCentre } from '../centre';
import { radialProfile, type RadialMassProfile } from '../radialProfile';
import { checkSystem, count, equilibriumLaw, length, liveHaloSchema, mass, MIN_TRUNCATION_FRACTION, truncation } from './fields';
import { combinedModel, type MassModel } from './massModel';
import { lawPullRatio, ringDirections } from './lawPull';
import { planarDiskDF, type PlanarDiskDF } from './diskDF';
import { defineSystem } from './system';
import type { Component } from './types';

// Module-local aliases: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { cos, sqrt, exp, log, PI } = Math;

const schema = z
  .strictObject({
    kind: z.literal('disk'),
    n: count.describe('number of particles, disk, bulge and gas together'),
    mass_Msun: mass.describe('disk mass'),
    scaleLength_kpc: length.describe('exponential scale length R_d').meta({ title: 'Scale length R_d' }),
    scaleHeight_kpc: length.describe('sech^2 scale height z0: rho ~ sech^2(z / z0)').meta({ title: 'Scale height z₀' }),
    toomreQ: z.number().min(0.5).max(10).default(1.5).describe("Toomre (1964) stability parameter setting the radial dispersion, taken with the short-range pull of the law the disk is balanced for (Yukawa: G (1 + α)), so a value is the same stability margin under every law").meta({ title: 'Toomre Q' }),
    truncationRadius_kpc: truncation,
    // examples[0] of an optional part: what the launch form fills in when it is switched on (invented values).
    bulge: z
      .strictObject({
        mass_Msun: mass.meta({ title: 'Bulge mass' }),
        scale_kpc: length.describe('Hernquist scale radius of the bulge').meta({ title: 'Bulge scale radius' }),
      })
      .optional()
      .describe('optional Hernquist bulge; particles are shared out in proportion to mass')
      .meta({ title: 'Bulge', absent: 'none', examples: [{ mass_Msun: 1e10, scale_kpc: 0.5 }] }),
    gas: z
      .strictObject({
        mass_Msun: mass.meta({ title: 'Gas mass' }),
        scaleLength_kpc: length.describe('exponential scale length of the gas').meta({ title: 'Gas scale length' }),
        scaleHeight_kpc: length.describe('sech^2 scale height of the gas layer').meta({ title: 'Gas scale height' }),
      })
      .optional()
      .describe('optional exponential gas disk in the plane of the stars, cut at truncationRadius_kpc when given, else at 10 of its scale lengths; particles are shared out in proportion to mass; collisionless like the stars (no pressure, no cooling)')
      .meta({ title: 'Gas disk', absent: 'none', examples: [{ mass_Msun: 5e9, scaleLength_kpc: 6, scaleHeight_kpc: 0.15 }] }),
    halo: liveHaloSchema,
    equilibriumLaw,
  })
  .describe('Exponential disk (Freeman 1970) with sech^2 vertical profile');

export type DiskSpec = z.infer<typeof schema>;

/** One exponential sech^2 layer: the stellar disk (a DiskSpec is one) or its gas. */
export interface ExponentialLayer {
  mass_Msun: number;
  scaleLength_kpc: number;
  scaleHeight_kpc: number;
  truncationRadius_kpc?: number;
}

/** The gas layer of a disk, cut where the stars are cut when a truncation radius is given. */
export const gasLayer = (d: DiskSpec): ExponentialLayer | null =>
  d.gas ? { ...d.gas, truncationRadius_kpc: d.truncationRadius_kpc } : null;

/** Default cut at 10 scale lengths, which holds 99.95% of an exponential disk's mass (common practice). */
const DEFAULT_TRUNCATION_SCALE_LENGTHS = 10;
/** Toomre (1964): Q = sigma_R kappa / (3.36 G Sigma) for a stellar disk. */
export const TOOMRE_STELLAR = 3.36;

export const diskTruncation = (d: ExponentialLayer): number => d.truncationRadius_kpc ?? DEFAULT_TRUNCATION_SCALE_LENGTHS * d.scaleLength_kpc;

export const diskSurfaceDensity = (d: ExponentialLayer, R: number): number =>
  (d.mass_Msun / (2 * Math.PI * d.scaleLength_kpc ** 2)) * exp(-R / d.scaleLength_kpc);

/** Composite Simpson rule over [0, 1] with an even number of intervals. */
function simpson01(f: (t: number) => number, intervals: number): number {
  let sum = 0;
  for (let k = 0; k <= intervals; k++) sum += (k === 0 || k === intervals ? 1 : k % 2 ? 4 : 2) * f(k / intervals);
  return sum / (3 * intervals);
}

/** Gauss-Legendre nodes and weights on (0, 1), roots found by Newton's method on P_n. */
function gaussLegendre01(n: number): { u: Float64Array; w: Float64Array } {
  const u = new Float64Array(n), w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let x = cos((PI * (i + 0.75)) / (n + 0.5));
    let dp = 1;
    for (let it = 0; it < 100; it++) {
      let p0 = 1, p1 = x;
      for (let k = 2; k <= n; k++) [p0, p1] = [p1, ((2 * k - 1) * x * p1 - (k - 1) * p0) / k];
      dp = (n * (x * p1 - p0)) / (x * x - 1);
      const dx = p1 / dp;
      x -= dx;
      if (Math.abs(dx) < 1e-15) break;
    }
    u[i] = 0.5 * (1 - x);
    w[i] = 1 / ((1 - x * x) * dp * dp);
  }
  return { u, w };
}

/** Heights of the sech^2 layer at which its vertical integrals are taken: u = tanh(z/z0) is uniform in mass. */
const LAYER = gaussLegendre01(6);

/** Pair pull along the separation divided by the separation, for D^2 = separation^2 + eps^2. */
type PairPull = (D2: number) => number;
const newtonPull: PairPull = (D2) => 1 / (D2 * sqrt(D2));
const screenedPull = (lambda: number): PairPull => (D2) => {
  const D = sqrt(D2);
  return (exp(-D / lambda) * (1 + D / lambda)) / (D2 * D);
};

/**
 * Midplane inward pull at R of the thick, truncated exponential disk through
 * the engine's softened pair force, per G: rings of the surface density at
 * each height of the sech^2 layer, summed numerically. Nodes cluster at the
 * target radius and azimuth, where the kernel peaks.
 */
function thickDiskPull(d: ExponentialLayer, eps2: number, R: number, pull: PairPull): number {
  const Rt = diskTruncation(d), z0 = d.scaleHeight_kpc;
  let total = 0;
  for (let l = 0; l < LAYER.u.length; l++) {
    const zeta = z0 * Math.atanh(LAYER.u[l]);
    const h2 = zeta * zeta + eps2;
    const ringPull = (s: number): number => {
      // Azimuth phi = pi u^2 clusters nodes at the near side of the ring; the far half mirrors it.
      const ring = simpson01((u) => {
        const phi = PI * u * u;
        const c = cos(phi);
        return (R - s * c) * pull(R * R + s * s - 2 * R * s * c + h2) * 2 * PI * u;
      }, 64);
      return 2 * ring * diskSurfaceDensity(d, s) * s;
    };
    // A window symmetric about s = R pairs the rings just inside and just outside R,
    // whose pulls nearly cancel (a principal value when the layer is thin); the rest is smooth.
    const w = Math.min(R, Rt - R);
    let sum = w > 0 ? simpson01((t) => (ringPull(R - w * t * t) + ringPull(R + w * t * t)) * 2 * w * t, 96) : 0;
    if (R - w > 0) sum += simpson01((t) => ringPull((R - w) * t) * (R - w), 64);
    if (R + w < Rt) sum += simpson01((t) => ringPull(R + w + (Rt - R - w) * t) * (Rt - R - w), 96);
    total += LAYER.w[l] * sum;
  }
  return total;
}

/** Pull tables by disk geometry, softening and range: a spec's model is rebuilt often (preview, precheck, run), its tables need not be. */
const TABLES = new Map<string, Float64Array>();
const MAX_TABLES = 32;

/**
 * The exponential disk (Freeman 1970) as the particles realise it: sech^2
 * thickness, truncation and the run's softening included, so its curve is
 * the one the particles feel. Each pull gets one table over ln R, made on
 * first use and interpolated after (the ring sums are costly).
 */
export function thickDiskModel(d: ExponentialLayer, softening_kpc: number): MassModel {
  const Rd = d.scaleLength_kpc, M = d.mass_Msun;
  const eps2 = softening_kpc ** 2;
  const Rt = diskTruncation(d);
  const lo = log(1e-2 * Rd), hi = log(2 * Rt);
  const NODES = 64;
  const lnR = Float64Array.from({ length: NODES }, (_, k) => lo + ((hi - lo) * k) / (NODES - 1));
  const geometry = `${M}|${Rd}|${d.scaleHeight_kpc}|${Rt}|${eps2}`;
  const table = (lambda: number, pull: PairPull) => {
    const key = `${geometry}|${lambda}`;
    let t = TABLES.get(key);
    if (!t) {
      t = lnR.map((l) => G * thickDiskPull(d, eps2, exp(l), pull));
      if (TABLES.size >= MAX_TABLES) TABLES.clear();
      TABLES.set(key, t);
    }
    return t;
  };
  const R0 = exp(lo), REnd = exp(hi);
  // Inside the first node the pull falls linearly to zero at the centre; beyond the last
  // (twice the truncation) the disk pulls as a point mass, as haloes and bulges reaching out there need.
  const lookup = (t: Float64Array, R: number, far: number) =>
    R <= 0 ? 0 : R < R0 ? (t[0] * R) / R0 : R > REnd ? far : interpolate(lnR, t, log(R));
  return {
    totalMass_Msun: M,
    extent_kpc: Math.min(5 * Rd, Rt),
    newtonAccel: (R) => lookup(table(Infinity, newtonPull), R, (G * M) / (R * R)),
    screenedAccel: (R, lambda) => lookup(table(lambda, screenedPull(lambda)), R, ((G * M) / (R * R)) * exp(-R / lambda) * (1 + R / lambda)),
    enclosedMass: (R) => M * (1 - (1 + R / Rd) * exp(-R / Rd)),
    enclosedMassSlope: (R) => ((M * R) / (Rd * Rd)) * exp(-R / Rd),
  };
}

const bulgeParams = (d: DiskSpec) => (d.bulge ? { mass_Msun: d.bulge.mass_Msun, scale_kpc: d.bulge.scale_kpc } : null);

/** Disk plus optional gas disk, bulge and live halo, all softened as the run softens them. */
export function diskGalaxyModel(d: DiskSpec, softening_kpc: number): MassModel {
  const b = bulgeParams(d);
  const gas = gasLayer(d);
  const disk = thickDiskModel(d, softening_kpc);
  if (!b && !d.halo && !gas) return disk;
  const parts = [disk];
  // Curves are drawn as far as the stars or the gas reach, not the halo.
  let extent_kpc = disk.extent_kpc;
  if (gas) {
    const gasDisk = thickDiskModel(gas, softening_kpc);
    parts.push(gasDisk);
    extent_kpc = Math.max(extent_kpc, gasDisk.extent_kpc);
  }
  if (b) parts.push(softenedSphericalModel(hernquistProfile(b), softening_kpc));
  if (d.halo) parts.push(softenedSphericalModel(haloProfile(d.halo), softening_kpc));
  return { ...combinedModel(parts), extent_kpc };
}

/** A layer's truncated mass in softened spherical shells (for a thin disk the mass inside a sphere is the mass inside that cylinder). */
function layerMonopole(l: ExponentialLayer, softening_kpc: number): MassModel {
  const Rd = l.scaleLength_kpc, Rt = diskTruncation(l), M = l.mass_Msun;
  const Fmax = 1 - (1 + Rt / Rd) * exp(-Rt / Rd);
  return softenedSphericalModel({
    totalMass_Msun: M,
    outerRadius_kpc: Rt,
    scale_kpc: Rd,
    extent_kpc: Math.min(5 * Rd, Rt),
    enclosedMass: (r) => (r >= Rt ? M : (M * (1 - (1 + r / Rd) * exp(-r / Rd))) / Fmax),
    enclosedMassSlope: (r) => (r >= Rt ? 0 : (M * r * exp(-r / Rd)) / (Rd * Rd * Fmax)),
  }, softening_kpc);
}

/**
 * What a spherical part (bulge, halo) feels of the whole galaxy: the disk's
 * monopole, its truncated mass taken in softened spherical shells (for a thin
 * disk the mass inside a sphere is the mass inside that cylinder), plus the
 * softened bulge and halo. Averaged over a sphere only the monopole of the
 * disk's pull survives, so a spherical part's virial sum sees just that
 * (the monopole is common practice for composite models); the disk's midplane
 * pull, used before, left a bulge 7% too cold by the Clausius ratio (measured).
 */
function sphericalPartsField(d: DiskSpec, softening_kpc: number): MassModel {
  const parts = [layerMonopole(d, softening_kpc)];
  const gas = gasLayer(d);
  if (gas) parts.push(layerMonopole(gas, softening_kpc));
  const b = bulgeParams(d);
  if (b) parts.push(softenedSphericalModel(hernquistProfile(b), softening_kpc));
  if (d.halo) parts.push(softenedSphericalModel(haloProfile(d.halo), softening_kpc));
  return combinedModel(parts);
}

/** Particles per part, in particle order disk, bulge, gas: equal particle masses as far as rounding allows, at least one each. */
export function diskParticleSplit(d: DiskSpec): { disk: number; bulge: number; gas: number } {
  if (!d.gas) {
    if (!d.bulge) return { disk: d.n, bulge: 0, gas: 0 };
    const bulge = Math.min(d.n - 1, Math.max(1, Math.round((d.n * d.bulge.mass_Msun) / (d.mass_Msun + d.bulge.mass_Msun))));
    return { disk: d.n - bulge, bulge, gas: 0 };
  }
  const total = d.mass_Msun + (d.bulge?.mass_Msun ?? 0) + d.gas.mass_Msun;
  const share = (m: number) => Math.max(1, Math.round((d.n * m) / total));
  const bulge = d.bulge ? Math.min(d.n - 2, share(d.bulge.mass_Msun)) : 0;
  const gas = Math.min(d.n - bulge - 1, share(d.gas.mass_Msun));
  return { disk: d.n - bulge - gas, bulge, gas };
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

/** Squared midplane circular speed of `law` for the whole model, times the law's measured pull over the model's (fieldCorrection). */
const circularSpeed2 = (law: LawSpec, model: MassModel, correction: (R: number) => number) => (R: number): number =>
  R * modelAcceleration(law, model, R) * correction(R);

/** kappa^2 = R^-3 d(R^4 Omega^2)/dR = 2 vc^2 / R^2 + (1/R) d(vc^2)/dR, floored at 0. */
function epicyclic2(vc2: (R: number) => number, R: number): number {
  const h = 1e-4 * R;
  return Math.max(0, (2 * vc2(R)) / (R * R) + (vc2(R + h) - vc2(R - h)) / (2 * h * R));
}

/** sigma_R from Toomre's Q over the surface density `stable`, with G times `coupling` (localCoupling of the law). */
const toomreSigmaR = (toomreQ: number, coupling: number, stable: (R: number) => number, vc2: (R: number) => number) => (R: number): number => {
  const kappa2 = epicyclic2(vc2, R);
  return kappa2 > 0 ? (toomreQ * TOOMRE_STELLAR * G * coupling * stable(R)) / sqrt(kappa2) : 0;
};

/** How a disk's in-plane velocities are drawn: from moments (spec versions 1 and 2) or from a distribution function. */
export type DiskSetUp = 'moments' | 'distribution';
/** The first spec version whose disks are drawn from their distribution function. */
const DISTRIBUTION_FROM_VERSION = 3;

/** In-plane velocity (v_R, v_phi) of a particle at R. */
type PlanarDraw = (R: number, rng: RngState) => [number, number];

/**
 * Version 1 and 2 specs' set-up, kept so they give what they gave: on a grid
 * in ln R, sigma_R from Toomre's Q with Newton's G, sigma_phi from the
 * epicyclic ratio, the mean azimuthal speed from the thin-disk
 * asymmetric-drift equation (Binney & Tremaine 2008, eq. 4.227, tilt term
 * dropped) with the layer's own surface density, and Gaussian velocities
 * about those moments (Hernquist 1993). Not a steady state of a warm disk
 * (README: the disk's curve leaves 5 % within a period under Yukawa and
 * field-form MOND).
 */
function momentDraw(d: ExponentialLayer, toomreQ: number, stable: (R: number) => number, vc2: (R: number) => number): PlanarDraw {
  const Rd = d.scaleLength_kpc;
  const NODES = 256;
  const lo = log(1e-3 * Rd), hi = log(diskTruncation(d));
  const lnR = Float64Array.from({ length: NODES }, (_, k) => lo + ((hi - lo) * k) / (NODES - 1));
  const toomre = toomreSigmaR(toomreQ, 1, stable, vc2);
  const sigmaR = new Float64Array(NODES), sigmaPhi = new Float64Array(NODES), vPhi = new Float64Array(NODES);
  const kappa2 = new Float64Array(NODES), omega2 = new Float64Array(NODES), lnSS = new Float64Array(NODES);
  lnR.forEach((l, k) => {
    const R = exp(l);
    kappa2[k] = epicyclic2(vc2, R);
    omega2[k] = vc2(R) / (R * R);
    sigmaR[k] = toomre(R);
    lnSS[k] = log(diskSurfaceDensity(d, R) * sigmaR[k] ** 2 + 1e-300);
  });
  for (let k = 0; k < NODES; k++) {
    const a = Math.max(0, k - 1), b = Math.min(NODES - 1, k + 1);
    const slope = (lnSS[b] - lnSS[a]) / (lnR[b] - lnR[a]);
    const ratio = omega2[k] > 0 ? kappa2[k] / (4 * omega2[k]) : 1;
    sigmaPhi[k] = sigmaR[k] * sqrt(ratio);
    const v2 = omega2[k] * exp(2 * lnR[k]);
    vPhi[k] = sqrt(Math.max(0, v2 + sigmaR[k] ** 2 * (1 - ratio + slope)));
  }
  return (R, rng) => {
    const l = log(Math.max(R, 1e-300));
    const vR = interpolate(lnR, sigmaR, l) * normal(rng);
    return [vR, interpolate(lnR, vPhi, l) + interpolate(lnR, sigmaPhi, l) * normal(rng)];
  };
}

/**
 * The layer's distribution function in the law's midplane field (diskDF.ts):
 * sigma_R from Toomre's Q with the law's short-range coupling, so "Q = 2" is
 * the same stability margin under every law (Yukawa: G (1 + alpha)).
 */
function layerDF(d: ExponentialLayer, toomreQ: number, stable: (R: number) => number, law: LawSpec, vc2: (R: number) => number, heightAverage: (R: number) => number): PlanarDiskDF {
  return planarDiskDF({
    vc2: (R) => vc2(R) * heightAverage(R),
    surface: (R) => diskSurfaceDensity(d, R),
    sigmaR: toomreSigmaR(toomreQ, localCoupling(law), stable, vc2),
    scaleLength_kpc: d.scaleLength_kpc,
    outer_kpc: diskTruncation(d),
  });
}

/** Probe radii for the vertical field, in scale lengths: where the disk has particles to speak of. */
const PROBE_RADII = 24, PROBE_INNER = 0.1, PROBE_OUTER = 8;
/** Azimuths per probe ring: the local vertical pull is grainy, so it is averaged round the ring and above and below. */
const PROBE_AZIMUTHS = 32;
const PROBE_LAYER = gaussLegendre01(4);

/**
 * Vertical dispersion of an isothermal sech^2 layer from the vertical Jeans
 * equation at the midplane (Binney & Tremaine 2008, eq. 4.222 with the radial
 * term dropped): sigma_z^2 = (1/rho(0)) int_0^inf rho g_z dz = z0 int_0^1 g_z du
 * with u = tanh(z/z0). g_z is the law's own pull on probes among the sampled
 * particles, so disk, bulge, softening and the law's boost all count. For a
 * lone self-gravitating sheet it gives pi G Sigma z0 (Spitzer 1942).
 *
 * From the same probes, and one midplane ring per radius, `heightAverage`: the
 * inward pull averaged over the layer's density, int rho g_R dz / Sigma, over
 * the midplane pull. That average is the pull in the vertically integrated
 * radial Jeans equation (Binney & Tremaine 2008, eq. 4.222a integrated over z):
 * a layer's particles spend their time above and below the plane, where the
 * pull is weaker (measured 2-3 % at 0.5-1 R_d in a layer of z0 = R_d / 6).
 */
function layerField(d: ExponentialLayer, law: LawSpec, ctx: LawContext, sources: Sources): { sigmaZ: (R: number) => number; heightAverage: (R: number) => number } {
  const Rd = d.scaleLength_kpc, z0 = d.scaleHeight_kpc;
  const outer = Math.min(PROBE_OUTER * Rd, diskTruncation(d));
  const lnR = Float64Array.from({ length: PROBE_RADII }, (_, k) => log(PROBE_INNER * Rd) + ((log(outer) - log(PROBE_INNER * Rd)) * k) / (PROBE_RADII - 1));
  const layers = PROBE_LAYER.u.length;
  const layered = PROBE_RADII * layers * 2 * PROBE_AZIMUTHS, n = layered + PROBE_RADII * 2 * PROBE_AZIMUTHS;
  const probes = { x: new Float64Array(n), y: new Float64Array(n), z: new Float64Array(n) };
  let k = 0;
  for (let r = 0; r < PROBE_RADII; r++)
    for (let l = 0; l < layers; l++)
      for (const side of [1, -1])
        for (let j = 0; j < PROBE_AZIMUTHS; j++, k++) {
          const phi = (2 * PI * (j + 0.5 * (l % 2))) / PROBE_AZIMUTHS;
          probes.x[k] = exp(lnR[r]) * cos(phi); probes.y[k] = exp(lnR[r]) * Math.sin(phi);
          probes.z[k] = side * z0 * Math.atanh(PROBE_LAYER.u[l]);
        }
  for (let r = 0; r < PROBE_RADII; r++)
    for (let j = 0; j < 2 * PROBE_AZIMUTHS; j++, k++) {
      const phi = (PI * j) / PROBE_AZIMUTHS;
      probes.x[k] = exp(lnR[r]) * cos(phi); probes.y[k] = exp(lnR[r]) * Math.sin(phi);
    }
  const acc = allocateAccelerations(n);
  createLaw(law, ctx).accelerations(sources, probes, acc);
  const sigma = new Float64Array(PROBE_RADII), ratio = new Float64Array(PROBE_RADII);
  const inward = (i: number) => -(acc.ax[i] * probes.x[i] + acc.ay[i] * probes.y[i]);
  k = 0;
  let m = layered;
  for (let r = 0; r < PROBE_RADII; r++) {
    let s2 = 0, gR = 0, g0 = 0;
    for (let l = 0; l < layers; l++) {
      let gz = 0, gl = 0;
      for (const side of [1, -1]) for (let j = 0; j < PROBE_AZIMUTHS; j++, k++) { gz -= side * acc.az[k]; gl += inward(k); }
      s2 += PROBE_LAYER.w[l] * (gz / (2 * PROBE_AZIMUTHS));
      gR += PROBE_LAYER.w[l] * gl;
    }
    for (let j = 0; j < 2 * PROBE_AZIMUTHS; j++, m++) g0 += inward(m);
    sigma[r] = sqrt(Math.max(0, z0 * s2));
    ratio[r] = g0 > 0 ? gR / g0 : 1;
  }
  const at = (t: Float64Array) => (R: number) => interpolate(lnR, t, log(Math.max(R, 1e-300)));
  return { sigmaZ: at(sigma), heightAverage: at(ratio) };
}

/**
 * The law's own midplane pull on probe rings among the sampled particles, as a
 * ratio to the model curve (1 unless the curve approximates the law's field:
 * field-form MOND's pull in a disk's plane is not the algebraic ν g_N).
 */
function fieldCorrection(d: DiskSpec, law: LawSpec, ctx: LawContext, sources: Sources, model: MassModel): (R: number) => number {
  const Rd = d.scaleLength_kpc;
  const outer = Math.min(PROBE_OUTER * Rd, diskTruncation(d));
  const lnR = Float64Array.from({ length: PROBE_RADII }, (_, k) => log(PROBE_INNER * Rd) + ((log(outer) - log(PROBE_INNER * Rd)) * k) / (PROBE_RADII - 1));
  return lawPullRatio(law, ctx, sources, model, lnR, ringDirections(4 * PROBE_AZIMUTHS));
}

/**
 * A mass model whose enclosed mass and its slope are the sampled particles' own spherically
 * averaged profile about their density centre, the one a law built on the enclosed mass (the
 * apparent dark mass of emergent gravity) reads from the particles during the run. The
 * analytic model gives the cylindrical mass of the disk and the bulge's cusp, where the
 * particles' smoothed profile has M growing as r^3 within its innermost kernels (measured:
 * balanced for the analytic profile, the inner disk and bulge under emergent gravity expand and
 * the curve falls 26% at 0.5 R_d within one outer period at 5,000 particles). Laws that read
 * only the pulls (newtonAccel, screenedAccel) are unaffected.
 */
function withSampledProfile(sources: Sources): (model: MassModel) => MassModel {
  let profile: RadialMassProfile | null = null;
  const get = () => {
    if (!profile) {
      const c = densityCentre(sources);
      profile = radialProfile(sources, c.x, c.y, c.z);
    }
    return profile;
  };
  return (model) => ({ ...model, enclosedMass: (r) => get().enclosedMass(r), enclosedMassSlope: (r) => get().enclosedMassSlope(r) });
}

/** Positions of `count` particles of an exponential sech^2 layer from `from` on, each of equal share of its mass. */
function sampleLayerPositions(l: ExponentialLayer, rng: RngState, out: ParticleState, from: number, count: number): void {
  const Rd = l.scaleLength_kpc, z0 = l.scaleHeight_kpc;
  const Fmax = 1 - (1 + diskTruncation(l) / Rd) * exp(-diskTruncation(l) / Rd);
  const m = l.mass_Msun / count;
  for (let i = from; i < from + count; i++) {
    const R = Rd * exponentialRadius(uniformOpen(rng) * Fmax);
    const phi = 2 * Math.PI * uniform(rng);
    out.x[i] = R * cos(phi); out.y[i] = R * Math.sin(phi);
    out.z[i] = z0 * Math.atanh(2 * uniformOpen(rng) - 1); // inverse of the sech^2 cumulative
    out.m[i] = m;
  }
}

/** How a layer's velocities are drawn: in plane, and vertically as a Gaussian of dispersion sigmaZ. */
interface LayerDraw {
  planar: PlanarDraw;
  sigmaZ: (R: number) => number;
}

/** Velocities of a layer's particles from `draw`, counter-clockwise seen from +z. */
function assignLayerVelocities({ planar, sigmaZ }: LayerDraw, rng: RngState, out: ParticleState, from: number, count: number): void {
  for (let i = from; i < from + count; i++) {
    const R = Math.hypot(out.x[i], out.y[i]);
    const c = out.x[i] / R, s = out.y[i] / R;
    const [vR, vT] = planar(R, rng);
    out.vx[i] = vR * c - vT * s; out.vy[i] = vR * s + vT * c; out.vz[i] = sigmaZ(R) * normal(rng);
  }
}

/**
 * Fills particles start..start+n-1 with the disk (first), its bulge and its
 * gas, and the next halo.n with the live halo if there is one. The disks lie
 * in the x-y plane rotating counter-clockwise seen from +z. Every position is
 * drawn before any velocity, so a seed gives the same positions whatever law
 * the velocities are balanced for; the halo's positions are drawn after the
 * baryons', so the baryons sit at the same places with or without it.
 *
 * The gas is collisionless like the stars. Both take sigma_R from the spec's
 * Toomre Q over their summed surface density: with one radial dispersion, stars
 * and gas are one layer to the local axisymmetric stability criterion, while two
 * layers each at Q would together be less stable than Q says (two-component
 * stability, Jog & Solomon 1984; from memory). A cold, pressureless gas layer of
 * particles would only fragment. Each layer keeps its own sigma_z (its own scale
 * height in the total field) and its own mean rotation.
 *
 * `setUp` 'distribution' (spec version 3 on) draws the in-plane velocities from
 * each layer's distribution function (layerDF); 'moments' (versions 1 and 2)
 * from Gaussians about the moments (momentDraw).
 */
export function sampleDiskGalaxy(d: DiskSpec, law: LawSpec, ctx: LawContext, rng: RngState, out: ParticleState, start: number, setUp: DiskSetUp): Component[] {
  const model = diskGalaxyModel(d, ctx.softening_kpc);
  const split = diskParticleSplit(d);
  const gas = gasLayer(d);
  const diskEnd = start + split.disk, bulgeEnd = diskEnd + split.bulge, end = start + d.n;
  sampleLayerPositions(d, rng, out, start, split.disk);
  const b = bulgeParams(d);
  if (b) sampleHernquistPositions(b, rng, out, diskEnd, split.bulge);
  if (gas) sampleLayerPositions(gas, rng, out, bulgeEnd, split.gas);
  if (d.halo) sampleHaloPositions(d.halo, rng, out, end);
  const haloEnd = end + (d.halo?.n ?? 0);

  const view = (a: Float64Array) => a.subarray(start, haloEnd);
  const sources = { x: view(out.x), y: view(out.y), z: view(out.z), m: view(out.m) };
  const stars = layerField(d, law, ctx, sources);
  const correction = fieldCorrection(d, law, ctx, sources, model);
  const stable = gas ? (R: number) => diskSurfaceDensity(d, R) + diskSurfaceDensity(gas, R) : (R: number) => diskSurfaceDensity(d, R);
  const asSampled = withSampledProfile(sources);
  const vc2 = circularSpeed2(law, asSampled(model), correction);
  const draw = (l: ExponentialLayer, f: ReturnType<typeof layerField>): LayerDraw => {
    if (setUp === 'moments') return { planar: momentDraw(l, d.toomreQ, stable, vc2), sigmaZ: f.sigmaZ };
    const df = layerDF(l, d.toomreQ, stable, law, vc2, f.heightAverage);
    return { planar: (R, r) => df.sample(R, r), sigmaZ: f.sigmaZ };
  };
  assignLayerVelocities(draw(d, stars), rng, out, start, split.disk);
  const components: Component[] = [{ label: 'disk', start, count: split.disk }];
  const spherical = asSampled(b || d.halo || gas ? sphericalPartsField(d, ctx.softening_kpc) : model);
  if (b) {
    assignIsotropicVelocities(out, diskEnd, split.bulge, isotropicSpeedSampler(hernquistProfile(b), spherical, law), rng);
    components.push({ label: 'bulge', start: diskEnd, count: split.bulge });
  }
  if (gas) {
    assignLayerVelocities(draw(gas, layerField(gas, law, ctx, sources)), rng, out, bulgeEnd, split.gas);
    components.push({ label: 'gas', start: bulgeEnd, count: split.gas });
  }
  if (d.halo) {
    assignIsotropicVelocities(out, end, d.halo.n, isotropicSpeedSampler(haloProfile(d.halo), spherical, law), rng);
    components.push({ label: 'halo', start: end, count: d.halo.n });
  }
  return components;
}

export const diskModule = defineSystem({
  kind: 'disk',
  schema,
  label: 'Exponential disk',
  note: 'A rotating exponential disk, optionally with a bulge and a gas disk; its velocities follow the circular speed of a law.',
  // An invented example galaxy, sized to run in seconds under the default timestep.
  preset: { kind: 'disk', n: 2000, mass_Msun: 5e10, scaleLength_kpc: 3, scaleHeight_kpc: 0.3, toomreQ: 1.5 },
  traits: { geometry: 'flattened', systems: 1 },
  // Disks were balanced for the run's own law from the first version on.
  version1Reference: false,
  olderSetUp: { before: DISTRIBUTION_FROM_VERSION, text: "in-plane velocities as Gaussians about moments, Toomre's Q with Newton's G" },
  components: (d) => ['disk', ...(d.bulge ? ['bulge'] : []), ...(d.gas ? ['gas'] : []), ...(d.halo ? ['halo'] : [])],
  mass: (d) => d.mass_Msun + (d.bulge?.mass_Msun ?? 0) + (d.gas?.mass_Msun ?? 0) + (d.halo?.mass_Msun ?? 0),
  massModel: diskGalaxyModel,
  sample: (d, law, { spec, rng }, out, start) =>
    sampleDiskGalaxy(d, law, { solver: makeSolver(spec.solver), softening_kpc: spec.softening_kpc }, rng, out, start, spec.version >= DISTRIBUTION_FROM_VERSION ? 'distribution' : 'moments'),
  checkSystem(d, path, ctx) {
    checkSystem(d, 'scaleLength_kpc', path, ctx);
    const parts = 1 + (d.bulge ? 1 : 0) + (d.gas ? 1 : 0);
    if (d.n < parts) ctx.addIssue({ code: 'custom', path: [...path, 'n'], message: `Particles N must be at least ${parts}: one for each part (${['disk', d.bulge && 'bulge', d.gas && 'gas'].filter(Boolean).join(', ')})` });
    const rt = d.truncationRadius_kpc;
    if (d.gas && rt !== undefined && rt < MIN_TRUNCATION_FRACTION * d.gas.scaleLength_kpc) {
      ctx.addIssue({
        code: 'custom',
        path: [...path, 'truncationRadius_kpc'],
        message: `Truncation radius ${rt} kpc is below ${MIN_TRUNCATION_FRACTION * 100}% of the gas disk's scale length (${d.gas.scaleLength_kpc} kpc): the gas disk would hold almost none of its mass`,
      });
    }
  },
  diskPart: (d) => ({ component: 'disk', scaleLength_kpc: d.scaleLength_kpc }),
});
