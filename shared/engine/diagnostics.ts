import { densityCentre, type DensityCentre } from './centre';
import type { ForceLaw } from './laws/types';
import { usesPotentialVirial } from './laws/registry';
import { centreOfMass, type ParticleState } from './state';
import { overlapped, type FieldSolver } from './solvers/types';

// Module-local aliases: inside a vm context (Jest, sandboxes) every global
// lookup of Math is slow enough to dominate a hot loop.
const { sqrt, hypot } = Math;

export interface Vector3 {
  x: number;
  y: number;
  z: number;
}

/**
 * One diagnostic output. Energies are Msun (km/s)^2, momentum Msun km/s,
 * angular momentum Msun kpc km/s (about the origin, which is the initial
 * centre of mass). Null marks a quantity the law does not define.
 */
export interface DiagnosticSample {
  step: number;
  time_Myr: number;
  kineticEnergy: number;
  potentialEnergy: number | null;
  totalEnergy: number | null;
  /**
   * (E - E0) / (K0 + |W_self,0|): K0 the kinetic and W_self,0 the particles' own (pair) potential
   * energy at t = 0. Unlike |E0| this scale cannot vanish, and a fixed external field (a rigid halo),
   * whose potential's zero point is a convention, is not part of it.
   */
  energyDrift: number | null;
  momentum: Vector3;
  /** |P - P0| divided by sum m|v| at t = 0 (P0 is near zero, so it cannot be the scale). */
  momentumDrift: number;
  angularMomentum: Vector3;
  /** |L - L0| divided by sum m|r x v| at t = 0. */
  angularMomentumDrift: number;
  /** 2K / |W|: only under softened Newton, the one law where it is 1 in equilibrium; null elsewhere. */
  virialRatio: number | null;
  /**
   * 2K' / |sum m (r - r_cm) . a| with K' the kinetic energy about the centre-of-mass velocity:
   * the Clausius virial ratio, 1 in equilibrium under every law (Clausius 1870; the form used
   * e.g. in Binney & Tremaine 2008, section 4.8.3, from memory).
   */
  clausiusVirialRatio: number;
  /** Radii about the density centre holding 10, 50 and 90% of the mass. */
  lagrangianRadii_kpc: { r10: number; r50: number; r90: number };
  /** Centre of mass, kpc, and its velocity, km/s: a drift here is self-acceleration or an external pull. */
  centreOfMass: Vector3;
  centreOfMassVelocity: Vector3;
  /** Density centre (shrinking spheres, see centre.ts), kpc: the centre the radii, curves and Q are taken about. */
  densityCentre: Vector3;
  /** Only for disk models: Toomre Q in radial bins of the disk plane. */
  toomreQ: ToomreProfile | null;
}

export interface ToomreProfile {
  radius_kpc: number[];
  q: (number | null)[];
}

/** Values at t = 0 that drifts are measured against. */
export interface DriftReference {
  energy: number | null;
  /** K0 + |W_self,0|, the energy drift's scale. */
  energyScale: number | null;
  momentum: Vector3;
  momentumScale: number;
  angularMomentum: Vector3;
  angularMomentumScale: number;
}

interface Moments {
  kinetic: number;
  momentum: Vector3;
  angularMomentum: Vector3;
  momentumScale: number;
  angularMomentumScale: number;
}

function moments(p: ParticleState): Moments {
  let K = 0, px = 0, py = 0, pz = 0, lx = 0, ly = 0, lz = 0, pScale = 0, lScale = 0;
  for (let i = 0; i < p.n; i++) {
    const m = p.m[i];
    const x = p.x[i], y = p.y[i], z = p.z[i], vx = p.vx[i], vy = p.vy[i], vz = p.vz[i];
    const v2 = vx * vx + vy * vy + vz * vz;
    K += 0.5 * m * v2;
    px += m * vx; py += m * vy; pz += m * vz;
    const cx = y * vz - z * vy, cy = z * vx - x * vz, cz = x * vy - y * vx;
    lx += m * cx; ly += m * cy; lz += m * cz;
    pScale += m * sqrt(v2);
    lScale += m * sqrt(cx * cx + cy * cy + cz * cz);
  }
  return {
    kinetic: K,
    momentum: { x: px, y: py, z: pz },
    angularMomentum: { x: lx, y: ly, z: lz },
    momentumScale: pScale,
    angularMomentumScale: lScale,
  };
}

const distance = (a: Vector3, b: Vector3): number => hypot(a.x - b.x, a.y - b.y, a.z - b.z);

/** Radii about `centre` (default the centre of mass) enclosing the given mass fractions, kpc. */
export function lagrangianRadii(p: ParticleState, fractions: readonly number[], centre: Vector3 = centreOfMass(p)): number[] {
  const c = centre;
  const r = new Float64Array(p.n);
  for (let i = 0; i < p.n; i++) r[i] = hypot(p.x[i] - c.x, p.y[i] - c.y, p.z[i] - c.z);
  const order = Uint32Array.from({ length: p.n }, (_, i) => i).sort((a, b) => r[a] - r[b]);
  let M = 0;
  for (let i = 0; i < p.n; i++) M += p.m[i];
  const out: number[] = [];
  let cumulative = 0, k = 0;
  for (const f of fractions) {
    while (k < p.n && cumulative + p.m[order[k]] < f * M) cumulative += p.m[order[k++]];
    out.push(r[order[Math.min(k, p.n - 1)]]);
  }
  return out;
}

/** Clausius virial sum m (r - r_cm) . a; uses the accelerations held in the state. */
function clausiusVirial(p: ParticleState, c: Vector3): number {
  let v = 0;
  for (let i = 0; i < p.n; i++) v += p.m[i] * ((p.x[i] - c.x) * p.ax[i] + (p.y[i] - c.y) * p.ay[i] + (p.z[i] - c.z) * p.az[i]);
  return v;
}

/**
 * Measures one sample. `p` must hold accelerations at its current positions
 * (the integrators keep that true). Without a
 * reference this is the first sample and becomes the reference. `solver`, the
 * law's own: one split across threads measures the rest of the sample (the
 * density centre above all) while its helpers start on the potential.
 */
export function sampleDiagnostics(
  p: ParticleState,
  law: ForceLaw,
  step: number,
  time_Myr: number,
  reference: DriftReference | null,
  toomre: ((p: ParticleState, centre: DensityCentre) => ToomreProfile) | null,
  solver?: FieldSolver,
): { sample: DiagnosticSample; reference: DriftReference } {
  let W = null as number | null, external = 0;
  let mo!: Moments, cm!: ReturnType<typeof centreOfMass>, dc!: DensityCentre, radii!: number[], vir!: number;
  overlapped(solver, () => {
    W = law.potentialEnergy ? law.potentialEnergy(p) : null;
    external = W !== null && law.externalPotentialEnergy ? law.externalPotentialEnergy(p) : 0;
  }, () => {
    mo = moments(p);
    cm = centreOfMass(p);
    dc = densityCentre(p, p);
    radii = lagrangianRadii(p, [0.1, 0.5, 0.9], dc);
    vir = clausiusVirial(p, cm);
  });
  const [r10, r50, r90] = radii;
  const E = W === null ? null : mo.kinetic + W;
  const wSelf = W === null ? null : W - external;
  const ref: DriftReference = reference ?? {
    energy: E,
    energyScale: wSelf === null ? null : mo.kinetic + Math.abs(wSelf),
    momentum: mo.momentum,
    momentumScale: mo.momentumScale,
    angularMomentum: mo.angularMomentum,
    angularMomentumScale: mo.angularMomentumScale,
  };
  let M = 0;
  for (let i = 0; i < p.n; i++) M += p.m[i];
  const internalKinetic = mo.kinetic - 0.5 * M * (cm.vx * cm.vx + cm.vy * cm.vy + cm.vz * cm.vz);
  const sample: DiagnosticSample = {
    step,
    time_Myr,
    kineticEnergy: mo.kinetic,
    potentialEnergy: W,
    totalEnergy: E,
    energyDrift: E === null || ref.energy === null || !ref.energyScale ? null : (E - ref.energy) / ref.energyScale,
    momentum: mo.momentum,
    momentumDrift: ref.momentumScale > 0 ? distance(mo.momentum, ref.momentum) / ref.momentumScale : 0,
    angularMomentum: mo.angularMomentum,
    angularMomentumDrift: ref.angularMomentumScale > 0 ? distance(mo.angularMomentum, ref.angularMomentum) / ref.angularMomentumScale : 0,
    virialRatio: !usesPotentialVirial(law.info.kind) || W === null || W === 0 ? null : (2 * mo.kinetic) / Math.abs(W),
    clausiusVirialRatio: vir === 0 ? 0 : (2 * internalKinetic) / Math.abs(vir),
    lagrangianRadii_kpc: { r10, r50, r90 },
    centreOfMass: { x: cm.x, y: cm.y, z: cm.z },
    centreOfMassVelocity: { x: cm.vx, y: cm.vy, z: cm.vz },
    densityCentre: { x: dc.x, y: dc.y, z: dc.z },
    toomreQ: toomre ? toomre(p, dc) : null,
  };
  return { sample, reference: ref };
}
