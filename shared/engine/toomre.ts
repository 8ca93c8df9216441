import type { ToomreProfile } from './diagnostics';
import type { ForceLaw } from './laws/types';
import { TOOMRE_STELLAR } from './models/disk';
import { circularSpeedFromForces } from './rotationCurves';
import { densityCentre, type DensityCentre } from './centre';
import type { ParticleState } from './state';
import { G } from './units';

/** Bins shorter than this give a dispersion too noisy to quote (common practice). */
const MIN_PARTICLES_PER_BIN = 20;

/**
 * Toomre (1964) Q = sigma_R kappa / (3.36 G Sigma) in radial bins of the disk
 * plane, from the disk particles (index range) about the density centre
 * (its position, and the mean velocity of the particles that define it).
 * kappa comes from the circular speed of the law's field sampled at probes,
 * kappa^2 = 2 vc^2 / R^2 + (1/R) d(vc^2)/dR by central differences. G is
 * taken times `coupling`, the law's short-range coupling (Yukawa: 1 + alpha),
 * as a disk's set-up takes it, so Q is the stability margin under the law.
 */
export function toomreProfile(
  p: ParticleState,
  law: ForceLaw,
  disk: { start: number; count: number },
  maxRadius_kpc: number,
  bins: number,
  c: DensityCentre = densityCentre(p, p),
  coupling = 1,
): ToomreProfile {
  const width = maxRadius_kpc / bins;
  const mass = new Float64Array(bins), sumV = new Float64Array(bins), sumV2 = new Float64Array(bins), counts = new Int32Array(bins);
  for (let i = disk.start; i < disk.start + disk.count; i++) {
    const x = p.x[i] - c.x, y = p.y[i] - c.y;
    const R = Math.hypot(x, y);
    const k = Math.floor(R / width);
    if (R === 0 || k >= bins) continue;
    const vR = (x * (p.vx[i] - c.vx) + y * (p.vy[i] - c.vy)) / R;
    mass[k] += p.m[i];
    sumV[k] += p.m[i] * vR;
    sumV2[k] += p.m[i] * vR * vR;
    counts[k]++;
  }
  const centres = Array.from({ length: bins }, (_, k) => (k + 0.5) * width);
  const h = 0.25 * width;
  const probeRadii = centres.flatMap((R) => [R - h, R, R + h]);
  const vc = circularSpeedFromForces(p, law, probeRadii, c);
  const q = centres.map((R, k) => {
    if (counts[k] < MIN_PARTICLES_PER_BIN) return null;
    const [vm, v0, vp] = [vc[3 * k], vc[3 * k + 1], vc[3 * k + 2]];
    const kappa2 = (2 * v0 * v0) / (R * R) + (vp * vp - vm * vm) / (2 * h * R);
    if (kappa2 <= 0) return null;
    const mean = sumV[k] / mass[k];
    const sigmaR = Math.sqrt(Math.max(0, sumV2[k] / mass[k] - mean * mean));
    const area = Math.PI * ((R + 0.5 * width) ** 2 - (R - 0.5 * width) ** 2);
    return (sigmaR * Math.sqrt(kappa2)) / (TOOMRE_STELLAR * G * coupling * (mass[k] / area));
  });
  return { radius_kpc: centres, q };
}
