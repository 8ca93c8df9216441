import type { HaloSpec } from './fields';
import type { RngState } from '../rng';
import { isotropicDirection, MAX_REJECTION_DRAWS, rejectionGaveUp, uniform } from '../rng';
import type { ParticleState } from '../state';
import { hernquistProfile, sampleHernquistPositions } from './hernquist';
import { interpolate } from './isotropic';
import type { SphericalProfile } from './massModel';

const { exp, log } = Math;

/** Default NFW cut-off radius at ten scale radii: a concentration of 10, typical of galaxy haloes (common practice). */
const DEFAULT_NFW_CONCENTRATION = 10;
/** Decay length of the cut-off in units of the cut-off radius, and how far out the last particle may sit. */
const DECAY_FRACTION = 0.1, OUTER_FACTOR = 3;
const TAIL_NODES = 2048;

/** NFW mass inside x = r / r_s, per 4 pi rho0 r_s^3 (Navarro, Frenk & White 1996). */
const nfwMass = (x: number): number => log(1 + x) - x / (1 + x);

/** Where the NFW halo's exponential cut-off begins. */
export const nfwCutoff = (h: Pick<HaloSpec, 'scale_kpc' | 'truncationRadius_kpc'>): number =>
  h.truncationRadius_kpc ?? DEFAULT_NFW_CONCENTRATION * h.scale_kpc;

/**
 * NFW inside the cut-off radius r_c = c r_s; beyond it the density falls as
 * rho(r_c) (r/r_c)^e exp(-(r - r_c)/r_d), r_d = 0.1 r_c, with e = c/(r_d/r_s)...
 * chosen so the logarithmic slope is continuous at r_c (Kazantzidis, Magorrian
 * & Moore 2004, from memory): e = -(1 + 3c)/(1 + c) + r_c/r_d. A sharp cut
 * cannot be held by an isotropic f(E): any such f gives a density that falls to
 * zero where the relative potential does, so a cut with density left at the edge
 * is out of balance (measured: Clausius ratio 0.89 for c = 10). The last
 * particle sits at 3 r_c, where the density is below 1e-4 of rho(r_c).
 * mass_Msun is the whole mass, tail included; in units of r_s here.
 */
export function nfwProfile(h: Pick<HaloSpec, 'mass_Msun' | 'scale_kpc' | 'truncationRadius_kpc'>): SphericalProfile & { radiusOfMassFraction(F: number): number } {
  const rs = h.scale_kpc, M = h.mass_Msun;
  const c = nfwCutoff(h) / rs, xd = DECAY_FRACTION * c, xOut = OUTER_FACTOR * c;
  const e = -(1 + 3 * c) / (1 + c) + c / xd;
  const rhoC = 1 / (c * (1 + c) ** 2);
  // Unnormalised density and the tail's enclosed mass, both per 4 pi (mass per unit x: x^2 rho).
  const density = (x: number) => (x <= c ? 1 / (x * (1 + x) ** 2) : rhoC * (x / c) ** e * exp(-(x - c) / xd));
  const xs = Float64Array.from({ length: TAIL_NODES }, (_, k) => c + ((xOut - c) * k) / (TAIL_NODES - 1));
  const tail = new Float64Array(TAIL_NODES);
  tail[0] = nfwMass(c);
  for (let k = 1; k < TAIL_NODES; k++) tail[k] = tail[k - 1] + 0.5 * (xs[k] - xs[k - 1]) * (xs[k] ** 2 * density(xs[k]) + xs[k - 1] ** 2 * density(xs[k - 1]));
  const norm = tail[TAIL_NODES - 1];
  const massOf = (x: number) => (x >= xOut ? 1 : (x <= c ? nfwMass(x) : interpolate(xs, tail, x)) / norm);
  return {
    totalMass_Msun: M,
    outerRadius_kpc: xOut * rs,
    scale_kpc: rs,
    extent_kpc: c * rs,
    enclosedMass: (r) => M * massOf(r / rs),
    enclosedMassSlope: (r) => (r >= xOut * rs ? 0 : (M * (r / rs) ** 2 * density(r / rs)) / (rs * norm)),
    radiusOfMassFraction: (F) => rs * (F * norm <= nfwMass(c) ? nfwRadius(F * norm, c) : interpolate(tail, xs, F * norm)),
  };
}

/** A halo component's truncated profile: NFW, or Hernquist (default cut at its 99% mass radius). */
export const haloProfile = (h: HaloSpec): SphericalProfile => (h.profile === 'nfw' ? nfwProfile(h) : hernquistProfile(h));

/** x with nfwMass(x) = target, by bisection (nfwMass increases with x). */
function nfwRadius(target: number, xMax: number): number {
  let lo = 0, hi = xMax;
  for (let it = 0; it < 80; it++) {
    const mid = 0.5 * (lo + hi);
    if (nfwMass(mid) < target) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/**
 * Positions of the halo's h.n particles at out[start..start+h.n), each of mass
 * mass_Msun / n; radii by inverting M(r), directions isotropic. Velocities are
 * set apart (isotropic.ts), in the field of the whole system.
 */
export function sampleHaloPositions(h: HaloSpec, rng: RngState, out: ParticleState, start: number): void {
  if (h.profile === 'hernquist') {
    sampleHernquistPositions(h, rng, out, start, h.n);
    return;
  }
  const profile = nfwProfile(h);
  const m = h.mass_Msun / h.n;
  for (let i = start; i < start + h.n; i++) {
    let u = 0;
    for (let t = 0; u === 0; t++) {
      if (t === MAX_REJECTION_DRAWS) throw rejectionGaveUp('NFW radius');
      u = uniform(rng);
    }
    const r = profile.radiusOfMassFraction(u);
    const [ux, uy, uz] = isotropicDirection(rng);
    out.x[i] = r * ux; out.y[i] = r * uy; out.z[i] = r * uz;
    out.m[i] = m;
  }
}
