import type { z } from 'zod';
import type { MassModel } from '../models/massModel';
import type { FieldSolver } from '../solvers/types';
import type { Accelerations, Points, Sources } from '../state';

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

/**
 * One module per law. Its parameter schema joins the run spec through the
 * registry, so adding a law touches only its own file and one registry line.
 */
export interface LawModule<S extends LawSchema = LawSchema> {
  kind: z.infer<S>['kind'];
  schema: S;
  info(params: z.infer<S>): LawInfo;
  create(params: z.infer<S>, ctx: LawContext): ForceLaw;
  /** In-plane circular acceleration (towards the centre, (km/s)^2/kpc) of a static mass model at R. */
  modelAcceleration(params: z.infer<S>, model: MassModel, R_kpc: number): number;
}

export const defineLaw = <S extends LawSchema>(module: LawModule<S>): LawModule<S> => module;
