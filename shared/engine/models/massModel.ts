import { G } from '../units';

// Module-local aliases: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { exp, log } = Math;

/**
 * A static, centred mass model: what the analytic rotation curves and the
 * disk's equilibrium velocities are computed from. Accelerations point to the
 * centre and are in (km/s)^2/kpc; R is measured in the plane z = 0.
 */
export interface MassModel {
  totalMass_Msun: number;
  /** Radius out to which curves of this model are worth drawing, kpc. */
  extent_kpc: number;
  newtonAccel(R_kpc: number): number;
  /** In-plane pull of the Yukawa term per unit alpha: the field of e^(-r/lambda)(1 + r/lambda)/r^2 pairs. */
  screenedAccel(R_kpc: number, lambda_kpc: number): number;
  /** Mass inside radius r (spherical; disks use the cylindrical mass, an approximation the law notes). */
  enclosedMass(r_kpc: number): number;
  enclosedMassSlope(r_kpc: number): number;
}

export function pointMassModel(mass_Msun: number, extent_kpc: number): MassModel {
  return {
    totalMass_Msun: mass_Msun,
    extent_kpc,
    newtonAccel: (R) => (R === 0 ? 0 : (G * mass_Msun) / (R * R)),
    screenedAccel: (R, lambda) => (R === 0 ? 0 : ((G * mass_Msun) / (R * R)) * exp(-R / lambda) * (1 + R / lambda)),
    enclosedMass: () => mass_Msun,
    enclosedMassSlope: () => 0,
  };
}

/**
 * Inward pull at radius r of a thin shell of unit mass and radius s under the
 * screened pair force, divided by G. Obtained by differentiating the shell's
 * Yukawa potential -lambda/(2 r s) (e^(-|r-s|/lambda) - e^(-(r+s)/lambda)),
 * separately for shells inside r and outside it (the pull jumps at s = r).
 */
function pullOfInnerShell(r: number, s: number, lambda: number): number {
  const a = exp((s - r) / lambda) - exp(-(s + r) / lambda);
  return ((lambda / (2 * s)) * a * (1 + r / lambda)) / (r * r);
}

/** A shell outside r pulls outward (negative here); the series avoids cancellation when r is much less than lambda. */
function pullOfOuterShell(r: number, s: number, lambda: number): number {
  const u = r / lambda;
  if (u < 1e-2) return -(exp(-s / lambda) / (s * r)) * (u * u / 3 + (u * u * u * u) / 30);
  const A = exp((r - s) / lambda), B = exp(-(r + s) / lambda);
  return -((A + B) / r - (lambda * (A - B)) / (r * r)) / (2 * s);
}

/** Composite Simpson rule in ln s over [a, b] with an even number of intervals. */
function simpsonLog(f: (s: number) => number, a: number, b: number, intervals: number): number {
  const la = log(a), h = (log(b) - la) / intervals;
  let sum = 0;
  for (let k = 0; k <= intervals; k++) {
    const s = exp(la + k * h);
    const w = k === 0 || k === intervals ? 1 : k % 2 === 1 ? 4 : 2;
    sum += w * f(s) * s;
  }
  return (sum * h) / 3;
}

export interface SphericalProfile {
  totalMass_Msun: number;
  /** Outermost radius with mass (truncation), kpc. */
  outerRadius_kpc: number;
  /** Radius where the profile's structure lives (scale length), kpc. */
  scale_kpc: number;
  extent_kpc: number;
  enclosedMass(r_kpc: number): number;
  enclosedMassSlope(r_kpc: number): number;
}

/** A spherical model from M(r): Newton from the shell theorem, Yukawa by integrating shells. */
export function sphericalModel(p: SphericalProfile): MassModel {
  const inner = 1e-6 * p.scale_kpc;
  return {
    totalMass_Msun: p.totalMass_Msun,
    extent_kpc: p.extent_kpc,
    enclosedMass: p.enclosedMass,
    enclosedMassSlope: p.enclosedMassSlope,
    newtonAccel: (R) => (R === 0 ? 0 : (G * p.enclosedMass(R)) / (R * R)),
    screenedAccel(R, lambda) {
      if (R === 0) return 0;
      const rOut = p.outerRadius_kpc;
      let total = simpsonLog((s) => p.enclosedMassSlope(s) * pullOfInnerShell(R, s, lambda), inner, Math.min(R, rOut), 256);
      if (R < rOut) total += simpsonLog((s) => p.enclosedMassSlope(s) * pullOfOuterShell(R, s, lambda), R, rOut, 256);
      return G * total;
    },
  };
}

/** Sum of components sharing one centre. */
export function combinedModel(parts: MassModel[]): MassModel {
  if (parts.length === 1) return parts[0];
  const sum = (f: (m: MassModel) => number) => parts.reduce((acc, m) => acc + f(m), 0);
  return {
    totalMass_Msun: sum((m) => m.totalMass_Msun),
    extent_kpc: Math.max(...parts.map((m) => m.extent_kpc)),
    newtonAccel: (R) => sum((m) => m.newtonAccel(R)),
    screenedAccel: (R, l) => sum((m) => m.screenedAccel(R, l)),
    enclosedMass: (r) => sum((m) => m.enclosedMass(r)),
    enclosedMassSlope: (r) => sum((m) => m.enclosedMassSlope(r)),
  };
}
