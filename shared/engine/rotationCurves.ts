import type { ForceLaw } from './laws/types';
import { allocateAccelerations, centreOfMass, type ParticleState, type Points } from './state';

/**
 * Rotation curve measured from particles, in the plane z = z_cm about the
 * centre of mass (disks are built in the x-y plane).
 */
export interface RotationCurve {
  step: number;
  time_Myr: number;
  /** Bin centres, kpc. */
  radii_kpc: number[];
  /** Mass-weighted mean azimuthal speed of the particles in each cylindrical bin; null for an empty bin. */
  meanAzimuthal_km_s: (number | null)[];
  particleCounts: number[];
  /** sqrt(R g_R) from the law's field sampled at massless probes on a ring of radius R; 0 where the pull is outward. */
  circular_km_s: number[];
}

/** Bin centres of `bins` equal-width bins over (0, maxRadius]. */
export function curveRadii(maxRadius_kpc: number, bins: number): number[] {
  const w = maxRadius_kpc / bins;
  return Array.from({ length: bins }, (_, k) => (k + 0.5) * w);
}

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
): RotationCurve {
  const c = centreOfMass(p);
  const width = maxRadius_kpc / bins;
  const mass = new Float64Array(bins), momentum = new Float64Array(bins), counts = new Array<number>(bins).fill(0);
  for (let i = 0; i < p.n; i++) {
    const x = p.x[i] - c.x, y = p.y[i] - c.y;
    const R = Math.hypot(x, y);
    const k = Math.floor(R / width);
    if (R === 0 || k >= bins) continue;
    const vphi = (x * (p.vy[i] - c.vy) - y * (p.vx[i] - c.vx)) / R;
    mass[k] += p.m[i];
    momentum[k] += p.m[i] * vphi;
    counts[k]++;
  }
  const radii = curveRadii(maxRadius_kpc, bins);
  return {
    step,
    time_Myr,
    radii_kpc: radii,
    meanAzimuthal_km_s: Array.from(mass, (m, k) => (m > 0 ? momentum[k] / m : null)),
    particleCounts: counts,
    circular_km_s: circularSpeedFromForces(p, law, radii, c),
  };
}
