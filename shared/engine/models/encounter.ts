import { z } from 'zod';
import { groupDigits, LIMITS } from '../../spec/limits';
import { allocateParticles, type ParticleState } from '../state';
import { G } from '../units';
import { length } from './fields';
import { sampleSystem, equilibriumLawOf } from './system';
import { systemModule, systemSchema, type SystemSpec } from './systems';
import { defineModel } from './types';

const tilt = z.number().min(-180).max(180).default(0);
const schema = z
  .strictObject({
    kind: z.literal('encounter'),
    primary: systemSchema.meta({ title: 'Primary' }),
    secondary: systemSchema.meta({ title: 'Secondary' }),
    pericentre_kpc: length.describe('pericentre of the parabolic point-mass orbit').meta({ title: 'Pericentre' }),
    initialSeparation_kpc: length.describe('starting distance between the two centres').meta({ title: 'Starting separation' }),
    primaryTilt_deg: tilt.describe('rotation of the primary about the x axis (orbit in the x-y plane)').meta({ title: 'Primary tilt' }),
    secondaryTilt_deg: tilt.meta({ title: 'Secondary tilt' }),
  })
  .describe('Two systems approaching on a parabolic orbit');

type EncounterSpec = z.infer<typeof schema>;
const MEMBERS = ['primary', 'secondary'] as const;

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

const particlesOf = (s: SystemSpec): number => systemModule(s.kind).particleCount(s);

export const encounterModule = defineModel({
  kind: 'encounter',
  schema,
  label: 'Encounter',
  note: 'Two systems on a parabolic orbit towards each other.',
  // An invented example pair of spheres, sized to run in seconds under the default timestep.
  preset: {
    kind: 'encounter',
    primary: { kind: 'plummer', n: 600, mass_Msun: 2e10, scale_kpc: 1.5 },
    secondary: { kind: 'plummer', n: 300, mass_Msun: 1e10, scale_kpc: 1 },
    pericentre_kpc: 8,
    initialSeparation_kpc: 40,
    primaryTilt_deg: 0,
    secondaryTilt_deg: 30,
  },
  traits: { geometry: 'flattened', systems: 2 },
  components: (e) => MEMBERS.flatMap((k) => systemModule(e[k].kind).components(e[k]).map((c) => `${k} ${c}`)),
  particleCount: (e) => particlesOf(e.primary) + particlesOf(e.secondary),
  particleFields: () => ['primary.n', 'secondary.n'],
  balancedPaths: [['primary'], ['secondary']],
  equalMass: () => false,
  // Represented by its primary.
  massModel: (e, softening_kpc) => systemModule(e.primary.kind).massModel(e.primary, softening_kpc),
  build(e, spec, rng) {
    const n1 = particlesOf(e.primary), n2 = particlesOf(e.secondary);
    const particles = allocateParticles(n1 + n2);
    const components = [
      ...sampleSystem(systemModule(e.primary.kind), e.primary, { spec, rng }, particles, 0, 'primary'),
      ...sampleSystem(systemModule(e.secondary.kind), e.secondary, { spec, rng }, particles, n1, 'secondary'),
    ];
    tiltAboutX(particles, 0, n1, e.primaryTilt_deg);
    tiltAboutX(particles, n1, n2, e.secondaryTilt_deg);
    placeOnOrbit(particles, e, n1, systemModule(e.primary.kind).mass(e.primary), systemModule(e.secondary.kind).mass(e.secondary));
    return { particles, components };
  },
  balanced: (e, spec) => MEMBERS.map((k) => ({ system: k, law: equilibriumLawOf(systemModule(e[k].kind), e[k], spec) })),
  check(e, path, ctx) {
    // Parts may be missing when the fields themselves are already reported.
    for (const k of MEMBERS) if (e[k]) systemModule(e[k].kind).checkSystem(e[k], [...path, k], ctx);
    if (!e.primary || !e.secondary) return;
    if (particlesOf(e.primary) + particlesOf(e.secondary) > LIMITS.maxParticles) {
      ctx.addIssue({ code: 'custom', path: [...path, 'secondary', 'n'], message: `The two systems hold ${groupDigits(particlesOf(e.primary) + particlesOf(e.secondary))} particles with their haloes; at most ${groupDigits(LIMITS.maxParticles)} are allowed` });
    }
    if (e.initialSeparation_kpc < e.pericentre_kpc) {
      ctx.addIssue({ code: 'custom', path: [...path, 'initialSeparation_kpc'], message: `Initial separation ${e.initialSeparation_kpc} kpc must be at least the pericentre (${e.pericentre_kpc} kpc)` });
    }
  },
});
