import { runSpecSchema } from '../shared/spec';

// Reads units, ranges and defaults for a form field straight from the shared run-spec
// schema, so the form can never disagree with what the server accepts.

type AnySchema = {
  _zod: { def: { type: string; [k: string]: unknown } };
  description?: string;
  minValue?: number | null;
  maxValue?: number | null;
  isInt?: boolean;
};

type Def = AnySchema['_zod']['def'] & {
  innerType?: AnySchema;
  shape?: Record<string, AnySchema>;
  options?: AnySchema[];
  defaultValue?: unknown;
  checks?: { _zod: { def: { check: string; value?: number; inclusive?: boolean } } }[];
};

const def = (s: AnySchema) => s._zod.def as Def;

function unwrap(s: AnySchema): { schema: AnySchema; optional: boolean; fallback?: unknown } {
  let optional = false;
  let fallback: unknown;
  let cur = s;
  for (;;) {
    const d = def(cur);
    if (d.type === 'optional') optional = true;
    else if (d.type === 'default') fallback = d.defaultValue;
    else break;
    cur = d.innerType!;
  }
  return { schema: cur, optional, fallback };
}

/** The schema at a path of the spec; a union picks the member whose `kind` matches the draft. */
export function schemaAt(path: readonly (string | number)[], draft: unknown, root: AnySchema = runSpecSchema as unknown as AnySchema): AnySchema | null {
  let schema: AnySchema | null = root;
  let value: unknown = draft;
  for (const key of path) {
    if (!schema) return null;
    let s: AnySchema = unwrap(schema).schema;
    const d = def(s);
    if (d.type === 'union') {
      const kind = (value as { kind?: string } | undefined)?.kind;
      const member = d.options?.find((o) => {
        const k = def(unwrap(o).schema).shape?.kind;
        return k && (def(k) as Def & { values?: unknown[] }).values?.includes(kind);
      });
      if (!member) return null;
      s = unwrap(member).schema;
    }
    // A tuple (the external field vector) is walked by index.
    schema = def(s).shape?.[String(key)] ?? (def(s) as Def & { items?: AnySchema[] }).items?.[Number(key)] ?? null;
    value = (value as Record<string, unknown> | undefined)?.[key as string];
  }
  return schema;
}

export interface FieldBounds {
  min?: number;
  max?: number;
  /** The minimum itself is not allowed (e.g. "positive"). */
  exclusiveMin: boolean;
  integer: boolean;
  optional: boolean;
  fallback?: unknown;
  description?: string;
}

export function fieldBounds(path: readonly (string | number)[], draft: unknown): FieldBounds {
  const found = schemaAt(path, draft);
  if (!found) return { exclusiveMin: false, integer: false, optional: false };
  const { schema, optional, fallback } = unwrap(found);
  const checks = def(schema).checks ?? [];
  const lower = checks.find((c) => c._zod.def.check === 'greater_than');
  return {
    min: schema.minValue ?? undefined,
    // An integer with no stated maximum reports the largest safe integer: that is no limit to show.
    max: schema.maxValue === null || schema.maxValue === undefined || schema.maxValue >= Number.MAX_SAFE_INTEGER ? undefined : schema.maxValue,
    exclusiveMin: lower ? lower._zod.def.inclusive === false : false,
    integer: Boolean(schema.isInt),
    optional,
    fallback,
    description: found.description ?? schema.description,
  };
}

/** The options of an enum field, e.g. integrator or MOND interpolation. */
export function enumOptions(path: readonly (string | number)[], draft: unknown): string[] {
  const found = schemaAt(path, draft);
  if (!found) return [];
  const d = def(unwrap(found).schema) as Def & { entries?: Record<string, string> };
  return d.entries ? Object.values(d.entries) : [];
}
