import { z } from 'zod';
import { runSpecSchema } from '../../shared/spec';
import { unitOf } from '../spec/labels';

// The launch form reads every field it draws from the run spec's JSON Schema (zod's public
// conversion, input side), so a law or model module's schema is all a form needs: numbers with
// their ranges, enums as chips, optional parts as toggles, tuples as rows, unions by `kind`.

/** The subset of JSON Schema (draft 2020-12) that zod emits for the run spec, plus its metadata keys. */
export interface JsonNode {
  type?: string | string[];
  properties?: Record<string, JsonNode>;
  required?: string[];
  oneOf?: JsonNode[];
  anyOf?: JsonNode[];
  enum?: (string | number)[];
  const?: unknown;
  minimum?: number;
  maximum?: number;
  exclusiveMinimum?: number;
  exclusiveMaximum?: number;
  prefixItems?: JsonNode[];
  items?: JsonNode | false;
  default?: unknown;
  examples?: unknown[];
  $ref?: string;
  $defs?: Record<string, JsonNode>;
  // Metadata the schemas carry through `.meta()`.
  title?: string;
  description?: string;
  unit?: string;
  optionLabels?: Record<string, string>;
  optionNotes?: Record<string, string>;
  /** Names of a tuple's members (a vector's x, y, z). */
  itemTitles?: string[];
  /** What a spec table says for an optional field left out. */
  absent?: string;
}

export type Path = readonly (string | number)[];

let specSchemaCache: JsonNode | null = null;

/** The run spec as JSON Schema, what a client may send (defaults not yet applied). */
export function specJsonSchema(): JsonNode {
  specSchemaCache ??= z.toJSONSchema(runSpecSchema, { io: 'input', unrepresentable: 'any' }) as JsonNode;
  return specSchemaCache;
}

function deref(node: JsonNode, root: JsonNode): JsonNode {
  if (!node.$ref) return node;
  const name = node.$ref.replace(/^#\/\$defs\//, '');
  return root.$defs?.[name] ?? {};
}

/** The members of a union (`oneOf` from a discriminated union, `anyOf` otherwise), or null. */
function unionMembers(node: JsonNode): JsonNode[] | null {
  return node.oneOf ?? node.anyOf ?? null;
}

/** The `kind` a union member stands for. */
export function memberKind(member: JsonNode): string | number | undefined {
  const k = member.properties?.kind;
  return (k?.const ?? k?.enum?.[0]) as string | number | undefined;
}

/** The member of a union whose `kind` matches the value, if the node is a union; else the node. */
export function pickMember(node: JsonNode, value: unknown, root = specJsonSchema()): JsonNode | null {
  const members = unionMembers(node);
  if (!members) return node;
  const kind = (value as { kind?: unknown } | undefined)?.kind;
  const found = members.map((m) => deref(m, root)).find((m) => memberKind(m) === kind);
  return found ?? null;
}

/** The schema at a path of a value: unions are resolved by the value's `kind`, tuples by index. */
export function nodeAt(path: Path, value: unknown, root = specJsonSchema()): { node: JsonNode; optional: boolean } | null {
  let node: JsonNode | null = root;
  let optional = false;
  let cur = value;
  for (const key of path) {
    if (!node) return null;
    node = pickMember(deref(node, root), cur, root);
    if (!node) return null;
    if (node.properties) {
      optional = !(node.required ?? []).includes(String(key));
      node = node.properties[String(key)] ?? null;
    } else if (node.prefixItems) {
      optional = false;
      node = node.prefixItems[Number(key)] ?? null;
    } else return null;
    cur = (cur as Record<string | number, unknown> | undefined)?.[key];
  }
  return node ? { node: deref(node, root), optional } : null;
}

export type FieldKind = 'number' | 'choice' | 'boolean' | 'tuple' | 'object' | 'union' | 'rows' | 'other';

/** What kind of control a schema node is drawn as. */
export function fieldKind(node: JsonNode): FieldKind {
  if (unionMembers(node)?.every((m) => memberKind(m) !== undefined)) return 'union';
  if (node.enum) return 'choice';
  const type = Array.isArray(node.type) ? node.type[0] : node.type;
  if (type === 'number' || type === 'integer') return 'number';
  if (type === 'boolean') return 'boolean';
  if (type === 'object' && node.properties) return 'object';
  if (type === 'array' && node.prefixItems) return 'tuple';
  if (type === 'array' && node.items && fieldKind(node.items) === 'object') return 'rows';
  return 'other';
}

export interface NumberBounds {
  min?: number;
  max?: number;
  /** The minimum itself is not allowed (e.g. "positive"). */
  exclusiveMin: boolean;
  integer: boolean;
  default?: number;
}

export function numberBounds(node: JsonNode): NumberBounds {
  const exclusive = node.exclusiveMinimum !== undefined;
  const max = node.maximum ?? node.exclusiveMaximum;
  return {
    min: exclusive ? node.exclusiveMinimum : node.minimum,
    // An integer with no stated maximum reports the largest safe integer: that is no limit to show.
    max: max === undefined || max >= Number.MAX_SAFE_INTEGER ? undefined : max,
    exclusiveMin: exclusive,
    integer: node.type === 'integer',
    default: typeof node.default === 'number' ? node.default : undefined,
  };
}

export interface Option<T extends string | number = string | number> {
  value: T;
  label: string;
  note?: string;
}

/** The options of an enum, labelled by the schema's `optionLabels` and `optionNotes`. */
export function enumOptions(node: JsonNode): Option[] {
  return (node.enum ?? []).map((value) => ({ value, label: node.optionLabels?.[String(value)] ?? String(value), note: node.optionNotes?.[String(value)] }));
}

/** A field's title: the schema's own (every module titles its fields), else its key. */
export const titleOf = (key: string | number, node: JsonNode): string => node.title ?? String(key);

/** A field's unit: the schema's own, else read from the key's suffix (_kpc, _Msun, ...). */
export const unitOfField = (key: string | number, node: JsonNode): string | undefined => node.unit ?? unitOf(String(key));

/** Whether an object fits an object schema's fields: only fields it has, every required one given. */
function fitsObject(value: unknown, node: JsonNode): boolean {
  if (!value || typeof value !== 'object' || !node.properties) return false;
  const keys = Object.keys(value);
  return keys.every((k) => k in node.properties!) && (node.required ?? []).every((k) => keys.includes(k));
}

/**
 * A valid value to start a field from when someone switches it on or picks it: the schema's
 * first example, else a registry preset whose fields fit it (a live halo's), else its default,
 * else one built from its parts (a number's default or the value nearest zero inside its range,
 * an enum's first option, an object's required fields).
 */
export function startValue(node: JsonNode, presets: readonly unknown[] = [], root = specJsonSchema()): unknown {
  const n = deref(node, root);
  if (n.examples?.length) return n.examples[0];
  const preset = presets.find((p) => fitsObject(p, n));
  if (preset !== undefined) return preset;
  if (n.default !== undefined) return n.default;
  switch (fieldKind(n)) {
    case 'number': {
      const b = numberBounds(n);
      let v = 0;
      if (b.min !== undefined && (b.exclusiveMin ? v <= b.min : v < b.min)) {
        // Above an exclusive minimum: the next whole number, or one unit (twice the minimum when that is positive).
        v = !b.exclusiveMin ? b.min : b.integer ? Math.floor(b.min) + 1 : b.min > 0 ? 2 * b.min : 1;
      }
      if (b.max !== undefined && v > b.max) v = b.max;
      return v;
    }
    case 'choice':
      return n.enum![0];
    case 'boolean':
      return false;
    case 'tuple':
      return n.prefixItems!.map((item) => startValue(item, presets, root));
    case 'union':
      return startValue(unionMembers(n)![0], presets, root);
    case 'object': {
      const out: Record<string, unknown> = {};
      for (const key of n.required ?? []) out[key] = n.properties![key].const ?? startValue(n.properties![key], presets, root);
      return out;
    }
    default:
      return undefined;
  }
}
