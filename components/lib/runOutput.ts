import type { RunDetail, RunOutputBody } from '../../shared/api/contract';
import { usesPotentialVirial, type DiagnosticSample } from '../../shared/engine';
import type { RunSpec } from '../../shared/spec';

/** A run's stored output: the engine's own types, as the API ships them (shared/api/contract.ts). */
export type RunOutputView = RunOutputBody;

export function readOutput(run: RunDetail | undefined): RunOutputView | null {
  return run?.output ?? null;
}

export const specOf = (run: RunDetail | undefined): RunSpec | null => run?.spec ?? null;

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

