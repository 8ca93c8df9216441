import { lawModule, massModelFor, makeSolver, measureRotationCurve, modelModule } from '../../shared/engine';
import { createLaw } from '../../shared/engine/laws/registry';
import { allocateParticles } from '../../shared/engine/state';
import type { SnapshotFrame } from '../../shared/api/snapshots';
import type { RunSpec } from '../../shared/spec';

/**
 * A snapshot's positions alone give back its mass distribution only when every particle weighs
 * the same (the model module says); a law whose field takes a second or more (a grid) is not
 * recomputed at every frame, so its runs show the curves the engine measured at start and end.
 */
export function canMeasureFrames(spec: RunSpec | null): boolean {
  if (!spec) return false;
  try {
    return modelModule(spec.model.kind).equalMass(spec.model) && !lawModule(spec.law.kind).slowField;
  } catch {
    return false; // a kind no module has any more
  }
}

/**
 * Circular speed √(R g) at the given radii from the law's own field of one stored snapshot:
 * the rotation curve at that moment. Stored snapshots may hold a subset of the particles; each
 * then stands for an equal share of the model's mass. Null for models with unequal masses.
 */
export function frameCircularSpeed(spec: RunSpec, frame: SnapshotFrame, radii_kpc: number[]): number[] | null {
  if (!canMeasureFrames(spec) || radii_kpc.length < 2) return null;
  const n = frame.positions.length / 3;
  const p = allocateParticles(n);
  const share = massModelFor(spec).totalMass_Msun / n;
  for (let i = 0; i < n; i++) {
    p.x[i] = frame.positions[3 * i];
    p.y[i] = frame.positions[3 * i + 1];
    p.z[i] = frame.positions[3 * i + 2];
    p.m[i] = share;
  }
  const law = createLaw(spec.law, { solver: makeSolver(spec.solver), softening_kpc: spec.softening_kpc });
  const width = radii_kpc[1] - radii_kpc[0];
  const curve = measureRotationCurve(p, law, radii_kpc[radii_kpc.length - 1] + width / 2, radii_kpc.length, frame.step, frame.time_Myr);
  return curve.circular_km_s;
}

export interface CurveSource {
  id: string;
  spec: RunSpec | null;
  frames: SnapshotFrame[];
  radii_kpc: number[];
}

/** The rotation curve of each run at the snapshot index on screen; null where it can't be measured. */
export function curvesAtFrame(sources: CurveSource[], time_Myr: number | undefined) {
  const out: Record<string, { time_Myr: number; radii_kpc: number[]; circular_km_s: number[] } | null> = {};
  for (const s of sources) {
    let frame: SnapshotFrame | undefined;
    for (let k = s.frames.length - 1; k >= 0 && time_Myr !== undefined; k--) {
      if (s.frames[k].time_Myr <= time_Myr + 1e-9) {
        frame = s.frames[k];
        break;
      }
    }
    const v = frame && s.spec ? frameCircularSpeed(s.spec, frame, s.radii_kpc) : null;
    out[s.id] = v && frame ? { time_Myr: frame.time_Myr, radii_kpc: s.radii_kpc, circular_km_s: v } : null;
  }
  return out;
}
