// The model registry's dispatcher: what the engine does with a spec's model,
// whichever module it comes from.
import type { RunSpec } from '../../spec/runSpec';
import { seedRng, type RngState } from '../rng';
import type { LawSpec } from '../laws/registry';
import type { MassModel } from './massModel';
import { modelModule } from './registry';
import type { BalancedSystem, InitialConditions } from './types';

export type { BalancedSystem, Component, InitialConditions, ModelModule, ModelTraits, SystemModule } from './types';
export type { MassModel } from './massModel';
export { MODEL_MODULES, modelComponents, modelJsonSchema, modelLabel, modelModule, modelModules, modelName, modelPreset, modelSchema, modelTraits } from './registry';
export type { ModelKind, ModelSpec } from './registry';
export { SYSTEM_MODULES, systemModule, systemSchema } from './systems';
export type { SystemSpec } from './systems';
export { LIVE_HALO_PRESET, systemParticles } from './fields';
export { PART_COLOUR_TOKENS, partLook } from './parts';
export type { PartColourToken, PartLook } from './parts';
export type { HaloSpec } from './fields';

// Parsed law specs carry their keys in schema order, so equal laws serialise equally.
const sameLaw = (a: LawSpec, b: LawSpec): boolean => JSON.stringify(a) === JSON.stringify(b);

/**
 * Which law each system's initial velocities balance (spheres, disks and each
 * side of an encounter per their equilibrium law; a Kepler pair is a Newtonian
 * orbit; uploaded particles keep their own velocities: no entry).
 */
export function balancedSystems(spec: RunSpec): BalancedSystem[] {
  return modelModule(spec.model.kind)
    .balanced(spec.model, spec)
    .map(({ system, law }) => ({ system, law, ownLaw: sameLaw(law, spec.law) }));
}

/**
 * The analytic mass model a spec's particles are drawn from, without drawing
 * them (cheap enough for previews). An encounter is represented by its
 * primary; an uploaded table by its own spherically averaged profile.
 */
export function massModelFor(spec: RunSpec): MassModel {
  return modelModule(spec.model.kind).massModel(spec.model, spec.softening_kpc);
}

/** Builds the initial particles of a spec from its seed, drawing from `rng` (which later draws continue). */
export function buildInitialConditions(spec: RunSpec, rng: RngState = seedRng(spec.seed)): InitialConditions {
  const { particles, components } = modelModule(spec.model.kind).build(spec.model, spec, rng);
  return { particles, massModel: massModelFor(spec), components };
}
