import type { FrameInfo, RunDetail } from '../../shared/api/contract';
import type { AnalyticCurves, DiagnosticSample, EngineWarning, LawInfo, RotationCurve, RunSummary as EngineSummary, Timescales } from '../../shared/engine';
import type { RunSpec } from '../../shared/spec';
import { usesPotentialVirial } from '../../shared/engine';

/** A run's stored output with the engine's types put back on (the API ships it as JSON). */
export interface RunOutputView {
  law: LawInfo;
  timescales: Timescales;
  warnings: EngineWarning[];
  diagnostics: DiagnosticSample[];
  rotationCurves: { initial: RotationCurve; final: RotationCurve; analytic: AnalyticCurves };
  summary: EngineSummary;
  snapshotParticles: number;
  frames: FrameInfo[];
}

export function readOutput(run: RunDetail | undefined): RunOutputView | null {
  if (!run?.output) return null;
  return run.output as unknown as RunOutputView;
}

export const specOf = (run: RunDetail | undefined): RunSpec | null => (run?.spec as RunSpec | undefined) ?? null;

/** Diagnostics as columns for plotting and export. */
export function diagnosticColumns(rows: DiagnosticSample[]) {
  return {
    time_Myr: rows.map((r) => r.time_Myr),
    step: rows.map((r) => r.step),
    kineticEnergy: rows.map((r) => r.kineticEnergy),
    potentialEnergy: rows.map((r) => r.potentialEnergy),
    totalEnergy: rows.map((r) => r.totalEnergy),
    energyDrift: rows.map((r) => r.energyDrift),
    momentumDrift: rows.map((r) => r.momentumDrift),
    angularMomentumDrift: rows.map((r) => r.angularMomentumDrift),
    virialRatio: rows.map((r) => r.virialRatio),
    clausiusVirialRatio: rows.map((r) => r.clausiusVirialRatio),
    r10_kpc: rows.map((r) => r.lagrangianRadii_kpc.r10),
    r50_kpc: rows.map((r) => r.lagrangianRadii_kpc.r50),
    r90_kpc: rows.map((r) => r.lagrangianRadii_kpc.r90),
    // Centres (null for runs stored before they were measured).
    centreOfMass_kpc: rows.map((r) => r.centreOfMass ?? null),
    centreOfMassVelocity_km_s: rows.map((r) => r.centreOfMassVelocity ?? null),
    densityCentre_kpc: rows.map((r) => r.densityCentre ?? null),
  };
}

/** |x| for log plots of drifts, keeping gaps. */
export const magnitude = (xs: (number | null)[]) => xs.map((x) => (x === null ? null : Math.abs(x)));

/**
 * Whether a run's equilibrium is read from 2K/|W| (its law module says so: 1 in equilibrium
 * only for a pure softened 1/r pair potential) or from the Clausius ratio 2K/|Σ m r·a|, which
 * is also what a run of a law no module has any more is read by.
 */
export function readsPotentialVirial(law: { kind: string }): boolean {
  try {
    return usesPotentialVirial(law.kind);
  } catch {
    return false;
  }
}

