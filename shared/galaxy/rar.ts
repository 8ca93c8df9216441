// The radial acceleration relation and the baryonic Tully-Fisher relation,
// for observed curves. Accelerations here are in m/s^2, as published.
import { mondNu } from '../engine/laws/mond';
import { ACCEL_UNIT_M_S2, accelFromSI, G } from '../engine/units';
import { baryonicSquared, type MassToLight } from './baryons';
import type { RotationCurve } from './table';

/** g_dagger of McGaugh, Lelli & Schombert 2016 (PRL 117, 201101): 1.20e-10 m/s^2. */
export const RAR_G_DAGGER_M_S2 = 1.2e-10;

/**
 * g_obs = g_bar / (1 - exp(-sqrt(g_bar / g_dagger))) (McGaugh, Lelli & Schombert
 * 2016). The same function is MOND's "rar" nu, so it is taken from the law module.
 */
export function rarAcceleration(gBar_m_s2: number, gDagger_m_s2 = RAR_G_DAGGER_M_S2): number {
  if (!(gBar_m_s2 > 0)) return 0;
  return mondNu('rar', gBar_m_s2 / gDagger_m_s2) * gBar_m_s2;
}

export interface AccelerationPoint {
  radiusKpc: number;
  /** v_obs^2 / R, m/s^2, with its error from the speed error (2 dv / v, first order). */
  gObs: number;
  gObsErr: number;
  /** v_bar^2 / R, m/s^2. */
  gBar: number;
}

/** Observed and baryonic accelerations at each radius; radii where the baryons pull outward (g_bar <= 0) or v_obs = 0 are left out. */
export function accelerationPoints(curve: RotationCurve, ml: MassToLight): AccelerationPoint[] {
  const vBarSq = baryonicSquared(curve, ml);
  const points: AccelerationPoint[] = [];
  curve.radiusKpc.forEach((R, i) => {
    const v = curve.vObs[i];
    if (!(vBarSq[i] > 0) || !(v > 0)) return;
    const gObs = ((v * v) / R) * ACCEL_UNIT_M_S2;
    points.push({ radiusKpc: R, gObs, gObsErr: (2 * curve.vErr[i] * gObs) / v, gBar: (vBarSq[i] / R) * ACCEL_UNIT_M_S2 });
  });
  return points;
}

/** Scatter about the relation: rms and mean of log10(g_obs / g_rar(g_bar)), dex. */
export function rarScatter(points: AccelerationPoint[], gDagger_m_s2 = RAR_G_DAGGER_M_S2): { rms_dex: number; mean_dex: number; points: number } {
  if (points.length === 0) return { rms_dex: NaN, mean_dex: NaN, points: 0 };
  const d = points.map((p) => Math.log10(p.gObs / rarAcceleration(p.gBar, gDagger_m_s2)));
  const mean = d.reduce((s, x) => s + x, 0) / d.length;
  return { rms_dex: Math.sqrt(d.reduce((s, x) => s + x * x, 0) / d.length), mean_dex: mean, points: d.length };
}

/** Baryonic Tully-Fisher relation v^4 = G M a0 (Milgrom 1983): the flat speed, km/s, of a baryonic mass in Msun. */
export const btfrSpeed = (mass_Msun: number, a0_m_s2 = 1.2e-10): number => Math.pow(G * mass_Msun * accelFromSI(a0_m_s2), 0.25);

/** The same relation read the other way: the baryonic mass, Msun, of a flat speed in km/s. */
export const btfrMass = (vFlat_km_s: number, a0_m_s2 = 1.2e-10): number => vFlat_km_s ** 4 / (G * accelFromSI(a0_m_s2));
