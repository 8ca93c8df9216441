import { lawInfo } from '../../shared/engine';
import type { LawSpec, RunSpec } from '../../shared/spec';
import { formatCount, formatInput, LAW_LABELS, MODEL_LABELS } from '../format';
import { fieldOrder, INTEGRATOR_LABELS, INTERPOLATION_LABELS, labelOf, PROFILE_LABELS, SOLVER_LABELS, unitOf } from './labels';

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

const ENUM_LABELS: Record<string, Record<string, string>> = { interpolation: INTERPOLATION_LABELS, profile: PROFILE_LABELS };
const SYSTEM_KINDS = new Set(['plummer', 'hernquist', 'disk']);

const unitFor = (key: string, v: number) => (v === 1 && unitOf(key) === 'steps' ? 'step' : unitOf(key));

/** A number as it was given: counts grouped (8 000), far from 1 in e-notation (4e10, 1.2e-10). */
function numberText(key: string, v: number): string {
  if (key === 'seed') return String(v);
  return Number.isInteger(v) && Math.abs(v) < 1e6 ? formatCount(v) : formatInput(v);
}

function lawLabel(law: LawSpec): string {
  try {
    return lawInfo(law).label;
  } catch {
    return LAW_LABELS[law.kind] ?? law.kind;
  }
}

type Obj = Record<string, unknown>;

function fieldRows(obj: Obj, path: string, group: SpecGroup, labelPrefix: string): SpecRow[] {
  const rows: SpecRow[] = [];
  const keys = Object.keys(obj).filter((k) => k !== 'kind').sort((a, b) => fieldOrder(a) - fieldOrder(b));
  for (const k of keys) {
    const v = obj[k];
    const key = `${path}.${k}`;
    const label = `${labelPrefix}${labelOf(k)}`;
    if (typeof v === 'number') rows.push({ key, group, label, value: numberText(k, v), unit: unitFor(k, v) });
    else if (typeof v === 'boolean') rows.push({ key, group, label, value: v ? 'yes' : 'no' });
    else if (typeof v === 'string') rows.push({ key, group, label, value: ENUM_LABELS[k]?.[v] ?? v });
    else if (Array.isArray(v)) rows.push({ key, group, label, value: `${formatCount(v.length)} rows` });
    else if (v && typeof v === 'object') {
      const inner = v as Obj;
      if (k === 'equilibriumLaw') rows.push({ key, group, label, value: lawSummary(inner as LawSpec) });
      else if (k === 'primary' || k === 'secondary') rows.push(...systemRows(inner, key, group, `${label} · `));
      else rows.push(...fieldRows(inner, key, group, `${label} · `));
    }
  }
  return rows;
}

function systemRows(model: Obj, path: string, group: SpecGroup, labelPrefix: string): SpecRow[] {
  const kind = String(model.kind);
  const rows: SpecRow[] = [{ key: `${path}.kind`, group, label: labelPrefix ? labelPrefix.replace(/ · $/, '') : 'Model', value: MODEL_LABELS[kind] ?? kind }];
  rows.push(...fieldRows(model, path, group, labelPrefix));
  // Optional fields left out still say what the run used.
  if (SYSTEM_KINDS.has(kind) && model.truncationRadius_kpc === undefined) {
    rows.push({ key: `${path}.truncationRadius_kpc`, group, label: `${labelPrefix}${labelOf('truncationRadius_kpc')}`, value: 'the model’s default' });
  }
  if (kind === 'disk' && model.equilibriumLaw === undefined) {
    rows.push({ key: `${path}.equilibriumLaw`, group, label: `${labelPrefix}${labelOf('equilibriumLaw')}`, value: 'the run’s law' });
  }
  return rows;
}

/** A row's value with its unit: "0.2 kpc", "30°". */
export const rowText = (r: SpecRow): string => (r.unit ? `${r.value}${r.unit === '°' ? '' : ' '}${r.unit}` : r.value);

/** One line for a law and its parameters: "Newton + halo (Halo profile NFW, Scale radius a 15 kpc, …)". */
function lawSummary(law: LawSpec): string {
  const params = fieldRows(law as unknown as Obj, 'law', 'Force law', '').map((r) => `${r.label} ${rowText(r)}`);
  return params.length ? `${lawLabel(law)} (${params.join(', ')})` : lawLabel(law);
}

/** Every field of a spec, with Infall's labels and units, grouped as the launch form groups them. */
export function specRows(spec: RunSpec): SpecRow[] {
  const rows = systemRows(spec.model as unknown as Obj, 'model', 'Initial conditions', '');
  rows.push({ key: 'law.kind', group: 'Force law', label: 'Law', value: lawLabel(spec.law) });
  rows.push(...fieldRows(spec.law as unknown as Obj, 'law', 'Force law', ''));
  const g: SpecGroup = 'Integration';
  rows.push({ key: 'integrator', group: g, label: 'Integrator', value: INTEGRATOR_LABELS[spec.integrator]?.label ?? spec.integrator });
  rows.push({ key: 'solver.kind', group: g, label: 'Force solver', value: SOLVER_LABELS[spec.solver.kind]?.label ?? spec.solver.kind });
  rows.push(...fieldRows(spec.solver as unknown as Obj, 'solver', g, ''));
  const rest: Obj = { timestep_Myr: spec.timestep_Myr, duration_Myr: spec.duration_Myr, softening_kpc: spec.softening_kpc, snapshotEvery: spec.snapshotEvery, diagnosticsEvery: spec.diagnosticsEvery, seed: spec.seed };
  for (const [k, v] of Object.entries(rest)) {
    if (typeof v === 'number') rows.push({ key: k, group: g, label: labelOf(k), value: numberText(k, v), unit: unitFor(k, v) });
    else rows.push({ key: k, group: g, label: labelOf(k), value: 'default, about 200 samples' });
  }
  return rows;
}
