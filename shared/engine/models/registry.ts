import { z } from 'zod';
import { MODEL_MODULES } from './list';
import type { ModelModule } from './types';

export { MODEL_MODULES };

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
/** A model's name as people say it; a kind no module has reads as itself. */
export function modelName(kind: string): string {
  return MODEL_MODULES.find((m) => m.kind === kind)?.label ?? kind;
}
export const modelPreset = (kind: string): z.input<typeof modelSchema> => structuredClone(modelModule(kind).preset);
export const modelComponents = (model: ModelSpec): string[] => modelModule(model.kind).components(model);
export const modelTraits = (kind: string) => modelModule(kind).traits;
