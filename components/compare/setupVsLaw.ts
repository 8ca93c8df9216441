import type { RunOutputView } from '../lib/runOutput';
import type { EquilibriumRecord } from '../../shared/engine';
import { describeDifferences } from './differences';

// Splits the written comparison of two runs into what their set-ups differ in
// and what their evolutions differ in, so a difference is never credited to
// the laws when the start already differed.

export interface SetupSide {
  label: string;
  spec: unknown;
  out: RunOutputView;
}

export interface SetupVsLawText {
  /** Said first: runs whose velocities were not balanced for their own law. */
  cautions: string[];
  setup: string[];
  /** How to read the law lines, given the set-up. */
  lawIntro: string;
  law: string[];
}

// Three decimals: the ratio's distance from 1 is the point.
const clausius = (q: number): string => q.toFixed(3);

// Runs stored before the record existed have none.
const recordOf = (out: RunOutputView): EquilibriumRecord | null => (out.summary as { equilibrium?: EquilibriumRecord }).equilibrium ?? null;

/** Leaf values of a spec by dotted path; laws and equilibrium laws are compared apart. */
function leaves(value: unknown, path: string, out: Map<string, string>): Map<string, string> {
  if (value !== null && typeof value === 'object' && !Array.isArray(value)) {
    for (const [k, v] of Object.entries(value)) {
      if (k === 'equilibriumLaw' || (path === '' && (k === 'law' || k === 'name'))) continue;
      leaves(v, path ? `${path}.${k}` : k, out);
    }
  } else {
    out.set(path, JSON.stringify(value));
  }
  return out;
}

function specDifferences(a: unknown, b: unknown): { path: string; a: string; b: string }[] {
  const la = leaves(a, '', new Map()), lb = leaves(b, '', new Map());
  const paths = [...new Set([...la.keys(), ...lb.keys()])].sort();
  return paths.filter((p) => la.get(p) !== lb.get(p)).map((p) => ({ path: p, a: la.get(p) ?? 'unset', b: lb.get(p) ?? 'unset' }));
}

const balancedText = (r: EquilibriumRecord): string =>
  r.balancedFor.length ? [...new Set(r.balancedFor.map((s) => s.label))].join(' and ') : 'uploaded velocities';

function caution(s: SetupSide, r: EquilibriumRecord | null): string | null {
  if (!r) return `${s.label}: this run was stored before Infall recorded what its velocities were balanced for, so its start cannot be vouched for.`;
  if (r.ownLaw === null) return `${s.label}: uploaded velocities, not balanced by Infall for this law (initial Clausius ratio ${clausius(r.initialClausiusRatio)}, 1 is equilibrium).`;
  if (r.ownLaw) return null;
  const others = r.balancedFor.filter((b) => !b.ownLaw).map((b) => `${b.system} for ${b.label}`).join(', ');
  return `${s.label} was not balanced for its own law (${others}); it starts with initial Clausius ratio ${clausius(r.initialClausiusRatio)} under it (1 is equilibrium), so its evolution includes relaxing from that start.`;
}

export function setupVsLaw(a: SetupSide, b: SetupSide): SetupVsLawText {
  const ra = recordOf(a.out), rb = recordOf(b.out);
  const cautions = [caution(a, ra), caution(b, rb)].filter((c): c is string => c !== null);

  const setup: string[] = [];
  const diffs = specDifferences(a.spec, b.spec);
  const modelDiffs = diffs.filter((d) => d.path.startsWith('model.') || d.path === 'seed');
  setup.push(
    modelDiffs.length
      ? `Different initial positions: ${modelDiffs.map((d) => `${d.path} ${d.a} vs ${d.b}`).join('; ')}.`
      : 'Same model and seed: identical initial positions.',
  );
  if (ra && rb) {
    const va = balancedText(ra), vb = balancedText(rb);
    setup.push(
      va === vb
        ? `Velocities of both runs balanced for ${va}${modelDiffs.length ? '' : ': the initial particles are identical'}.`
        : `Velocities balanced for ${va} (${a.label}) and for ${vb} (${b.label}): each start differs by design.`,
    );
    setup.push(
      `Initial Clausius ratio 2K/|Σ m r·a| under each run's own law: ${clausius(ra.initialClausiusRatio)} (${a.label}), ${clausius(rb.initialClausiusRatio)} (${b.label}); 1 is equilibrium for a single system.`,
    );
  }
  const other = diffs.filter((d) => !modelDiffs.includes(d));
  if (other.length) setup.push(`Other settings differ: ${other.map((d) => `${d.path} ${d.a} vs ${d.b}`).join('; ')}.`);

  // Balanced for its own law is the claim; the Clausius ratio is shown, not judged (an encounter's orbit moves it from 1).
  const startsInEquilibrium = [ra, rb].every((r) => r !== null && r.ownLaw === true);
  const lawIntro =
    startsInEquilibrium && !modelDiffs.length && !other.length
      ? 'Both start from the same positions in equilibrium under their own laws, so the differences below come from the laws, up to integration error and particle noise.'
      : 'The set-ups differ as listed above, so the differences below mix the set-up with the laws.';
  return { cautions, setup, lawIntro, law: describeDifferences(a, b) };
}
