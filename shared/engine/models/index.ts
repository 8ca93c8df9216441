import type { LawSpec, RunSpec, SystemSpec } from '../../spec/runSpec';
import { equilibriumLawOf, systemParticles } from '../../spec/runSpec';
import { seedRng, type RngState } from '../rng';
import { makeSolver } from '../solvers';
import { allocateParticles, shiftToCentreOfMassFrame, type ParticleState } from '../state';
import { diskGalaxyModel, sampleDiskGalaxy } from './disk';
import { placeOnOrbit, tiltAboutX } from './encounter';
import { haloProfile, sampleHaloPositions } from './halo';
import { hernquistModel, hernquistProfile, sampleHernquistPositions } from './hernquist';
import { assignIsotropicVelocities, isotropicSpeedSampler, softenedSphericalModel } from './isotropic';
import { keplerModel, placeKeplerPair } from './kepler';
import { combinedModel, sphericalModel, type MassModel } from './massModel';
import { plummerModel, plummerProfile, samplePlummerPositions } from './plummer';
import { tableModel, tableParticles } from './table';
import type { Component, InitialConditions } from './types';

export type { Component, InitialConditions } from './types';
export type { MassModel } from './massModel';

function systemModel(s: SystemSpec, softening_kpc: number): MassModel {
  if (s.kind === 'disk') return diskGalaxyModel(s, softening_kpc);
  const sphere = s.kind === 'plummer' ? plummerModel(s) : hernquistModel(s);
  if (!s.halo) return sphere;
  return { ...combinedModel([sphere, sphericalModel(haloProfile(s.halo))]), extent_kpc: sphere.extent_kpc };
}

const systemMass = (s: SystemSpec): number =>
  s.mass_Msun + (s.kind === 'disk' && s.bulge ? s.bulge.mass_Msun : 0) + (s.halo?.mass_Msun ?? 0);

/**
 * Samples one system into out[start..start+n+halo.n), centred on its own
 * centre of mass, with velocities balanced in its own field under its
 * equilibrium law. A live halo follows the system's own particles; each part
 * gets its isotropic distribution function in the total field of both.
 */
function sampleSystem(s: SystemSpec, spec: RunSpec, rng: RngState, out: ParticleState, start: number, label: string): Component[] {
  const law = equilibriumLawOf(s, spec);
  let parts: Component[];
  switch (s.kind) {
    case 'plummer':
    case 'hernquist': {
      const profile = s.kind === 'plummer' ? plummerProfile(s) : hernquistProfile(s);
      (s.kind === 'plummer' ? samplePlummerPositions : sampleHernquistPositions)(s, rng, out, start, s.n);
      if (s.halo) sampleHaloPositions(s.halo, rng, out, start + s.n);
      const halo = s.halo && haloProfile(s.halo);
      const own = softenedSphericalModel(profile, spec.softening_kpc);
      const field = halo ? combinedModel([own, softenedSphericalModel(halo, spec.softening_kpc)]) : own;
      assignIsotropicVelocities(out, start, s.n, isotropicSpeedSampler(profile, field, law), rng);
      parts = [{ label: s.kind === 'plummer' ? 'Plummer sphere' : 'Hernquist sphere', start, count: s.n }];
      if (s.halo && halo) {
        assignIsotropicVelocities(out, start + s.n, s.halo.n, isotropicSpeedSampler(halo, field, law), rng);
        parts.push({ label: 'halo', start: start + s.n, count: s.halo.n });
      }
      break;
    }
    case 'disk':
      parts = sampleDiskGalaxy(s, law, { solver: makeSolver(spec.solver), softening_kpc: spec.softening_kpc }, rng, out, start);
      break;
  }
  // Centre this system alone: a view of the subarrays is a particle set of its own.
  const count = systemParticles(s);
  const view = (a: Float64Array) => a.subarray(start, start + count);
  shiftToCentreOfMassFrame({
    n: count, x: view(out.x), y: view(out.y), z: view(out.z), vx: view(out.vx), vy: view(out.vy), vz: view(out.vz),
    m: view(out.m), ax: view(out.ax), ay: view(out.ay), az: view(out.az),
  });
  return label ? parts.map((c) => ({ ...c, label: `${label} ${c.label}` })) : parts;
}

/** The law one system's velocities were balanced for, and whether it is the run's own. */
export interface BalancedSystem {
  system: string;
  law: LawSpec;
  ownLaw: boolean;
}

// Parsed law specs carry their keys in schema order, so equal laws serialise equally.
const sameLaw = (a: LawSpec, b: LawSpec): boolean => JSON.stringify(a) === JSON.stringify(b);

/**
 * Which law each system's initial velocities balance: spheres, disks and each
 * side of an encounter per their equilibrium law; a Kepler pair is a Newtonian
 * orbit; uploaded particles keep their own velocities (no entry).
 */
export function balancedSystems(spec: RunSpec): BalancedSystem[] {
  const entry = (system: string, law: LawSpec): BalancedSystem => ({ system, law, ownLaw: sameLaw(law, spec.law) });
  const model = spec.model;
  switch (model.kind) {
    case 'kepler':
      return [entry('Kepler pair', { kind: 'newton' })];
    case 'table':
      return [];
    case 'encounter':
      return [entry('primary', equilibriumLawOf(model.primary, spec)), entry('secondary', equilibriumLawOf(model.secondary, spec))];
    default:
      return [entry(model.kind, equilibriumLawOf(model, spec))];
  }
}

/**
 * The analytic mass model a spec's particles are drawn from, without drawing
 * them (cheap enough for previews). An encounter is represented by its
 * primary; an uploaded table by its own spherically averaged profile.
 */
export function massModelFor(spec: RunSpec): MassModel {
  const model = spec.model;
  switch (model.kind) {
    case 'kepler':
      return keplerModel(model);
    case 'encounter':
      return systemModel(model.primary, spec.softening_kpc);
    case 'table':
      return tableModel(model);
    default:
      return systemModel(model, spec.softening_kpc);
  }
}

/** Builds the initial particles of a spec from its seed, drawing from `rng` (which later draws continue). */
export function buildInitialConditions(spec: RunSpec, rng: RngState = seedRng(spec.seed)): InitialConditions {
  const model = spec.model;
  switch (model.kind) {
    case 'kepler': {
      const particles = allocateParticles(2);
      placeKeplerPair(model, particles);
      return { particles, massModel: massModelFor(spec), components: [{ label: 'body 1', start: 0, count: 1 }, { label: 'body 2', start: 1, count: 1 }] };
    }
    case 'table': {
      const particles = tableParticles(model);
      return { particles, massModel: massModelFor(spec), components: [{ label: 'uploaded', start: 0, count: particles.n }] };
    }
    case 'encounter': {
      const n1 = systemParticles(model.primary), n2 = systemParticles(model.secondary);
      const particles = allocateParticles(n1 + n2);
      const components = [
        ...sampleSystem(model.primary, spec, rng, particles, 0, 'primary'),
        ...sampleSystem(model.secondary, spec, rng, particles, n1, 'secondary'),
      ];
      tiltAboutX(particles, 0, n1, model.primaryTilt_deg);
      tiltAboutX(particles, n1, n2, model.secondaryTilt_deg);
      placeOnOrbit(particles, model, n1, systemMass(model.primary), systemMass(model.secondary));
      return { particles, massModel: massModelFor(spec), components };
    }
    default: {
      const particles = allocateParticles(systemParticles(model));
      const components = sampleSystem(model, spec, rng, particles, 0, '');
      return { particles, massModel: massModelFor(spec), components };
    }
  }
}
