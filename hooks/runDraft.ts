import { useCallback, useDeferredValue, useMemo, useState } from 'react';
import { analyticCurves, precheck, type AnalyticCurves, type EngineWarning, type Timescales } from '../shared/engine';
import { defaultRunSpec, estimateInteractions, particleCount, runSpecSchema, stepCount, type LawSpec, type RunSpec, type RunSpecInput } from '../shared/spec';
import type { SubmitRunInput } from './runs';

import { setIn, type Path } from '../components/launch/draft';

type Draft = Record<string, unknown>;

// Starting values when someone switches model or law. Invented example systems,
// sized so each runs in seconds under the default timestep; the halo and Yukawa
// numbers are typical textbook magnitudes (from memory), not fits to any galaxy.
export const MODEL_PRESETS: Record<string, Record<string, unknown>> = {
  kepler: { kind: 'kepler', mass1_Msun: 1e10, mass2_Msun: 2e9, semiMajorAxis_kpc: 5, eccentricity: 0.3 },
  plummer: { kind: 'plummer', n: 500, mass_Msun: 1e10, scale_kpc: 1 },
  hernquist: { kind: 'hernquist', n: 1000, mass_Msun: 5e10, scale_kpc: 2 },
  disk: { kind: 'disk', n: 2000, mass_Msun: 5e10, scaleLength_kpc: 3, scaleHeight_kpc: 0.3, toomreQ: 1.5 },
  encounter: {
    kind: 'encounter',
    primary: { kind: 'plummer', n: 600, mass_Msun: 2e10, scale_kpc: 1.5 },
    secondary: { kind: 'plummer', n: 300, mass_Msun: 1e10, scale_kpc: 1 },
    pericentre_kpc: 8,
    initialSeparation_kpc: 40,
    primaryTilt_deg: 0,
    secondaryTilt_deg: 30,
  },
  table: {
    kind: 'table',
    recentre: true,
    particles: [
      { x_kpc: -1, y_kpc: 0, z_kpc: 0, vx_km_s: 0, vy_km_s: -50, vz_km_s: 0, mass_Msun: 1e9 },
      { x_kpc: 1, y_kpc: 0, z_kpc: 0, vx_km_s: 0, vy_km_s: 50, vz_km_s: 0, mass_Msun: 1e9 },
    ],
  },
};

export const LAW_PRESETS: Record<string, LawSpec> = {
  newton: { kind: 'newton' },
  halo: { kind: 'halo', profile: 'nfw', scale_kpc: 15, density_Msun_kpc3: 7e6 },
  mond: { kind: 'mond', interpolation: 'simple', a0_m_s2: 1.2e-10 },
  qumond: { kind: 'qumond', interpolation: 'simple', a0_m_s2: 1.2e-10, grid: 64 },
  emergent: { kind: 'emergent', H0_km_s_Mpc: 70 },
  yukawa: { kind: 'yukawa', alpha: 0.5, lambda_kpc: 10 },
};

export interface Preview {
  curves: AnalyticCurves | null;
  curvesError: string | null;
  checks: { law: string; timescales: Timescales; warnings: EngineWarning[] }[];
  checksError: string | null;
}

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

  // The preview runs the engine (drawing the initial particles for its checks), so it follows the
  // draft a beat behind typing.
  const deferredSpec = useDeferredValue(spec);
  const deferredPair = useDeferredValue(pairSpec);
  const preview = useMemo<Preview | null>(() => {
    if (!deferredSpec) return null;
    const laws: LawSpec[] = [deferredSpec.law];
    if (deferredPair) laws.push(deferredPair.law);
    if (!laws.some((l) => l.kind === 'newton')) laws.push({ kind: 'newton' });
    const result: Preview = { curves: null, curvesError: null, checks: [], checksError: null };
    try {
      result.curves = deferredSpec.model.kind === 'kepler' ? null : analyticCurves(deferredSpec, { laws });
    } catch (e) {
      result.curvesError = (e as Error).message;
    }
    try {
      for (const s of deferredPair ? [deferredSpec, deferredPair] : [deferredSpec]) result.checks.push({ law: s.law.kind, ...precheck(s) });
    } catch (e) {
      result.checksError = (e as Error).message;
    }
    return result;
  }, [deferredSpec, deferredPair]);

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
