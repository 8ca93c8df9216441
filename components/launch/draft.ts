import type { LawSpec } from '../../shared/spec';
import { fieldKind, nodeAt, pickMember, type Path } from './schemaForm';

// Plain helpers over the launch form's draft spec: reading and writing by path, and which
// systems of a model take their velocities from a law.

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
 * The systems of a model (paths inside it) whose velocities are balanced in a law's field: every
 * part whose schema has an `equilibriumLaw` (the model itself, or the members of an encounter).
 * Uploaded particles bring their own velocities and a two-body orbit has none to balance.
 */
export function balancedSystems(model: unknown): Path[] {
  const walk = (path: Path): Path[] => {
    const found = nodeAt(['model', ...path], { model });
    const node = found ? pickMember(found.node, getIn(model, path)) : null;
    if (!node?.properties) return [];
    if (node.properties.equilibriumLaw) return [path];
    return Object.entries(node.properties)
      .filter(([key, child]) => fieldKind(child) === 'union' && getIn(model, [...path, key]) !== undefined)
      .flatMap(([key]) => walk([...path, key]));
  };
  return walk([]);
}

export const isSampled = (model: unknown): boolean => balancedSystems(model).length > 0;

/** Each balanced system of the model gets its velocities from `law`; with none, each run balances them for its own law. */
export function withEquilibriumLaw(model: Record<string, unknown>, law: LawSpec | undefined): Record<string, unknown> {
  return balancedSystems(model).reduce((m, p) => setIn(m, [...p, 'equilibriumLaw'], law), model);
}

/** The law the model's velocities are pinned to, if any (all its systems share it). */
export function pinnedLaw(model: unknown): LawSpec | undefined {
  const first = balancedSystems(model)[0];
  return first ? (getIn(model, [...first, 'equilibriumLaw']) as LawSpec | undefined) : undefined;
}
