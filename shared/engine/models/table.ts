import { z } from 'zod';
import { LIMITS } from '../../spec/limits';
import { lagrangianRadii } from '../diagnostics';
import { radialProfile } from '../radialProfile';
import { allocateParticles, centreOfMass, shiftToCentreOfMassFrame, type ParticleState } from '../state';
import { mass } from './fields';
import { sphericalModel, type MassModel } from './massModel';
import { defineModel } from './types';

const coordinate = z.number().min(-1e5).max(1e5);
const speed = z.number().min(-1e5).max(1e5);
const schema = z
  .strictObject({
    kind: z.literal('table'),
    particles: z
      .array(
        z.strictObject({
          x_kpc: coordinate.meta({ title: 'x' }), y_kpc: coordinate.meta({ title: 'y' }), z_kpc: coordinate.meta({ title: 'z' }),
          vx_km_s: speed.meta({ title: 'vx' }), vy_km_s: speed.meta({ title: 'vy' }), vz_km_s: speed.meta({ title: 'vz' }),
          mass_Msun: mass,
        }),
      )
      .min(2)
      .max(LIMITS.maxTableRows)
      .meta({ title: 'Uploaded particles' }),
    recentre: z.boolean().default(true).describe('move the particles into their centre-of-mass frame').meta({ title: 'Moved to centre-of-mass frame' }),
  })
  .describe('Uploaded particles');

type TableSpec = z.infer<typeof schema>;

export function tableParticles(t: TableSpec): ParticleState {
  const p = allocateParticles(t.particles.length);
  t.particles.forEach((row, i) => {
    p.x[i] = row.x_kpc; p.y[i] = row.y_kpc; p.z[i] = row.z_kpc;
    p.vx[i] = row.vx_km_s; p.vy[i] = row.vy_km_s; p.vz[i] = row.vz_km_s;
    p.m[i] = row.mass_Msun;
  });
  if (t.recentre) shiftToCentreOfMassFrame(p);
  return p;
}

/** Uploaded particles have no analytic model: their spherically averaged profile about the centre of mass stands in. */
export function tableModel(t: TableSpec): MassModel {
  const p = tableParticles(t);
  const c = centreOfMass(p);
  const profile = radialProfile(p, c.x, c.y, c.z);
  const [r50, r90] = lagrangianRadii(p, [0.5, 0.9]);
  return sphericalModel({
    totalMass_Msun: profile.total_Msun,
    outerRadius_kpc: profile.outerRadius_kpc,
    scale_kpc: r50,
    extent_kpc: 1.5 * r90,
    enclosedMass: profile.enclosedMass,
    enclosedMassSlope: profile.enclosedMassSlope,
  });
}

export const tableModule = defineModel({
  kind: 'table',
  schema,
  label: 'Uploaded particles',
  note: 'Your own particles from a file: one per row as x y z [kpc] vx vy vz [km/s] mass [M☉].',
  preset: {
    kind: 'table',
    recentre: true,
    particles: [
      { x_kpc: -1, y_kpc: 0, z_kpc: 0, vx_km_s: 0, vy_km_s: -50, vz_km_s: 0, mass_Msun: 1e9 },
      { x_kpc: 1, y_kpc: 0, z_kpc: 0, vx_km_s: 0, vy_km_s: 50, vz_km_s: 0, mass_Msun: 1e9 },
    ],
  },
  traits: { geometry: 'unknown', systems: 1 },
  components: () => ['uploaded'],
  particleCount: (t) => t.particles.length,
  particleFields: () => ['particles'],
  balancedPaths: [],
  equalMass: () => false,
  massModel: tableModel,
  build(t) {
    const particles = tableParticles(t);
    return { particles, components: [{ label: 'uploaded', start: 0, count: particles.n }] };
  },
  // Uploaded particles keep their own velocities.
  balanced: () => [],
});
