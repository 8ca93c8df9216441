import { z } from 'zod';
import { diskModule } from './disk';
import { hernquistModule } from './hernquist';
import { plummerModule } from './plummer';
import type { SystemModule } from './types';

/** Self-gravitating systems: each is a model of its own, and a member an encounter may hold. */
export const SYSTEM_MODULES = [plummerModule, hernquistModule, diskModule] as const;

type SchemasOf<T extends readonly SystemModule<any>[]> = { -readonly [K in keyof T]: T[K] extends SystemModule<infer S> ? S : never };

export const systemSchema = z.discriminatedUnion(
  'kind',
  SYSTEM_MODULES.map((m) => m.schema) as unknown as SchemasOf<typeof SYSTEM_MODULES>,
);

export type SystemSpec = z.infer<typeof systemSchema>;

export function systemModule(kind: string): SystemModule<any> {
  const found = SYSTEM_MODULES.find((m) => m.kind === kind);
  if (!found) throw new Error(`unknown system "${kind}"`);
  return found;
}
