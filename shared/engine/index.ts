// Public surface of the Infall engine. Pure TypeScript over typed arrays: no
// Node-only or DOM APIs, so it runs in the worker, in threads and in the browser.
import type { RunSpec } from '../spec/runSpec';
import { buildInitialConditions } from './models';
import { timescalesFor, type EngineWarning, type Timescales } from './timescales';

export { runSimulation, RESULT_UNITS } from './run';
export { ENGINE_VERSION } from './version';
export type { EquilibriumRecord, RunHooks, RunProgress, RunResult, RunSummary, Snapshot, QuantityMeaning, RunCheckpoint } from './run';
export { analyticCurves, CURVE_BINS } from './analytic';
export type { AnalyticCurves, AnalyticCurveOptions } from './analytic';
export {
  defaultPairLaw, fitFamilies, fitFamily, galaxyPairLaw, isReferenceLaw, lawColour, lawConservation, lawInfo, lawJsonSchema, lawLabel, lawModule, lawModules,
  LAW_MODULES, lawName, lawPreset, lawSchema, lawShortLabel, referenceLaw, usesPotentialVirial,
} from './laws/registry';
export type { LawKind, LawSpec, LawSpecInput } from './laws/registry';
export { LAW_COLOUR_TOKENS } from './laws/types';
export type { ForceLaw, LawColourToken, LawFitFamily, LawInfo, LawModule } from './laws/types';
export type { DiagnosticSample, ToomreProfile, Vector3 } from './diagnostics';
export type { RotationCurve } from './rotationCurves';
export { measureRotationCurve } from './rotationCurves';
export type { EngineWarning, Timescales } from './timescales';
export { CancelledDuringSetup, Simulation } from './simulation';
export type { SimulationState } from './simulation';
export {
  balancedSystems, buildInitialConditions, LIVE_HALO_PRESET, massModelFor, modelComponents, modelJsonSchema, modelLabel, modelModule, modelModules, modelName,
  MODEL_MODULES, modelPreset, modelSchema, modelTraits, PART_COLOUR_TOKENS, partLook, SYSTEM_MODULES, systemModule,
} from './models';
export type { BalancedSystem, Component, InitialConditions, ModelKind, ModelModule, ModelSpec, ModelTraits, PartColourToken, PartLook, SystemModule } from './models';
export { applyDirectKernelSetting, directFieldRange, directKernelInUse, directPotentialRange, makeSolver, setDirectKernel } from './solvers';
export type { DirectKernelChoice, FieldSolver, PairKernel } from './solvers';
export * as units from './units';

/** Timescales and warnings for a spec, computed from its initial particles without running. */
export function precheck(spec: RunSpec): { timescales: Timescales; warnings: EngineWarning[] } {
  return timescalesFor(spec, buildInitialConditions(spec));
}
