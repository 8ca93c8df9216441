import type { RunSpec } from '../../spec/runSpec';
import { seedRng, type RngState } from '../rng';
import { allocateParticles, shiftToCentreOfMassFrame } from '../state';
import { plummerModel, samplePlummer } from './plummer';
import type { MassModel } from './massModel';
import type { InitialConditions } from './types';

export type { Component, InitialConditions } from './types';

/** The analytic mass model a spec's particles are drawn from, without drawing them (cheap enough for previews). */
export function massModelFor(spec: RunSpec): MassModel {
  const model = spec.model;
  switch (model.kind) {
    case 'plummer':
      return plummerModel(model);
    default:
      throw new Error(`model "${model.kind}" is not available yet`);
  }
}

/** Builds the initial particles of a spec from its seed; returns the RNG for whatever draws come later. */
export function buildInitialConditions(spec: RunSpec, rng: RngState = seedRng(spec.seed)): InitialConditions {
  const model = spec.model;
  switch (model.kind) {
    case 'plummer': {
      const particles = allocateParticles(model.n);
      samplePlummer(model, rng, particles, 0, model.n);
      shiftToCentreOfMassFrame(particles);
      return { particles, massModel: massModelFor(spec), components: [{ label: 'Plummer sphere', start: 0, count: model.n }] };
    }
    default:
      throw new Error(`model "${model.kind}" is not available yet`);
  }
}
