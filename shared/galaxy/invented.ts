// Invented galaxies: baryonic components from analytic profiles and an
// "observed" curve with seeded Gaussian noise, for tests and demo data.
// Every curve made here is invented, and is labelled so by its callers.
import { normal, seedRng } from '../engine/rng';
import { i0e, i1e, k0e, k1e } from '../engine/special';
import { G } from '../engine/units';
import type { RotationCurve } from './table';

export interface InventedBaryons {
  /** Stellar disk at unit mass-to-light ratio: its mass for Upsilon = 1, and scale length. */
  disk: { mass_Msun: number; scale_kpc: number };
  gas?: { mass_Msun: number; scale_kpc: number };
  /** Hernquist bulge at unit mass-to-light ratio. */
  bulge?: { mass_Msun: number; scale_kpc: number };
}

/** Razor-thin exponential disk (Freeman 1970): v^2 = 4 pi G Sigma0 Rd y^2 [I0 K0 - I1 K1](y), y = R / (2 Rd). */
export function exponentialDiskSpeed(mass_Msun: number, scale_kpc: number, R: number): number {
  const y = R / (2 * scale_kpc);
  const sigma0 = mass_Msun / (2 * Math.PI * scale_kpc ** 2);
  const v2 = 4 * Math.PI * G * sigma0 * scale_kpc * y * y * (i0e(y) * k0e(y) - i1e(y) * k1e(y));
  return Math.sqrt(Math.max(0, v2));
}

/** Hernquist (1990) sphere: v^2 = G M r / (r + a)^2. */
export const hernquistSpeed = (mass_Msun: number, scale_kpc: number, r: number): number => Math.sqrt((G * mass_Msun * r) / (r + scale_kpc) ** 2);

/** A rotation curve at the given radii: components from the profiles, v_obs = truth(R, components) plus noise of the given error. */
export function inventedCurve(
  baryons: InventedBaryons,
  radiusKpc: number[],
  truth: (R: number, c: { vGas: number; vDisk: number; vBulge: number }) => number,
  error: (R: number, v: number) => number,
  seed: number,
): RotationCurve {
  const rng = seedRng(seed);
  const vDisk = radiusKpc.map((R) => exponentialDiskSpeed(baryons.disk.mass_Msun, baryons.disk.scale_kpc, R));
  const vGas = baryons.gas ? radiusKpc.map((R) => exponentialDiskSpeed(baryons.gas!.mass_Msun, baryons.gas!.scale_kpc, R)) : null;
  const vBulge = baryons.bulge ? radiusKpc.map((R) => hernquistSpeed(baryons.bulge!.mass_Msun, baryons.bulge!.scale_kpc, R)) : null;
  const vTrue = radiusKpc.map((R, i) => truth(R, { vGas: vGas?.[i] ?? 0, vDisk: vDisk[i], vBulge: vBulge?.[i] ?? 0 }));
  const vErr = radiusKpc.map((R, i) => error(R, vTrue[i]));
  return {
    radiusKpc,
    vObs: vTrue.map((v, i) => v + vErr[i] * normal(rng)),
    vErr,
    vGas,
    vDisk,
    vBulge,
  };
}
