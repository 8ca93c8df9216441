import type { LawSpec } from '../../spec/runSpec';
import { modelAcceleration } from '../laws/registry';
import type { RngState } from '../rng';
import { isotropicDirection, uniform } from '../rng';
import type { ParticleState } from '../state';
import { G } from '../units';
import { sphericalModel, type MassModel, type SphericalProfile } from './massModel';

// Module-local aliases: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { exp, log, sqrt } = Math;

/** Nodes of the tables below, evenly spaced in ln r. */
const NODES = 192;

/** Linear interpolation on an increasing grid, clamped at both ends. */
export function interpolate(xs: Float64Array, ys: Float64Array, x: number): number {
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

const lnGrid = (lo: number, hi: number, n: number): Float64Array =>
  Float64Array.from({ length: n }, (_, k) => log(lo) + ((log(hi) - log(lo)) * k) / (n - 1));

/**
 * Inward pull at r of a thin shell of unit mass and radius s, per G, under the
 * Plummer-softened pair potential -1/D with D = sqrt(d^2 + eps^2). Averaging
 * -1/D over the shell gives -(D+ - D-)/(2 r s) with D+- = sqrt((r +- s)^2 + eps^2);
 * this is its r-derivative. Unsoftened it is 1/r^2 outside the shell and 0 inside.
 */
export function softenedShellPull(r: number, s: number, eps2: number): number {
  const Dp = sqrt((r + s) ** 2 + eps2), Dm = sqrt((r - s) ** 2 + eps2);
  return (Dp - Dm - r * ((r + s) / Dp - (r - s) / Dm)) / (2 * r * r * s);
}

/**
 * The same for the softened Yukawa pair potential -e^(-D/lambda)/D, whose
 * shell average is -lambda (e^(-D-/lambda) - e^(-D+/lambda)) / (2 r s).
 */
export function softenedScreenedShellPull(r: number, s: number, eps2: number, lambda: number): number {
  const Dp = sqrt((r + s) ** 2 + eps2), Dm = sqrt((r - s) ** 2 + eps2);
  const Ep = exp(-Dp / lambda), Em = exp(-Dm / lambda);
  return (lambda * (Em - Ep) + r * ((Em * (r - s)) / Dm - (Ep * (r + s)) / Dp)) / (2 * s * r * r);
}

/** Composite Simpson rule in ln s over [a, b] with an even number of intervals. */
function simpsonLog(f: (s: number) => number, a: number, b: number, intervals: number): number {
  const la = log(a), h = (log(b) - la) / intervals;
  let sum = 0;
  for (let k = 0; k <= intervals; k++) {
    const s = exp(la + k * h);
    sum += (k === 0 || k === intervals ? 1 : k % 2 ? 4 : 2) * f(s) * s;
  }
  return (sum * h) / 3;
}

/**
 * The field the particles of a spherical profile feel through the engine's
 * softened pair force, as a mass model: shells summed with the softened
 * kernels above, tabulated in ln r (Yukawa tables made per range on first use).
 * The mass profile itself (used by the emergent law) is the unsoftened one.
 * With eps = 0 it is the plain spherical model.
 */
export function softenedSphericalModel(p: SphericalProfile, softening_kpc: number): MassModel {
  const plain = sphericalModel(p);
  if (softening_kpc === 0) return plain;
  const eps2 = softening_kpc * softening_kpc;
  const rOut = p.outerRadius_kpc, inner = 1e-6 * p.scale_kpc;
  const lnR = lnGrid(1e-3 * p.scale_kpc, 2 * rOut, NODES);
  const field = (pull: (r: number, s: number) => number) =>
    lnR.map((l) => {
      const r = exp(l);
      const split = Math.min(r, rOut);
      let total = simpsonLog((s) => p.enclosedMassSlope(s) * pull(r, s), inner, split, 256);
      if (r < rOut) total += simpsonLog((s) => p.enclosedMassSlope(s) * pull(r, s), r, rOut, 256);
      return G * total;
    });
  let newton: Float64Array | null = null;
  const screened = new Map<number, Float64Array>();
  const r0 = exp(lnR[0]), rEnd = exp(lnR[NODES - 1]);
  // Inside the first node the softened core is harmonic (pull proportional to r); beyond the last, softening no longer matters.
  const lookup = (table: Float64Array, R: number, farField: number) =>
    R >= rEnd ? farField : R <= r0 ? (table[0] * R) / r0 : interpolate(lnR, table, log(R));
  return {
    ...plain,
    newtonAccel(R) {
      if (R === 0) return 0;
      newton ??= field((r, s) => softenedShellPull(r, s, eps2));
      return lookup(newton, R, plain.newtonAccel(R));
    },
    screenedAccel(R, lambda) {
      if (R === 0) return 0;
      let t = screened.get(lambda);
      if (!t) {
        t = field((r, s) => softenedScreenedShellPull(r, s, eps2, lambda));
        screened.set(lambda, t);
      }
      return lookup(t, R, plain.screenedAccel(R, lambda));
    },
  };
}

/**
 * Isotropic equilibrium of a spherical tracer profile in the field of `law`
 * acting on `field`: the distribution function f(E) from Eddington's formula
 * (Binney & Tremaine 2008, eq. 4.46b),
 *   f(E) = 1/(sqrt 8 pi^2) d/dE int_0^E (d rho/d Psi) dPsi / sqrt(E - Psi),
 * with relative potential Psi(r) = int_r^rOut g dr' (zero at the truncation,
 * so no particle is sent past it) and relative energy E = Psi - v^2/2. Its
 * second moment is the isotropic Jeans dispersion (sec. 4.8). Returns the
 * speed of a particle at radius r for a uniform deviate u, by inverting that
 * radius's speed distribution v^2 f(Psi - v^2/2).
 *
 * rho is taken piecewise linear in Psi between nodes, so the Abel integral is
 * exact per interval; f is then differenced and clipped at zero (a model no
 * isotropic f can hold would show as clipped values; the Clausius ratio of
 * the sampled particles is the check). `correction` scales the law's model
 * curve where that only approximates the law's own field (lawPull.ts).
 */
export function isotropicSpeedSampler(profile: SphericalProfile, field: MassModel, law: LawSpec, correction: (r: number) => number = () => 1): (r: number, u: number) => number {
  const rOut = profile.outerRadius_kpc;
  const K = 2 * NODES;
  const lnR = lnGrid(1e-4 * profile.scale_kpc, rOut, K);
  const r = lnR.map(exp);
  const g = r.map((x) => modelAcceleration(law, field, x) * correction(x));
  // Psi and rho from the outside in: index j = K-1-k, so both grow with j.
  const psi = new Float64Array(K), rho = new Float64Array(K);
  for (let k = K - 2; k >= 0; k--) psi[K - 1 - k] = psi[K - 2 - k] + 0.5 * (g[k] * r[k] + g[k + 1] * r[k + 1]) * (lnR[k + 1] - lnR[k]);
  for (let k = 0; k < K; k++) rho[K - 1 - k] = profile.enclosedMassSlope(r[k]) / (r[k] * r[k]);
  // Abel integral A(E_i) = sum_j (d rho/d Psi)_j 2 (sqrt(E_i - Psi_j) - sqrt(E_i - Psi_j+1)), then f = dA/dE.
  const abel = new Float64Array(K);
  for (let i = 1; i < K; i++) {
    let sum = 0;
    for (let j = 0; j < i; j++) {
      const dPsi = psi[j + 1] - psi[j];
      if (dPsi <= 0) continue;
      sum += ((rho[j + 1] - rho[j]) / dPsi) * 2 * (sqrt(psi[i] - psi[j]) - sqrt(psi[i] - psi[j + 1]));
    }
    abel[i] = sum;
  }
  const f = new Float64Array(K);
  for (let i = 1; i < K; i++) {
    const a = i - 1, b = Math.min(K - 1, i + 1);
    f[i] = psi[b] > psi[a] ? Math.max(0, (abel[b] - abel[a]) / (psi[b] - psi[a])) : f[i - 1];
  }
  // Resampled on a uniform grid in E, so each look-up below costs O(1).
  const U = 2048, psiMax = psi[K - 1];
  const fU = Float64Array.from({ length: U + 1 }, (_, k) => interpolate(psi, f, (k * psiMax) / U));
  const dfAt = (E: number) => {
    if (E <= 0) return 0;
    const x = Math.min(U, (E / psiMax) * U), k = Math.min(U - 1, Math.floor(x));
    return fU[k] + (x - k) * (fU[k + 1] - fU[k]);
  };
  const psiOfR = psi.slice().reverse();
  const Q = 64;
  const cdf = new Float64Array(Q + 1);
  return (x, u) => {
    const P = x >= rOut ? 0 : interpolate(lnR, psiOfR, log(Math.max(x, r[0])));
    if (P <= 0) return 0;
    const vEsc = sqrt(2 * P);
    // Speed distribution in q = v / v_esc: q^2 f(Psi (1 - q^2)), integrated by trapezoids and inverted linearly.
    let prev = 0;
    cdf[0] = 0;
    for (let k = 1; k <= Q; k++) {
      const q = k / Q;
      const here = q * q * dfAt(P * (1 - q * q));
      cdf[k] = cdf[k - 1] + 0.5 * (prev + here);
      prev = here;
    }
    const target = u * cdf[Q];
    if (!(cdf[Q] > 0)) return 0;
    let k = 1;
    while (k < Q && cdf[k] < target) k++;
    const span = cdf[k] - cdf[k - 1];
    const q = (k - 1 + (span > 0 ? (target - cdf[k - 1]) / span : 0)) / Q;
    return q * vEsc;
  };
}

/**
 * Isotropic velocities for particles start..start+count-1 from a speed
 * sampler: one uniform for the speed and two for the direction, so the number
 * of draws does not depend on the law. Drawn after every position of the
 * system, so the positions of a seed do not depend on the law either.
 */
export function assignIsotropicVelocities(out: ParticleState, start: number, count: number, speed: (r: number, u: number) => number, rng: RngState): void {
  for (let i = start; i < start + count; i++) {
    const v = speed(sqrt(out.x[i] ** 2 + out.y[i] ** 2 + out.z[i] ** 2), uniform(rng));
    const [wx, wy, wz] = isotropicDirection(rng);
    out.vx[i] = v * wx; out.vy[i] = v * wy; out.vz[i] = v * wz;
  }
}
