import { analyticCurves, isReferenceLaw, modelModule, precheck, referenceLaw, type AnalyticCurves, type EngineWarning, type Timescales } from '../../shared/engine';
import type { LawSpec, RunSpec } from '../../shared/spec';

/** What the new-run form shows before submitting: analytic curves and the engine's checks. Plain data, so it crosses to and from a web worker. */
export interface Preview {
  curves: AnalyticCurves | null;
  curvesError: string | null;
  checks: { law: string; timescales: Timescales; warnings: EngineWarning[] }[];
  checksError: string | null;
}

/** The preview of a valid spec (and its pair's): this runs the engine, drawing the initial particles for the checks. */
export function computePreview(spec: RunSpec, pair: RunSpec | null): Preview {
  const laws: LawSpec[] = [spec.law];
  if (pair) laws.push(pair.law);
  if (!laws.some((l) => isReferenceLaw(l.kind))) laws.push(referenceLaw());
  const result: Preview = { curves: null, curvesError: null, checks: [], checksError: null };
  try {
    // A two-body orbit has no extended mass model to draw a curve of.
    result.curves = modelModule(spec.model.kind).orbit ? null : analyticCurves(spec, { laws });
  } catch (e) {
    result.curvesError = (e as Error).message;
  }
  try {
    for (const s of pair ? [spec, pair] : [spec]) result.checks.push({ law: s.law.kind, ...precheck(s) });
  } catch (e) {
    result.checksError = (e as Error).message;
  }
  return result;
}

/** A request to the preview worker; `id` lets the form drop answers to drafts it has moved past. */
export interface PreviewRequest {
  id: number;
  spec: RunSpec;
  pair: RunSpec | null;
}

export interface PreviewAnswer {
  id: number;
  preview: Preview;
}
