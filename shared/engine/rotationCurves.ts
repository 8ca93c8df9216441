import { densityCentre } from './centre';
import type { ForceLaw } from './laws/types';
import type { Component } from './models/types';
import { allocateAccelerations, type ParticleState, type Points } from './state';

/** Mean azimuthal speed of a set of particles near the plane, per cylindrical bin. */
export interface MeasuredSpeeds {
  /** Mass-weighted mean cylindrical radius of the particles in each bin, kpc (the bin centre where it is empty): where the speed belongs. */
  meanRadius_kpc: number[];
  /** Mass-weighted mean azimuthal speed about the centre's velocity; null for a bin of fewer than MIN_PARTICLES_PER_BIN particles. */
  meanAzimuthal_km_s: (number | null)[];
  particleCounts: number[];
}

/**
 * Rotation curve measured from particles about the density centre (see
 * centre.ts), in cylindrical bins of the x-y plane (disks are built in it).
 * Particle speeds count only near the plane, |z - z_c| < planeCut_kpc, so a
 * bulge's or halo's particles far above the disk do not dilute it.
 */
export interface RotationCurve extends MeasuredSpeeds {
  step: number;
  time_Myr: number;
  /** Bin centres, kpc: where circular_km_s is sampled. */
  radii_kpc: number[];
  /** Half-thickness of the slab whose particles are measured, kpc: one bin width. */
  planeCut_kpc: number;
  /** The same measurement for each component alone (disk, bulge, each galaxy of an encounter...). */
  byComponent: (MeasuredSpeeds & { label: string })[];
  /** sqrt(R g_R) from the law's field sampled at massless probes on a ring of radius R; 0 where the pull is outward. */
  circular_km_s: number[];
}

/** Bin centres of `bins` equal-width bins over (0, maxRadius]. */
export function curveRadii(maxRadius_kpc: number, bins: number): number[] {
  const w = maxRadius_kpc / bins;
  return Array.from({ length: bins }, (_, k) => (k + 0.5) * w);
}

/** A bin with fewer particles gives a mean too noisy to quote (our choice: sigma / sqrt(8) is already a third of sigma). */
export const MIN_PARTICLES_PER_BIN = 8;

/** Probes per ring: enough to average out the azimuthal graininess of a particle disk (common practice). */
const RING_PROBES = 8;

/** Circular speed from the law's field at probe rings of the given radii, about (cx, cy, cz), km/s. */
export function circularSpeedFromForces(
  p: ParticleState,
  law: ForceLaw,
  radii_kpc: readonly number[],
  centre: { x: number; y: number; z: number },
): number[] {
  const count = radii_kpc.length * RING_PROBES;
  const probes: Points = { x: new Float64Array(count), y: new Float64Array(count), z: new Float64Array(count) };
  radii_kpc.forEach((R, k) => {
    for (let j = 0; j < RING_PROBES; j++) {
      const phi = (2 * Math.PI * (j + 0.5)) / RING_PROBES;
      const idx = k * RING_PROBES + j;
      probes.x[idx] = centre.x + R * Math.cos(phi);
      probes.y[idx] = centre.y + R * Math.sin(phi);
      probes.z[idx] = centre.z;
    }
  });
  const acc = allocateAccelerations(count);
  law.accelerations(p, probes, acc);
  return radii_kpc.map((R, k) => {
    let inward = 0;
    for (let j = 0; j < RING_PROBES; j++) {
      const idx = k * RING_PROBES + j;
      const ux = (probes.x[idx] - centre.x) / R, uy = (probes.y[idx] - centre.y) / R;
      inward -= acc.ax[idx] * ux + acc.ay[idx] * uy;
    }
    return Math.sqrt(Math.max(0, (R * inward) / RING_PROBES));
  });
}

export function measureRotationCurve(
  p: ParticleState,
  law: ForceLaw,
  maxRadius_kpc: number,
  bins: number,
  step: number,
  time_Myr: number,
  components: readonly Component[] = [],
): RotationCurve {
  const c = densityCentre(p, p);
  const width = maxRadius_kpc / bins;
  const radii = curveRadii(maxRadius_kpc, bins);
  const speeds = (start: number, end: number): MeasuredSpeeds => {
    const mass = new Float64Array(bins), momentum = new Float64Array(bins), radius = new Float64Array(bins), counts = new Array<number>(bins).fill(0);
    for (let i = start; i < end; i++) {
      const x = p.x[i] - c.x, y = p.y[i] - c.y;
      const R = Math.hypot(x, y);
      const k = Math.floor(R / width);
      if (R === 0 || k >= bins || Math.abs(p.z[i] - c.z) >= width) continue;
      const vphi = (x * (p.vy[i] - c.vy) - y * (p.vx[i] - c.vx)) / R;
      mass[k] += p.m[i];
      momentum[k] += p.m[i] * vphi;
      radius[k] += p.m[i] * R;
      counts[k]++;
    }
    return {
      meanRadius_kpc: Array.from(mass, (m, k) => (m > 0 ? radius[k] / m : radii[k])),
      meanAzimuthal_km_s: Array.from(mass, (m, k) => (counts[k] >= MIN_PARTICLES_PER_BIN ? momentum[k] / m : null)),
      particleCounts: counts,
    };
  };
  return {
    step,
    time_Myr,
    radii_kpc: radii,
    planeCut_kpc: width,
    ...speeds(0, p.n),
    byComponent: components.length > 1 ? components.map((part) => ({ label: part.label, ...speeds(part.start, part.start + part.count) })) : [],
    circular_km_s: circularSpeedFromForces(p, law, radii, c),
  };
}
