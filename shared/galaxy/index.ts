// Observed galaxies: tables in, fits under each law, the acceleration relation.
export { COLUMN_KEYS, parseRotationCurve, readTableCells, TableError } from './table';
export type { ColumnKey, Measured, RotationCurve, TableCells, TableOptions } from './table';
export { baryonicSquared, hasBaryons, tabulatedBaryonModel } from './baryons';
export type { MassToLight } from './baryons';
export {
  CM_NORMALISATION,
  CM_SLOPE,
  concentrationFor,
  DEFAULT_PRIORS,
  FIT_LAWS,
  FitError,
  fitGalaxy,
  fitGalaxyLaw,
  fitSample,
  fittedMassToLight,
  HALO_H0_KM_S_MPC,
  nfwFromV200,
  NUISANCE,
} from './fit';
export type { FitLaw, FitOptions, FittedCurve, FittedParam, GalaxyFitReport, LawFit, LogNormalPrior, Nuisance, RefusedLaw, SampleFitReport, SampleGalaxy, SampleLawFit, Verdict } from './fit';
export { accelerationPoints, btfrMass, btfrSpeed, RAR_G_DAGGER_M_S2, rarAcceleration, rarScatter } from './rar';
export type { AccelerationPoint } from './rar';
export { exponentialDiskSpeed, hernquistSpeed, inventedCurve } from './invented';
export type { InventedBaryons } from './invented';
