import { z } from 'zod';
import { diskModule } from './disk';
import { encounterModule } from './encounter';
import { hernquistModule } from './hernquist';
import { keplerModule } from './kepler';
import { plummerModule } from './plummer';
import { tableModule } from './table';
import type { ModelModule } from './types';

/** Every initial-conditions model the engine offers. A new model is one module plus one line here (and one in systems.ts if an encounter may hold it). */
export const MODEL_MODULES = [
  keplerModule,
  plummerModule,
  hernquistModule,
  diskModule,
  encounterModule,
  tableModule,
] as const;

type SchemasOf<T extends readonly ModelModule<any>[]> = { -readonly [K in keyof T]: T[K] extends ModelModule<infer S> ? S : never };

export const modelSchema = z.discriminatedUnion(
  'kind',
  MODEL_MODULES.map((m) => m.schema) as unknown as SchemasOf<typeof MODEL_MODULES>,
);

export type ModelSpec = z.infer<typeof modelSchema>;
export type ModelKind = ModelSpec['kind'];

export const modelModules = (): readonly ModelModule<any>[] => MODEL_MODULES;

/** The module of a model kind; unknown kinds are refused by name. */
export function modelModule(kind: string): ModelModule<any> {
  const found = MODEL_MODULES.find((m) => m.kind === kind);
  if (!found) throw new Error(`unknown model "${kind}"`);
  return found;
}

/** The model's fields as JSON Schema (titles, units, option labels from `.meta`): what forms are generated from. */
export const modelJsonSchema = (kind: string) => z.toJSONSchema(modelModule(kind).schema, { io: 'input' });

export const modelLabel = (kind: string): string => modelModule(kind).label;
export const modelPreset = (kind: string): z.input<typeof modelSchema> => structuredClone(modelModule(kind).preset);
export const modelComponents = (model: ModelSpec): string[] => modelModule(model.kind).components(model);
export const modelTraits = (kind: string) => modelModule(kind).traits;
