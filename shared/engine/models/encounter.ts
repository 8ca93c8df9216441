import type { RunSpec } from '../../spec/runSpec';
import type { ParticleState } from '../state';
import { G } from '../units';

type EncounterSpec = Extract<RunSpec['model'], { kind: 'encounter' }>;

/** Rotates particles start..start+count-1 (positions and velocities) about the x axis. */
export function tiltAboutX(p: ParticleState, start: number, count: number, angle_deg: number): void {
  if (angle_deg === 0) return;
  const c = Math.cos((angle_deg * Math.PI) / 180), s = Math.sin((angle_deg * Math.PI) / 180);
  for (let i = start; i < start + count; i++) {
    const y = p.y[i], z = p.z[i], vy = p.vy[i], vz = p.vz[i];
    p.y[i] = c * y - s * z; p.z[i] = s * y + c * z;
    p.vy[i] = c * vy - s * vz; p.vz[i] = s * vy + c * vz;
  }
}

/**
 * Relative position and velocity of the secondary on a parabolic point-mass
 * orbit (e = 1, semi-latus rectum 2q) at separation d, still approaching:
 * cos f = 2q/d - 1 with f < 0, v_r = sqrt(GM/2q) sin f, v_t = sqrt(GM/2q)(1 + cos f).
 */
export function parabolicApproach(totalMass_Msun: number, q_kpc: number, d_kpc: number) {
  const cosF = Math.min(1, 2 * (q_kpc / d_kpc) - 1);
  const f = -Math.acos(cosF);
  const v0 = Math.sqrt((G * totalMass_Msun) / (2 * q_kpc));
  const vr = v0 * Math.sin(f), vt = v0 * (1 + cosF);
  const c = Math.cos(f), s = Math.sin(f);
  return { x: d_kpc * c, y: d_kpc * s, vx: vr * c - vt * s, vy: vr * s + vt * c };
}

/** Places the two (already sampled, centred) systems on the orbit, in the centre-of-mass frame. */
export function placeOnOrbit(p: ParticleState, spec: EncounterSpec, nPrimary: number, m1: number, m2: number): void {
  const rel = parabolicApproach(m1 + m2, spec.pericentre_kpc, spec.initialSeparation_kpc);
  const f1 = m2 / (m1 + m2), f2 = m1 / (m1 + m2);
  for (let i = 0; i < p.n; i++) {
    const w = i < nPrimary ? -f1 : f2;
    p.x[i] += w * rel.x; p.y[i] += w * rel.y;
    p.vx[i] += w * rel.vx; p.vy[i] += w * rel.vy;
  }
}
