import type { z } from 'zod';
import { referenceLaw, type LawSpec } from '../laws/registry';
import { allocateParticles, shiftToCentreOfMassFrame, type ParticleState } from '../state';
import { checkSystemParticles, systemParticles, type HaloSpec } from './fields';
import type { Component, ModelSchema, SampleContext, SpecContext, SystemDefinition, SystemModule } from './types';

type SystemParams = { kind: string; n: number; halo?: HaloSpec; equilibriumLaw?: LawSpec };

/** The law a system's velocities are balanced for: its own equilibriumLaw, else the run's law (a version-1 sphere: the reference). */
export function equilibriumLawOf(module: Pick<SystemModule, 'version1Reference'>, system: SystemParams, spec: Pick<SpecContext, 'version' | 'law'>): LawSpec {
  if (system.equilibriumLaw) return system.equilibriumLaw;
  return spec.version === 1 && module.version1Reference ? referenceLaw() : spec.law;
}

/**
 * Samples one system into out[start..start+n+halo.n), centred on its own
 * centre of mass, with velocities balanced in its own field under its
 * equilibrium law; `label` prefixes its parts' labels (an encounter's members).
 */
export function sampleSystem<S extends ModelSchema>(
  module: SystemModule<S>, s: z.infer<S>, ctx: SampleContext, out: ParticleState, start: number, label: string,
): Component[] {
  const parts = module.sample(s, equilibriumLawOf(module, s as SystemParams, ctx.spec), ctx, out, start);
  // Centre this system alone: a view of the subarrays is a particle set of its own.
  const count = systemParticles(s as SystemParams);
  const view = (a: Float64Array) => a.subarray(start, start + count);
  shiftToCentreOfMassFrame({
    n: count, x: view(out.x), y: view(out.y), z: view(out.z), vx: view(out.vx), vy: view(out.vy), vz: view(out.vz),
    m: view(out.m), ax: view(out.ax), ay: view(out.ay), az: view(out.az),
  });
  return label ? parts.map((c) => ({ ...c, label: `${label} ${c.label}` })) : parts;
}

/** A system module standing as a model of its own: one system, optionally with a live halo. */
export function defineSystem<S extends ModelSchema>(def: SystemDefinition<S>): SystemModule<S> {
  const module: SystemModule<S> = {
    ...def,
    particleCount: (s) => systemParticles(s as SystemParams),
    particleFields: (s) => ((s as SystemParams).halo ? ['n', 'halo.n'] : ['n']),
    balancedPaths: [[]],
    // A live halo's particles weigh what its own mass and count make them.
    equalMass: (s) => !(s as SystemParams).halo,
    build(s, spec, rng) {
      const particles = allocateParticles(systemParticles(s as SystemParams));
      return { particles, components: sampleSystem(module, s, { spec, rng }, particles, 0, '') };
    },
    balanced: (s, spec) => [{ system: (s as SystemParams).kind, law: equilibriumLawOf(module, s as SystemParams, spec) }],
    check(s, path, ctx) {
      def.checkSystem(s, path, ctx);
      checkSystemParticles(s as SystemParams, path, ctx);
    },
  };
  return module;
}
