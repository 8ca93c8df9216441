import type { z } from 'zod';
import type { MassModel } from '../models/massModel';
import type { FieldSolver, PairKernelDefinition } from '../solvers/types';
import type { Accelerations, Points, Sources } from '../state';
import type { EngineWarning } from '../timescales';
import type { ModelTraits } from '../models/types';
import type { LawSpec } from './registry';

/** What the UI shows about a law, and what the diagnostics may claim. */
export interface LawInfo {
  kind: string;
  label: string;
  conservesEnergy: boolean;
  conservesMomentum: boolean;
  conservesAngularMomentum: boolean;
  /** Whether a potential energy exists, so E and its drift can be reported. */
  hasPotential: boolean;
  /** Where the law (as implemented here) may be trusted. */
  validity: string;
  notes: string;
  /** Where a law's runs carry artefacts of its form: which measured quantities mean something and which do not. */
  readings?: { meaningful: string; notMeaningful: string };
}

/** A force law bound to a solver and softening, ready to act on particles. */
export interface ForceLaw {
  readonly info: LawInfo;
  /** Acceleration at each target due to the sources; targets may be the sources themselves. */
  accelerations(sources: Sources, targets: Points, out: Accelerations): void;
  /** Total potential energy, Msun (km/s)^2; absent where the law has none. */
  potentialEnergy?(sources: Sources): number;
  /**
   * The part of potentialEnergy due to fixed external fields (a rigid halo), whose zero
   * point is a convention; absent when there is none. Drifts are scaled by the rest.
   */
  externalPotentialEnergy?(sources: Sources): number;
}

export interface LawContext {
  solver: FieldSolver;
  softening_kpc: number;
  /** The run's initial particles, for laws whose defaults follow the model (the grid box of the field form of MOND). */
  initial?: Sources;
}

type LawSchema = z.ZodObject<{ kind: z.ZodLiteral<string> } & z.ZodRawShape>;

/** Colour tokens a law may take; the app's theme maps each token to a colour. */
export const LAW_COLOUR_TOKENS = ['periwinkle', 'lavender', 'amber', 'ember', 'teal', 'rose'] as const;
export type LawColourToken = (typeof LAW_COLOUR_TOKENS)[number];

/** What a law's notes may read about the run they are for. */
export interface LawNoteContext {
  /** The model's shape and systems, from its module. */
  traits: ModelTraits;
  /** The initial particles and their half-mass radius. */
  particles: Sources;
  halfMassRadius_kpc: number;
}

/** A fitted parameter: natural units outside, value / scale (order one) inside the optimiser. */
export interface FitParam {
  name: string;
  unit: string;
  scale: number;
  min: number;
  max: number;
  starts: number[];
}

/** Law constants a fit holds fixed or fits, as the person asked. */
export interface FitSettings {
  a0: 'fixed' | 'free';
  a0_m_s2: number;
  H0: 'fixed' | 'free';
  H0_km_s_Mpc: number;
}

/** What a finished fit hands back to its family, to build a run's law from it. */
export interface FittedValues {
  params: { name: string; value: number }[];
  derived: Record<string, number>;
}

/**
 * One way of fitting an observed rotation curve under a law (a halo profile, an
 * interpolating function): its parameters and the law's model acceleration at them.
 */
export interface LawFitFamily {
  /** Stored with every fit: never rename. */
  id: string;
  label: string;
  /** What the fitted speed adds to the baryons' (v^2 - v_bar^2): a halo, or the law's boost. */
  extra: 'halo' | 'boost';
  /** Parameters shared across a sample (a single galaxy fits them too). */
  shared(o: FitSettings, sample: boolean): FitParam[];
  /** Per-galaxy law parameters besides the mass-to-light ratios. */
  own(o: FitSettings, sample: boolean): FitParam[];
  /** The law's modelAcceleration with these parameters, prepared once per evaluation. */
  acceleration(shared: number[], own: number[], o: FitSettings): (model: MassModel, R: number) => number;
  derived?(shared: number[], own: number[]): Record<string, number>;
  /** The law a run built from this fit goes under; absent where a fit cannot start a run. */
  runLaw?(fit: FittedValues): LawSpec;
}

/**
 * One module per law. Its parameter schema joins the run spec through the
 * registry, so adding a law touches only its own file and one registry line:
 * everything the app, the server and the engine say or do about the law is read
 * from here (see registry.ts for the accessors).
 */
export interface LawModule<S extends LawSchema = LawSchema> {
  kind: z.infer<S>['kind'];
  /** Parameter schema; every field carries `.meta({ title })` (and option labels for enums) for generated forms. */
  schema: S;
  /** Full name of the law, whatever its parameters (info(params).label names a parameter set). */
  label: string;
  /** Short name for lists, tags and chips. */
  shortLabel: string;
  colour: LawColourToken;
  /** What the launch form starts from when the law is picked. */
  preset: z.input<S>;
  /**
   * How diagnostics judge equilibrium: 2K/|W| ('potential') holds only for a pure
   * softened 1/r pair potential; every other law is judged by the Clausius ratio.
   */
  virial: 'potential' | 'clausius';
  info(params: z.infer<S>): LawInfo;
  create(params: z.infer<S>, ctx: LawContext): ForceLaw;
  /** In-plane circular acceleration (towards the centre, (km/s)^2/kpc) of a static mass model at R. */
  modelAcceleration(params: z.infer<S>, model: MassModel, R_kpc: number): number;
  /**
   * Set when modelAcceleration is not the law's own field but an approximation of it (its
   * words, e.g. 'algebraic form'): curves show it as a preview, and a disk balanced for
   * the law corrects it by the law's measured in-plane pull.
   */
  approximateCurve?: string;
  /**
   * The law's pull between particles much closer than any of its scales, over Newton's (Yukawa:
   * 1 + alpha below lambda). Toomre's Q of a disk balanced for the law is taken with G times
   * this, since the local stability margin is set by the short-range pull. Absent: 1.
   */
  localCoupling?(params: z.infer<S>): number;
  /** Work per force evaluation beyond the pair sum (a grid), in pair interactions, for the quota's cost estimate. */
  extraInteractions?(params: z.infer<S>): number;
  /** The field takes a second or more per evaluation: not recomputed per animation frame. */
  slowField?: boolean;
  /**
   * A field computed on a grid whose passes the worker pool may split across threads:
   * the lengths of its working arrays for these parameters (shared memory is sized from
   * them) and a helper thread's view of a grid the run's thread has published.
   */
  grid?: {
    lengths(params: z.infer<S>, softening_kpc: number): number[];
    view(setup: object, arrays: Float64Array[]): { range(pass: number, from: number, to: number): void };
  };
  /** Notes and warnings on this law for a given run (model, particles). */
  warnings?(params: z.infer<S>, ctx: LawNoteContext): EngineWarning[];
  /** The Newtonian reference: drawn beside every other law's curves, and the law of a Kepler orbit. */
  reference?: boolean;
  /** New pairs with this law take the reference as their other law (else the preferred partner). */
  pairsWithReference?: boolean;
  /** The law new pairs default to, unless the first law pairs with the reference. */
  preferredPartner?: boolean;
  /** Parameters when it is the other law of a pair built from a galaxy's fit (cheaper than the preset). */
  galaxyPairPreset?: z.input<S>;
  /** Ways to fit an observed rotation curve under this law. */
  fits?: readonly LawFitFamily[];
  /**
   * The pair potential its particles interact through, when it is not softened Newton's alone
   * (or is Newton's: the reference declares it): the solvers and threads find it by name here.
   */
  pairKernel?: PairKernelDefinition;
}

export const defineLaw = <S extends LawSchema>(module: LawModule<S>): LawModule<S> => module;
