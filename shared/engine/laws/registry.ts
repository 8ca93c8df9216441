import { z } from 'zod';
import { emergentLaw } from './emergent';
import { haloLaw } from './halo';
import { mondLaw } from './mond';
import { newtonLaw } from './newton';
import { qumondLaw } from './qumond';
import type { ForceLaw, LawContext, LawInfo, LawModule } from './types';
import { yukawaLaw } from './yukawa';
import type { MassModel } from '../models/massModel';

/** Every force law the engine offers. A new law is one module plus one line here. */
export const LAW_MODULES = [
  newtonLaw,
  haloLaw,
  mondLaw,
  qumondLaw,
  emergentLaw,
  yukawaLaw,
] as const;

type SchemasOf<T extends readonly LawModule<any>[]> = { -readonly [K in keyof T]: T[K] extends LawModule<infer S> ? S : never };

export const lawSchema = z.discriminatedUnion(
  'kind',
  LAW_MODULES.map((m) => m.schema) as unknown as SchemasOf<typeof LAW_MODULES>,
);

export type LawSpec = z.infer<typeof lawSchema>;
export type LawKind = LawSpec['kind'];

// Each module checks its own parameters; the registry only dispatches on kind.
function moduleFor(law: LawSpec): LawModule<any> {
  const found = LAW_MODULES.find((m) => m.kind === law.kind);
  if (!found) throw new Error(`unknown force law "${law.kind}"`);
  return found;
}

export const lawInfo = (law: LawSpec): LawInfo => moduleFor(law).info(law);
export const createLaw = (law: LawSpec, ctx: LawContext): ForceLaw => moduleFor(law).create(law, ctx);
export const modelAcceleration = (law: LawSpec, model: MassModel, R_kpc: number): number =>
  moduleFor(law).modelAcceleration(law, model, R_kpc);
