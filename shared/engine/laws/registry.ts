import { z } from 'zod';
import { LAW_MODULES } from './list';
import type { ForceLaw, LawColourToken, LawContext, LawFitFamily, LawInfo, LawModule } from './types';
import type { MassModel } from '../models/massModel';

export { LAW_MODULES };

type SchemasOf<T extends readonly LawModule<any>[]> = { -readonly [K in keyof T]: T[K] extends LawModule<infer S> ? S : never };

export const lawSchema = z.discriminatedUnion(
  'kind',
  LAW_MODULES.map((m) => m.schema) as unknown as SchemasOf<typeof LAW_MODULES>,
);

export type LawSpec = z.infer<typeof lawSchema>;
export type LawKind = LawSpec['kind'];
/** A law as a client may send it: defaults not yet filled in. */
export type LawSpecInput = z.input<typeof lawSchema>;

export const lawModules = (): readonly LawModule<any>[] => LAW_MODULES;

/** The module of a law kind; unknown kinds are refused by name. */
export function lawModule(kind: string): LawModule<any> {
  const found = LAW_MODULES.find((m) => m.kind === kind);
  if (!found) throw new Error(`unknown force law "${kind}"`);
  return found;
}

// Each module checks its own parameters; the registry only dispatches on kind.
export const lawInfo = (law: LawSpec): LawInfo => lawModule(law.kind).info(law);
export const createLaw = (law: LawSpec, ctx: LawContext): ForceLaw => lawModule(law.kind).create(law, ctx);
export const modelAcceleration = (law: LawSpec, model: MassModel, R_kpc: number): number =>
  lawModule(law.kind).modelAcceleration(law, model, R_kpc);

/** Factor on G in Toomre's Q of a disk balanced for the law (LawModule.localCoupling). */
export const localCoupling = (law: LawSpec): number => lawModule(law.kind).localCoupling?.(law) ?? 1;

/** The law's parameters as JSON Schema (titles, units, option labels from `.meta`): what forms are generated from. */
export const lawJsonSchema = (kind: string) => z.toJSONSchema(lawModule(kind).schema, { io: 'input' });

export const lawLabel = (kind: string): string => lawModule(kind).label;
export const lawShortLabel = (kind: string): string => lawModule(kind).shortLabel;
/** The short name for lists, tags, run names and mail; a kind no module has (a stored run from a retired law) reads as itself. */
export function lawName(kind: string): string {
  return LAW_MODULES.find((m) => m.kind === kind)?.shortLabel ?? kind;
}
export const lawColour = (kind: string): LawColourToken => lawModule(kind).colour;
/** The law's starting parameters for the launch form (a fresh copy). */
export const lawPreset = (kind: string): LawSpecInput => structuredClone(lawModule(kind).preset);
/** 2K/|W| is a fair equilibrium measure for this law (else read the Clausius ratio). */
export const usesPotentialVirial = (kind: string): boolean => lawModule(kind).virial === 'potential';
/** What the law conserves (for any parameters), so drifts can be read as checks or as physics. */
export function lawConservation(kind: string): Pick<LawInfo, 'conservesEnergy' | 'conservesMomentum' | 'conservesAngularMomentum' | 'hasPotential'> {
  const m = lawModule(kind);
  const { conservesEnergy, conservesMomentum, conservesAngularMomentum, hasPotential } = m.info(m.schema.parse(m.preset));
  return { conservesEnergy, conservesMomentum, conservesAngularMomentum, hasPotential };
}

function withRole(role: 'reference' | 'preferredPartner'): LawModule<any> {
  const found = LAW_MODULES.find((m: LawModule<any>) => m[role]);
  if (!found) throw new Error(`no force law is marked ${role}`);
  return found;
}

/** The Newtonian reference law, parsed (drawn beside other laws' curves; the law of a Kepler orbit). */
export const referenceLaw = (): LawSpec => lawSchema.parse(withRole('reference').preset);
export const isReferenceLaw = (kind: string): boolean => Boolean(lawModule(kind).reference);

/** The other law a new pair starts with when the first is `kind`. */
export function defaultPairLaw(kind: string): LawSpec {
  const m = lawModule(kind).pairsWithReference ? withRole('reference') : withRole('preferredPartner');
  return lawSchema.parse(m.preset);
}

/** The other law of a pair built from a galaxy's fit. */
export function galaxyPairLaw(): LawSpec {
  const m = withRole('preferredPartner');
  return lawSchema.parse(m.galaxyPairPreset ?? m.preset);
}

/** Every way to fit an observed rotation curve, over all laws, in registry order. */
export const fitFamilies = (): LawFitFamily[] => LAW_MODULES.flatMap((m: LawModule<any>) => m.fits ?? []);

/** The fit family stored under `id`. */
export function fitFamily(id: string): LawFitFamily {
  const found = fitFamilies().find((f) => f.id === id);
  if (!found) throw new Error(`unknown fit "${id}"`);
  return found;
}

/** Work per force evaluation beyond the pair sum (a grid), in pair interactions, for the quota's estimate. */
export const extraInteractions = (law: LawSpec): number => lawModule(law.kind).extraInteractions?.(law) ?? 0;
