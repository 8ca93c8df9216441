// Initial conditions from a galaxy's Newtonian fit: its fitted baryons as an exponential disk
// (with a Hernquist bulge and an exponential gas disk when the table has them) and its fitted
// halo as the rigid halo law the fit names.
import type { LawSpec, RunSpec } from '../spec/runSpec';
import { RUN_SPEC_VERSION } from '../spec/runSpec';
import { exponentialDiskSpeed, hernquistSpeed } from './invented';
import type { FittedCurve, LawFit } from './fit';
import { fitFamilies, fitFamily } from '../engine/laws/registry';
import { diskModule } from '../engine/models/disk';

/** The fits a run can start from (the Newtonian halo fits): their law modules say which law the run goes under. */
export const HALO_FITS = fitFamilies().filter((f) => f.runLaw).map((f) => f.id) as [string, ...string[]];
export type HaloFit = string;

/**
 * Disk thickness: sech^2 scale height z0 = 0.15 R_d. A common choice for thin stellar disks
 * (scale height a tenth to a fifth of the scale length; from memory, not derived).
 */
export const SCALE_HEIGHT_PER_LENGTH = 0.15;

/**
 * Gas layer thickness: half the stellar disk's scale height. Cold gas lies in a thinner layer
 * than the stars over the inner disk (from memory; a choice, not derived). With no stellar disk
 * the gas takes the stellar ratio to its own scale length.
 */
export const GAS_THICKNESS_PER_STARS = 0.5;

export interface ProfileFit {
  mass_Msun: number;
  scale_kpc: number;
  /** Root-mean-square of (v_profile - v_target) over the radii, km/s. */
  rms_km_s: number;
}

/**
 * Least squares in v^2 of a profile M f(R; a) to target speeds squared: for each scale a the
 * best mass is closed-form (v^2 is linear in M); the scale is searched on a log grid from
 * 0.02 to 100 kpc and refined by golden section in ln a.
 */
function fitProfile(R: number[], v2: number[], unitSpeed: (scale: number, R: number) => number): ProfileFit | null {
  const target = v2.reduce((s, x) => s + Math.max(0, x), 0);
  if (!(target > 0)) return null;
  const at = (lnA: number) => {
    const a = Math.exp(lnA);
    const f = R.map((r) => unitSpeed(a, r) ** 2);
    const ff = f.reduce((s, x) => s + x * x, 0);
    const mass = ff > 0 ? Math.max(0, f.reduce((s, x, i) => s + x * v2[i], 0) / ff) : 0;
    const cost = f.reduce((s, x, i) => s + (mass * x - v2[i]) ** 2, 0);
    return { a, mass, cost };
  };
  const lo = Math.log(0.02), hi = Math.log(100), N = 120;
  let best = 0, bestCost = Infinity;
  for (let k = 0; k <= N; k++) {
    const c = at(lo + ((hi - lo) * k) / N).cost;
    if (c < bestCost) (bestCost = c), (best = k);
  }
  const step = (hi - lo) / N;
  let a = lo + (best - 1) * step, b = lo + (best + 1) * step;
  const g = (Math.sqrt(5) - 1) / 2;
  for (let i = 0; i < 60; i++) {
    const x1 = b - g * (b - a), x2 = a + g * (b - a);
    if (at(x1).cost < at(x2).cost) b = x2;
    else a = x1;
  }
  const fit = at((a + b) / 2);
  const rms = Math.sqrt(R.reduce((s, r, i) => s + (Math.sqrt(fit.mass) * unitSpeed(fit.a, r) - Math.sign(v2[i]) * Math.sqrt(Math.abs(v2[i]))) ** 2, 0) / R.length);
  return { mass_Msun: fit.mass, scale_kpc: fit.a, rms_km_s: rms };
}

const signedSquare = (v: number) => v * Math.abs(v);

/** The exponential disk (Freeman 1970 / Binney & Tremaine 2008 eq. 2.165, razor-thin curve) closest to the given speeds, in v^2. */
const exponentialFrom = (R: number[], v: number[]): ProfileFit | null =>
  fitProfile(R, v.map(signedSquare), (a, r) => exponentialDiskSpeed(1, a, r));

/** The exponential disk closest to the fitted stellar disk (its mass-to-light ratio applied), or null without one. */
export function diskFromCurve(curve: FittedCurve): ProfileFit | null {
  return curve.vDisk ? exponentialFrom(curve.radiusKpc, curve.vDisk) : null;
}

/**
 * The exponential gas disk closest to the table's gas curve (v_gas|v_gas|: a gas ring's outward
 * pull on the inner points gives negative v_gas^2 there), or null without one.
 */
export function gasFromCurve(curve: FittedCurve): ProfileFit | null {
  return curve.vGas ? exponentialFrom(curve.radiusKpc, curve.vGas) : null;
}

/** The Hernquist (1990) sphere closest to the fitted bulge (its mass-to-light ratio applied), or null without one. */
export function bulgeFromCurve(curve: FittedCurve): ProfileFit | null {
  if (!curve.vBulge) return null;
  return fitProfile(curve.radiusKpc, curve.vBulge.map(signedSquare), (a, R) => hernquistSpeed(1, a, R));
}

/** The law a run built from this fit goes under: the rigid halo law with the fitted halo. */
export function haloLawFromFit(fit: LawFit): LawSpec {
  const law = fitFamily(fit.law).runLaw?.(fit);
  if (!law) throw new Error(`a run starts from a Newtonian halo fit (${HALO_FITS.join(' or ')}), not ${fit.law}`);
  return law;
}

export interface GalaxyRunChoices {
  name: string;
  n: number;
  duration_Myr: number;
  timestep_Myr: number;
  softening_kpc: number;
  snapshotEvery: number;
  seed: number;
}

export interface GalaxyRun {
  /** The spec under Newton + the fitted halo (validate with parseRunSpec before use). */
  spec: RunSpec;
  disk: ProfileFit;
  bulge: ProfileFit | null;
  /** The gas disk, or null when the table has no gas or when the gas stands in for a missing stellar disk. */
  gas: ProfileFit | null;
}

/** A disk-galaxy run spec under Newton + the fitted halo, from one Newtonian fit of a galaxy. */
export function galaxyRunSpec(fit: LawFit, c: GalaxyRunChoices): GalaxyRun {
  const law = haloLawFromFit(fit);
  const stars = diskFromCurve(fit.curve);
  const fittedGas = gasFromCurve(fit.curve);
  const hasStars = !!stars && stars.mass_Msun > 0, hasGas = !!fittedGas && fittedGas.mass_Msun > 0;
  // With no stellar disk the gas is the disk.
  const disk = hasStars ? stars : hasGas ? fittedGas : null;
  if (!disk) throw new Error('the fit has no stellar disk or gas to build a disk from');
  const gas = hasStars && hasGas ? fittedGas : null;
  const bulge = bulgeFromCurve(fit.curve);
  const scaleHeight_kpc = SCALE_HEIGHT_PER_LENGTH * disk.scale_kpc;
  const spec = {
    version: RUN_SPEC_VERSION,
    name: c.name,
    model: {
      kind: diskModule.kind,
      n: c.n,
      mass_Msun: disk.mass_Msun,
      scaleLength_kpc: disk.scale_kpc,
      scaleHeight_kpc,
      toomreQ: 1.5,
      ...(bulge && bulge.mass_Msun > 0 ? { bulge: { mass_Msun: bulge.mass_Msun, scale_kpc: bulge.scale_kpc } } : {}),
      ...(gas ? { gas: { mass_Msun: gas.mass_Msun, scaleLength_kpc: gas.scale_kpc, scaleHeight_kpc: GAS_THICKNESS_PER_STARS * scaleHeight_kpc } } : {}),
    },
    law,
    integrator: 'leapfrog',
    solver: { kind: 'direct' },
    timestep_Myr: c.timestep_Myr,
    duration_Myr: c.duration_Myr,
    softening_kpc: c.softening_kpc,
    snapshotEvery: c.snapshotEvery,
    seed: c.seed,
  } as RunSpec;
  return { spec, disk, bulge, gas };
}
