import { useCallback, useMemo, useState } from 'react';
import { defaultRunSpec, estimateInteractions, particleCount, runSpecSchema, stepCount, type LawSpec, type RunSpec, type RunSpecInput } from '../shared/spec';
import { setIn, type Path } from '../components/launch/draft';
import type { SubmitRunInput } from './runs';
import { usePreview } from './preview';

type Draft = Record<string, unknown>;

function issueMap(issues: { path: PropertyKey[]; message: string }[], prefix = ''): Record<string, string> {
  const out: Record<string, string> = {};
  for (const i of issues) {
    const key = prefix + i.path.map(String).join('.');
    out[key] ??= i.message;
  }
  return out;
}

/** The new-run form's state: a draft spec checked by the shared schema on every change, its preview and cost. */
export function useRunDraft(initial?: RunSpecInput, initialPairLaw?: LawSpec | null, initialName = '') {
  // The name lives in the spec (spec.name), so the shared schema checks it like every other field.
  const [draft, setDraft] = useState<Draft>(() => {
    const d = (initial ?? defaultRunSpec()) as unknown as Draft;
    return initialName ? { ...d, name: initialName } : d;
  });
  const [pairLaw, setPairLawState] = useState<LawSpec | null>(initialPairLaw ?? null);
  const [serverIssue, setServerIssue] = useState<{ field: string; message: string } | null>(null);

  const set = useCallback((path: Path, value: unknown) => {
    setServerIssue(null);
    setDraft((d) => setIn(d, path, value));
  }, []);
  const name = typeof draft.name === 'string' ? draft.name : '';
  const setName = useCallback((v: string) => set(['name'], v === '' ? undefined : v), [set]);
  const setPairLaw = useCallback((law: LawSpec | null) => {
    setServerIssue(null);
    setPairLawState(law);
  }, []);

  const parsed = useMemo(() => runSpecSchema.safeParse(draft), [draft]);
  const pairParsed = useMemo(() => (pairLaw ? runSpecSchema.safeParse({ ...draft, law: pairLaw }) : null), [draft, pairLaw]);
  const spec: RunSpec | null = parsed.success ? parsed.data : null;
  const pairSpec: RunSpec | null = pairParsed?.success ? pairParsed.data : null;
  const samePair = Boolean(pairLaw && spec && JSON.stringify(pairSpec?.law) === JSON.stringify(spec.law));

  const issues = useMemo(() => {
    const own = parsed.success ? {} : issueMap(parsed.error.issues);
    const pair = pairParsed && !pairParsed.success ? issueMap(pairParsed.error.issues.filter((i) => i.path[0] === 'law').map((i) => ({ ...i, path: i.path.slice(1) })), 'pairLaw.') : {};
    const merged: Record<string, string> = { ...own, ...pair };
    if (samePair) merged.pairLaw = 'The second law must differ from the first';
    if (serverIssue) merged[serverIssue.field] = serverIssue.message;
    return merged;
  }, [parsed, pairParsed, samePair, serverIssue]);

  const valid = Boolean(spec) && (!pairLaw || (Boolean(pairSpec) && !samePair));

  const preview = usePreview(spec, pairSpec);

  const cost = spec
    ? { particles: particleCount(spec), steps: stepCount(spec), interactions: estimateInteractions(spec) + (pairSpec ? estimateInteractions(pairSpec) : 0), runs: pairSpec ? 2 : 1 }
    : null;

  /** The POST /api/runs body; with a pair, each run balances its systems for its own law unless the form pins one law for both. */
  const submission = (): SubmitRunInput | null => {
    if (!valid) return null;
    return { spec: draft, ...(pairLaw ? { pairLaw } : {}) };
  };

  /** Shows a field error the server reported (its paths start with "spec."). */
  const showServerIssue = (field: string | undefined, message: string) => {
    if (!field) return;
    setServerIssue({ field: field.replace(/^spec\./, ''), message });
  };

  return { draft, set, name, setName, pairLaw, setPairLaw, issues, valid, spec, preview, cost, submission, showServerIssue };
}

export type RunDraft = ReturnType<typeof useRunDraft>;
