import { defaultRunSpec, parseRunSpec, type RunSpec } from '../../shared/spec';

/** A valid spec: the default with the given fields replaced (defaults of nested objects filled in by the schema). */
export function specWith(overrides: Record<string, unknown>): RunSpec {
  const r = parseRunSpec({ ...defaultRunSpec(), ...overrides });
  if (!r.ok) throw new Error(`test spec invalid: ${JSON.stringify(r.issues)}`);
  return r.spec;
}

/** Quantile of a list of numbers (sorted copy). */
export function quantile(values: ArrayLike<number>, q: number): number {
  const s = Array.from(values).sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(q * s.length))];
}

/** Metres per kpc from the IAU definitions, written out independently of the engine's units module. */
export const M_PER_KPC = 1000 * (648_000 / Math.PI) * 149_597_870_700;
