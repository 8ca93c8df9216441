import type { RngState } from '../rng';
import { isotropicDirection, MAX_REJECTION_DRAWS, rejectionGaveUp, uniform } from '../rng';
import type { ParticleState } from '../state';
import { G } from '../units';
import { sphericalModel, type MassModel } from './massModel';

// Module-local aliases: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { asin, sqrt } = Math;

export interface HernquistParams {
  mass_Msun: number;
  scale_kpc: number;
  truncationRadius_kpc?: number;
}

/** Default cut at the radius enclosing 99% of the mass, about 199 a (common practice: the profile falls only as r^-4). */
const DEFAULT_MASS_FRACTION = 0.99;

const massFraction = (r: number, a: number): number => (r / (r + a)) ** 2;
const radiusOfFraction = (X: number, a: number): number => (a * sqrt(X)) / (1 - sqrt(X));

export function hernquistTruncation(p: HernquistParams): number {
  return p.truncationRadius_kpc ?? radiusOfFraction(DEFAULT_MASS_FRACTION, p.scale_kpc);
}

/** The truncated Hernquist (1990) profile, renormalised to mass_Msun inside the truncation radius. */
export function hernquistModel(p: HernquistParams): MassModel {
  const a = p.scale_kpc, rt = hernquistTruncation(p), M = p.mass_Msun;
  const Xc = massFraction(rt, a);
  return sphericalModel({
    totalMass_Msun: M,
    outerRadius_kpc: rt,
    scale_kpc: a,
    extent_kpc: Math.min(10 * a, rt),
    enclosedMass: (r) => (r >= rt ? M : (M * massFraction(r, a)) / Xc),
    enclosedMassSlope: (r) => (r >= rt ? 0 : (M * 2 * a * r) / ((r + a) ** 3 * Xc)),
  });
}

/** Radii drawn from the truncated profile by inverting M(r). */
export function sampleHernquistRadius(p: HernquistParams, rng: RngState): number {
  const Xc = massFraction(hernquistTruncation(p), p.scale_kpc);
  let X = 0;
  for (let t = 0; X === 0; t++) {
    if (t === MAX_REJECTION_DRAWS) throw rejectionGaveUp('Hernquist radius');
    X = uniform(rng) * Xc;
  }
  return radiusOfFraction(X, p.scale_kpc);
}

/**
 * Isotropic distribution function of Hernquist (1990, eq. 17) without its
 * constant prefactor, as a function of q = sqrt(-E a / (G M)), 0 <= q < 1.
 */
function hernquistDF(q: number): number {
  const q2 = q * q;
  const s = 1 - q2;
  return (3 * asin(q) + q * sqrt(s) * (1 - 2 * q2) * (8 * q2 * q2 - 8 * q2 - 3)) / s ** 2.5;
}

/**
 * Fills particles start..start+count-1 with a Hernquist sphere: radii from
 * the mass profile, speeds by rejection from v^2 f(E) at that radius
 * (Hernquist 1990 DF), isotropic directions.
 */
export function sampleHernquist(p: HernquistParams, rng: RngState, out: ParticleState, start: number, count: number): void {
  const a = p.scale_kpc;
  const vg = sqrt((G * p.mass_Msun) / a);
  const m = p.mass_Msun / count;
  for (let i = start; i < start + count; i++) {
    const r = sampleHernquistRadius(p, rng);
    // Dimensionless: psi = -Phi a / (G M), speed w = v / vg, q^2 = psi - w^2 / 2.
    const psi = a / (r + a);
    const wEsc = sqrt(2 * psi);
    const density = (w: number) => {
      const q2 = psi - 0.5 * w * w;
      return q2 <= 0 ? 0 : w * w * hernquistDF(sqrt(q2));
    };
    const bound = 1.1 * peakOf(density, wEsc);
    let w = 0;
    for (let t = 0; ; t++) {
      if (t === MAX_REJECTION_DRAWS) throw rejectionGaveUp('Hernquist speed');
      w = uniform(rng) * wEsc;
      if (uniform(rng) * bound < density(w)) break;
    }
    const [ux, uy, uz] = isotropicDirection(rng);
    const [wx, wy, wz] = isotropicDirection(rng);
    out.x[i] = r * ux; out.y[i] = r * uy; out.z[i] = r * uz;
    const v = w * vg;
    out.vx[i] = v * wx; out.vy[i] = v * wy; out.vz[i] = v * wz;
    out.m[i] = m;
  }
}

/** Maximum of a unimodal function on [0, top]: a coarse scan, then golden-section refinement. */
function peakOf(f: (x: number) => number, top: number): number {
  const scan = 64;
  let best = 0;
  for (let k = 1; k < scan; k++) if (f((k * top) / scan) > f((best * top) / scan)) best = k;
  let lo = (Math.max(0, best - 1) * top) / scan, hi = (Math.min(scan, best + 1) * top) / scan;
  const g = (sqrt(5) - 1) / 2;
  for (let it = 0; it < 40; it++) {
    const x1 = hi - g * (hi - lo), x2 = lo + g * (hi - lo);
    if (f(x1) < f(x2)) lo = x1;
    else hi = x2;
  }
  return Math.max(f((best * top) / scan), f(0.5 * (lo + hi)));
}
