import type { LawSpec } from '../../shared/spec';
import { modelModule } from '../../shared/engine';
import type { Path } from './schemaForm';

// Plain helpers over the launch form's draft spec: reading and writing by path, and pinning the
// law a model's systems take their velocities from.

export type { Path };

export function setIn<T>(obj: T, path: Path, value: unknown): T {
  if (path.length === 0) return value as T;
  const [head, ...rest] = path;
  const base = (obj ?? {}) as Record<string | number, unknown>;
  const copy = (Array.isArray(base) ? [...base] : { ...base }) as Record<string | number, unknown>;
  if (value === undefined && rest.length === 0) delete copy[head];
  else copy[head] = setIn(base[head], rest, value);
  return copy as T;
}

export function getIn(obj: unknown, path: Path): unknown {
  return path.reduce<unknown>((o, k) => (o as Record<string | number, unknown> | undefined)?.[k], obj);
}

/**
 * The systems of a model (paths inside it) whose velocities are balanced in a law's field, as its
 * module lists them: the model itself, or the members of an encounter; none for particles that
 * bring their own velocities or a two-body orbit.
 */
export function balancedPaths(model: unknown): Path[] {
  try {
    return modelModule(String((model as { kind?: unknown } | undefined)?.kind)).balancedPaths;
  } catch {
    return []; // a kind no module has
  }
}

export const isSampled = (model: unknown): boolean => balancedPaths(model).length > 0;

/** Each balanced system of the model gets its velocities from `law`; with none, each run balances them for its own law. */
export function withEquilibriumLaw(model: Record<string, unknown>, law: LawSpec | undefined): Record<string, unknown> {
  return balancedPaths(model).reduce((m, p) => setIn(m, [...p, 'equilibriumLaw'], law), model);
}

/** The law the model's velocities are pinned to, if any (all its systems share it). */
export function pinnedLaw(model: unknown): LawSpec | undefined {
  const first = balancedPaths(model)[0];
  return first ? (getIn(model, [...first, 'equilibriumLaw']) as LawSpec | undefined) : undefined;
}
