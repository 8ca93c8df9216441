import type { RunSpec } from '../../spec/runSpec';
import { lagrangianRadii } from '../diagnostics';
import { radialProfile } from '../radialProfile';
import { allocateParticles, centreOfMass, shiftToCentreOfMassFrame, type ParticleState } from '../state';
import { sphericalModel, type MassModel } from './massModel';

type TableSpec = Extract<RunSpec['model'], { kind: 'table' }>;

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
