import { lawInfo, lawName, modelName, referenceLaw, systemModule } from '../../shared/engine';
import type { LawSpec, RunSpec } from '../../shared/spec';
import { formatCount, formatInput } from '../format';
import { fieldKind, memberKind, nodeAt, pickMember, specJsonSchema, titleOf, unitOfField, type JsonNode } from '../launch/schemaForm';
import { SOLVER_LABELS } from './labels';

// A run spec as rows people read: the run and compare pages list these, and the compare page
// lines two specs up by `key` to mark what differs.

export type SpecGroup = 'Initial conditions' | 'Force law' | 'Integration';
export const SPEC_GROUPS: SpecGroup[] = ['Initial conditions', 'Force law', 'Integration'];

export interface SpecRow {
  /** Dotted path in the spec; the same field of two specs has the same key. */
  key: string;
  group: SpecGroup;
  label: string;
  value: string;
  unit?: string;
}

const unitFor = (unit: string | undefined, v: number) => (v === 1 && unit === 'steps' ? 'step' : unit);

/** A number as it was given: counts grouped (8 000), far from 1 in e-notation (4e10, 1.2e-10). */
function numberText(key: string, v: number): string {
  if (key === 'seed') return String(v);
  return Number.isInteger(v) && Math.abs(v) < 1e6 ? formatCount(v) : formatInput(v);
}

function lawFullName(law: LawSpec): string {
  try {
    return lawInfo(law).label;
  } catch {
    return lawName(law.kind);
  }
}

type Obj = Record<string, unknown>;

/** The kinds of the spec's law union: a union with these members is a law (the velocities' law). */
const LAW_KINDS = new Set(((specJsonSchema().properties!.law.oneOf ?? []) as JsonNode[]).map((m) => memberKind(m)));
const isLawUnion = (node: JsonNode) => fieldKind(node) === 'union' && (node.oneOf ?? node.anyOf ?? []).every((m) => LAW_KINDS.has(memberKind(m)));

/**
 * The fields of one object of the spec, in its schema's order, titled, unitted and with enum
 * options labelled by the schema. `path` is the object's dotted place in the spec.
 */
function fieldRows(spec: RunSpec, obj: Obj, path: string, group: SpecGroup, labelPrefix: string): SpecRow[] {
  const rows: SpecRow[] = [];
  const node = pickMember(nodeAt(path.split('.'), spec)?.node ?? {}, obj);
  const props = node?.properties ?? {};
  // Fields the schema lists, then any it does not (a stored spec from an older schema).
  const keys = [...Object.keys(props), ...Object.keys(obj).filter((k) => !(k in props))].filter((k) => k !== 'kind' && obj[k] !== undefined);
  for (const k of keys) {
    const v = obj[k];
    const child: JsonNode = props[k] ?? {};
    const key = `${path}.${k}`;
    const label = `${labelPrefix}${titleOf(k, child)}`;
    if (typeof v === 'number') rows.push({ key, group, label, value: numberText(k, v), unit: unitFor(unitOfField(k, child), v) });
    else if (typeof v === 'boolean') rows.push({ key, group, label, value: v ? 'yes' : 'no' });
    else if (typeof v === 'string') rows.push({ key, group, label, value: child.optionLabels?.[v] ?? v });
    else if (Array.isArray(v)) rows.push({ key, group, label, value: v.every((x) => typeof x === 'number') ? v.map((x) => numberText(k, x)).join(', ') : `${formatCount(v.length)} rows`, unit: v.every((x) => typeof x === 'number') ? unitOfField(k, child) : undefined });
    else if (v && typeof v === 'object') {
      const inner = v as Obj;
      if (isLawUnion(child)) rows.push({ key, group, label, value: lawSummary(spec, inner as LawSpec) });
      else if (fieldKind(child) === 'union') rows.push(...systemRows(spec, inner, key, group, `${label} · `));
      // A part's fields carry titles of their own ("Bulge mass", "Halo particles").
      else rows.push(...fieldRows(spec, inner, key, group, labelPrefix));
    }
  }
  // Optional fields left out still say what the run used, in the schema's words.
  for (const [k, child] of Object.entries(props)) {
    if (obj[k] !== undefined || (node?.required ?? []).includes(k)) continue;
    const label = `${labelPrefix}${titleOf(k, child)}`;
    if (isLawUnion(child)) rows.push({ key: `${path}.${k}`, group, label, value: defaultBalance(spec, String(obj.kind), child.absent) });
    else if (child.absent) rows.push({ key: `${path}.${k}`, group, label, value: child.absent });
  }
  return rows;
}

/** The law a system's velocities were balanced for when the spec named none. */
function defaultBalance(spec: RunSpec, kind: string, absent = 'the run’s law'): string {
  // Version-1 specs balanced some systems for the reference law.
  if (spec.version === 1 && systemModuleOf(kind)?.version1Reference) return `${lawFullName(referenceLaw())} (a version 1 spec)`;
  return absent;
}

/** The system module of a kind, or null for a model that is not a system (an encounter, a table). */
function systemModuleOf(kind: string) {
  try {
    return systemModule(kind);
  } catch {
    return null;
  }
}

function systemRows(spec: RunSpec, model: Obj, path: string, group: SpecGroup, labelPrefix: string): SpecRow[] {
  const kind = String(model.kind);
  const rows: SpecRow[] = [{ key: `${path}.kind`, group, label: labelPrefix ? labelPrefix.replace(/ · $/, '') : 'Model', value: modelName(kind) }];
  rows.push(...fieldRows(spec, model, path, group, labelPrefix));
  const older = systemModuleOf(kind)?.olderSetUp;
  if (older && spec.version < older.before) rows.push({ key: `${path}.setUp`, group, label: `${labelPrefix}Velocities`, value: `${older.text} (a version ${spec.version} spec)` });
  return rows;
}

/** A row's value with its unit: "0.2 kpc", "30°". */
export const rowText = (r: SpecRow): string => (r.unit ? `${r.value}${r.unit === '°' ? '' : ' '}${r.unit}` : r.value);

/** One line for a law and its parameters: "Newton + halo (Halo profile NFW, Scale radius a 15 kpc, …)". */
function lawSummary(spec: RunSpec, law: LawSpec): string {
  // The law's own fields, read against the law schema (the same members wherever a law sits).
  const params = fieldRows({ ...spec, law }, law as unknown as Obj, 'law', 'Force law', '').map((r) => `${r.label} ${rowText(r)}`);
  return params.length ? `${lawFullName(law)} (${params.join(', ')})` : lawFullName(law);
}

/** Every field of a spec, with Infall's labels and units, grouped as the launch form groups them. */
export function specRows(spec: RunSpec): SpecRow[] {
  const rows = systemRows(spec, spec.model as unknown as Obj, 'model', 'Initial conditions', '');
  rows.push({ key: 'law.kind', group: 'Force law', label: 'Law', value: lawFullName(spec.law) });
  rows.push(...fieldRows(spec, spec.law as unknown as Obj, 'law', 'Force law', ''));
  const g: SpecGroup = 'Integration';
  const integrator = nodeAt(['integrator'], spec)?.node ?? {};
  rows.push({ key: 'integrator', group: g, label: titleOf('integrator', integrator), value: integrator.optionLabels?.[spec.integrator] ?? spec.integrator });
  rows.push({ key: 'solver.kind', group: g, label: 'Force solver', value: SOLVER_LABELS[spec.solver.kind]?.label ?? spec.solver.kind });
  rows.push(...fieldRows(spec, spec.solver as unknown as Obj, 'solver', g, ''));
  const rest: Obj = { timestep_Myr: spec.timestep_Myr, duration_Myr: spec.duration_Myr, softening_kpc: spec.softening_kpc, snapshotEvery: spec.snapshotEvery, diagnosticsEvery: spec.diagnosticsEvery, seed: spec.seed };
  for (const [k, v] of Object.entries(rest)) {
    const node = nodeAt([k], spec)?.node ?? {};
    if (typeof v === 'number') rows.push({ key: k, group: g, label: titleOf(k, node), value: numberText(k, v), unit: unitFor(unitOfField(k, node), v) });
    else rows.push({ key: k, group: g, label: titleOf(k, node), value: 'default, about 200 samples' });
  }
  return rows;
}
