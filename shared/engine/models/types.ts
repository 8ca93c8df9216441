import type { z } from 'zod';
import type { LawSpec } from '../laws/registry';
import type { RngState } from '../rng';
import type { ParticleState } from '../state';
import type { SolverSpec } from '../../spec/solver';
import type { MassModel } from './massModel';

/** A named index range of particles (disk, bulge, primary, ...), for colouring and per-part statistics. */
export interface Component {
  label: string;
  start: number;
  count: number;
}

/** Initial conditions together with the analytic model they were drawn from. */
export interface InitialConditions {
  particles: ParticleState;
  massModel: MassModel;
  components: Component[];
}

/**
 * What the models read of a run spec (its type is built from these modules, so
 * they name the fields they need instead).
 */
export interface SpecContext {
  version: number;
  law: LawSpec;
  softening_kpc: number;
  solver: SolverSpec;
}

/** The law one system's velocities were balanced for, and whether it is the run's own. */
export interface BalancedSystem {
  system: string;
  law: LawSpec;
  ownLaw: boolean;
}

/** What a law's notes need to know of a model's shape. */
export interface ModelTraits {
  /** spherical: a symmetric law form is exact for it; flattened: disks and encounters; unknown: uploaded particles. */
  geometry: 'spherical' | 'flattened' | 'unknown';
  /** Systems with centres of their own (an encounter has two). */
  systems: number;
}

export type ModelSchema = z.ZodObject<{ kind: z.ZodLiteral<string> } & z.ZodRawShape>;

/**
 * One module per initial-conditions model. Its schema joins the run spec through
 * the model registry, so a new model touches only its own file and one registry
 * line: the app, the server and the engine read everything else from here.
 */
export interface ModelModule<S extends ModelSchema = ModelSchema> {
  kind: z.infer<S>['kind'];
  /** Parameter schema; every field carries `.meta({ title })` for generated forms and spec tables. */
  schema: S;
  label: string;
  /** One sentence for the model picker. */
  note: string;
  /** What the launch form starts from when the model is picked. */
  preset: z.input<S>;
  traits: ModelTraits;
  /** Labels of the parts its particles are split into, in particle order. */
  components(params: z.infer<S>): string[];
  particleCount(params: z.infer<S>): number;
  /** Paths (below the model) of the fields that set the particle count. */
  particleFields(params: z.infer<S>): string[];
  /** Paths (below the model) of the systems whose velocities a law balances: each may carry equilibriumLaw. */
  balancedPaths: string[][];
  /** Every particle weighs the same, so a snapshot's positions alone give back its mass distribution. */
  equalMass(params: z.infer<S>): boolean;
  /** The analytic model the particles are drawn from (cheap: no particles are drawn). */
  massModel(params: z.infer<S>, softening_kpc: number): MassModel;
  /** Draws the particles from `rng` (later draws continue it). */
  build(params: z.infer<S>, spec: SpecContext, rng: RngState): { particles: ParticleState; components: Component[] };
  /** Which law each system's velocities balance; uploaded particles keep their own (none). */
  balanced(params: z.infer<S>, spec: SpecContext): { system: string; law: LawSpec }[];
  /** Checks across fields, reported at `path` (the model's place in the spec). */
  check?(params: z.infer<S>, path: (string | number)[], ctx: z.RefinementCtx): void;
  /** A bound orbit with a period (a Kepler pair): timestep rules use it, and its closest approach. */
  orbit?(params: z.infer<S>): { period_Myr: number; innerRadius_kpc: number };
  /** The rotating disk part, for Toomre Q profiles. */
  diskPart?(params: z.infer<S>): { component: string; scaleLength_kpc: number };
}

export const defineModel = <S extends ModelSchema>(module: ModelModule<S>): ModelModule<S> => module;

/** How a system is sampled: the run's solver and softening, for laws measured on probe particles. */
export interface SampleContext {
  spec: SpecContext;
  rng: RngState;
}

/**
 * A self-gravitating system (a sphere, a disk): a model of its own, and a member an
 * encounter may hold. Its velocities balance a law's field (equilibriumLaw).
 */
export interface SystemModule<S extends ModelSchema = ModelSchema> extends ModelModule<S> {
  /** Total mass, every part included. */
  mass(params: z.infer<S>): number;
  /** A version-1 spec that named no equilibriumLaw balanced this system for the reference law. */
  version1Reference: boolean;
  /** Specs older than `before` drew this system's velocities another way, said in `text` (shown beside such a run's spec). */
  olderSetUp?: { before: number; text: string };
  /** Draws out[start..start+particleCount) with velocities balanced for `law`; components unprefixed. */
  sample(params: z.infer<S>, law: LawSpec, ctx: SampleContext, out: ParticleState, start: number): Component[];
  /** Its own checks (truncation radii), also run for an encounter's members. */
  checkSystem(params: z.infer<S>, path: (string | number)[], ctx: z.RefinementCtx): void;
}

/** What a system module writes itself; defineSystem (system.ts) adds the rest of a model module. */
export type SystemDefinition<S extends ModelSchema = ModelSchema> = Omit<
  SystemModule<S>,
  'build' | 'balanced' | 'check' | 'particleCount' | 'particleFields' | 'balancedPaths' | 'equalMass'
>;
