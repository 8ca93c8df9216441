import type { LawSpec, RunSpec } from '../spec/runSpec';
import { isReferenceLaw, lawInfo, modelAcceleration, referenceLaw } from './laws/registry';
import { massModelFor } from './models';
import { curveRadii } from './rotationCurves';

export interface AnalyticCurves {
  radii_kpc: number[];
  curves: { law: string; label: string; v_km_s: number[] }[];
}

export interface AnalyticCurveOptions {
  /** Laws to draw; default the spec's law and the reference law (Newton). */
  laws?: LawSpec[];
  /** Explicit radii; otherwise `points` bin centres out to `maxRadius_kpc` (default the model's extent). */
  radii_kpc?: number[];
  points?: number;
  maxRadius_kpc?: number;
}

/** Default number of radii: the same bins the measured curves use, so they overlay. */
export const CURVE_BINS = 24;

/**
 * Circular speed sqrt(R g(R)) of the spec's initial mass model under each
 * law. No particles are drawn, so this is quick enough for a live preview.
 */
export function analyticCurves(spec: RunSpec, opts: AnalyticCurveOptions = {}): AnalyticCurves {
  const model = massModelFor(spec);
  const radii = opts.radii_kpc ?? curveRadii(opts.maxRadius_kpc ?? model.extent_kpc, opts.points ?? CURVE_BINS);
  const laws: LawSpec[] = opts.laws ?? (isReferenceLaw(spec.law.kind) ? [spec.law] : [spec.law, referenceLaw()]);
  return {
    radii_kpc: radii,
    curves: laws.map((law) => ({
      law: law.kind,
      label: lawInfo(law).label,
      v_km_s: radii.map((R) => Math.sqrt(Math.max(0, R * modelAcceleration(law, model, R)))),
    })),
  };
}
