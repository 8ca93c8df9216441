// Rotation-curve fits under each law, for one galaxy or a sample sharing a
// parameter. Least squares by Levenberg-Marquardt; every model curve comes
// from the law modules' modelAcceleration (the engine's analytic-curve code)
// applied to the galaxy's tabulated baryons (see baryons.ts).
import { levenbergMarquardt } from 'ml-levenberg-marquardt';
import { inverse, Matrix } from 'ml-matrix';
import { fitFamilies, fitFamily } from '../engine/laws/registry';
import type { FitParam, LawFitFamily } from '../engine/laws/types';
import { baryonicSquared, hasBaryons, tabulatedBaryonModel, type MassToLight } from './baryons';
import type { RotationCurve } from './table';

/** Every law's fit families (law modules declare them), by the id stored with each fit. */
const FAMILIES = fitFamilies();
export const FIT_LAWS = FAMILIES.map((f) => f.id) as [string, ...string[]];
export type FitLaw = string;
export { CM_NORMALISATION, CM_SLOPE, concentrationFor, HALO_H0_KM_S_MPC, nfwFromV200 } from '../engine/laws/halo';

/** A log-normal prior: log10(value) is Gaussian about log10(centre) with sigma_dex. */
export interface LogNormalPrior {
  centre: number;
  sigma_dex: number;
}

export interface FitOptions {
  laws?: readonly FitLaw[];
  /** MOND's a0: fixed at a0_m_s2 (default) or fitted. */
  a0?: 'fixed' | 'free';
  a0_m_s2?: number;
  /** Emergent gravity's H0: fixed at H0_km_s_Mpc (default) or fitted. */
  H0?: 'fixed' | 'free';
  H0_km_s_Mpc?: number;
  /** Priors on the stellar mass-to-light ratios; null drops a prior. */
  priors?: { disk?: LogNormalPrior | null; bulge?: LogNormalPrior | null };
  /**
   * Distance and inclination fitted as nuisance parameters, each with a Gaussian prior from the
   * table's metadata (value and error; common practice). The distance scales radii as D and
   * baryonic speeds as sqrt(D); the inclination scales observed speeds and errors by sin i_table / sin i.
   */
  nuisance?: readonly Nuisance[];
}

export const NUISANCE = ['distance', 'inclination'] as const;
export type Nuisance = (typeof NUISANCE)[number];

/** Inclinations below this are not fitted: v / sin i runs away towards face-on (our choice). */
const MIN_INCLINATION_DEG = 10;

/**
 * Mass-to-light priors at 3.6 um: disk 0.5, bulge 0.7, each with 0.1 dex
 * scatter. From memory of the values adopted for Spitzer 3.6 um rotation-curve
 * work (Lelli, McGaugh & Schombert 2016; Li et al. 2018); stated, not derived.
 */
export const DEFAULT_PRIORS = {
  disk: { centre: 0.5, sigma_dex: 0.1 },
  bulge: { centre: 0.7, sigma_dex: 0.1 },
} as const satisfies Record<string, LogNormalPrior>;

export interface FittedParam {
  name: string;
  unit: string;
  value: number;
  /** One-sigma uncertainty from the covariance (J^T W J)^-1 at the optimum; null where that matrix is singular. */
  error: number | null;
  min: number;
  max: number;
  /** The optimum sits on a bound: the uncertainty is then not a fair error bar. */
  atBound: boolean;
}

/** A fitted curve beside the data it was fitted to; where distance or inclination are fitted, radii and speeds are those at the fitted values. */
export interface FittedCurve {
  radiusKpc: number[];
  vObs: number[];
  vErr: number[];
  v: number[];
  vBaryons: number[];
  vGas: number[] | null;
  vDisk: number[] | null;
  vBulge: number[] | null;
  /** sign(v^2 - v_bar^2) sqrt|v^2 - v_bar^2|: the halo for Newton + halo, the law's boost otherwise. */
  vExtra: number[];
  /** (v_obs - v) / error at each point. */
  residuals: number[];
}

export interface Verdict {
  /** Comparison by the Bayesian information criterion BIC = chi^2 + k ln N (lower is better). */
  criterion: 'BIC';
  preferred: FitLaw;
  deltaBic: Record<string, number>;
}

export interface LawFit {
  law: FitLaw;
  label: string;
  params: FittedParam[];
  /** Derived quantities (the NFW halo's r_s, rho0, M200). */
  derived: Record<string, number>;
  /** Sum of squared normalised residuals over the data points (the prior penalty is separate). */
  chi2: number;
  priorPenalty: number;
  points: number;
  freeParams: number;
  dof: number;
  reducedChi2: number;
  /** chi^2 + 2k and chi^2 + k ln N, with chi^2 over the data points (Gaussian errors; constants dropped). */
  aic: number;
  bic: number;
  curve: FittedCurve;
}

/** A law that could not be fitted (too few points for its parameters...), with the reason. */
export interface RefusedLaw {
  law: FitLaw;
  reason: string;
}

export interface GalaxyFitReport {
  laws: LawFit[];
  refused: RefusedLaw[];
  verdict: Verdict;
}

export interface SampleGalaxy {
  name: string;
  curve: RotationCurve;
}

export interface SampleLawFit {
  law: FitLaw;
  label: string;
  /** Parameters shared by every galaxy (a0, H0, the concentration-mass normalisation). */
  shared: FittedParam[];
  /** Per galaxy: its own parameters, derived quantities (an NFW halo's c200 from the shared relation), chi^2 and fitted curve. */
  galaxies: { name: string; params: FittedParam[]; derived: Record<string, number>; chi2: number; points: number; curve: FittedCurve }[];
  chi2: number;
  priorPenalty: number;
  points: number;
  freeParams: number;
  dof: number;
  reducedChi2: number;
  aic: number;
  bic: number;
}

export interface SampleFitReport {
  laws: SampleLawFit[];
  refused: RefusedLaw[];
  verdict: Verdict;
}

/** Refusals a person can act on: too few points, no baryons. */
export class FitError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'FitError';
  }
}

type ResolvedOptions = Required<Omit<FitOptions, 'priors' | 'laws' | 'nuisance'>> & {
  nuisance: readonly Nuisance[]; priors: { disk: LogNormalPrior | null; bulge: LogNormalPrior | null } };

/** Mass-to-light ratios: bounds wide enough for any stellar population, the prior does the pulling. */
const ML_BOUNDS = { min: 0.05, max: 5 };

function resolve(options: FitOptions): ResolvedOptions {
  const o: ResolvedOptions = {
    a0: options.a0 ?? 'fixed',
    a0_m_s2: options.a0_m_s2 ?? 1.2e-10,
    H0: options.H0 ?? 'fixed',
    H0_km_s_Mpc: options.H0_km_s_Mpc ?? 70,
    nuisance: options.nuisance ?? [],
    priors: {
      disk: options.priors?.disk === undefined ? DEFAULT_PRIORS.disk : options.priors.disk,
      bulge: options.priors?.bulge === undefined ? DEFAULT_PRIORS.bulge : options.priors.bulge,
    },
  };
  if (!(o.a0_m_s2 >= 1e-12 && o.a0_m_s2 <= 1e-8)) throw new FitError(`a0 ${o.a0_m_s2} m/s^2 is outside 1e-12..1e-8`);
  if (!(o.H0_km_s_Mpc >= 20 && o.H0_km_s_Mpc <= 200)) throw new FitError(`H0 ${o.H0_km_s_Mpc} km/s/Mpc is outside 20..200`);
  for (const p of [o.priors.disk, o.priors.bulge]) {
    if (p && !(p.centre > 0 && p.sigma_dex > 0)) throw new FitError('a mass-to-light prior needs a positive centre and a positive sigma_dex');
  }
  return o;
}

/** One galaxy's place in the parameter vector. */
interface GalaxySlot {
  name: string;
  curve: RotationCurve;
  own: FitParam[];
  ownAt: number;
  diskAt: number | null;
  bulgeAt: number | null;
  distanceAt: number | null;
  inclinationAt: number | null;
}

interface Problem {
  law: LawFitFamily;
  o: ResolvedOptions;
  specs: FitParam[];
  sharedCount: number;
  galaxies: GalaxySlot[];
  points: number;
  /** One residual row per prior on a parameter. */
  priorRows: { at: number; residual: (value: number) => number }[];
}

function buildProblem(lawKind: FitLaw, galaxies: SampleGalaxy[], o: ResolvedOptions, sample: boolean): Problem {
  const law = fitFamily(lawKind);
  const specs = [...law.shared(o, sample)];
  const sharedCount = specs.length;
  const priorRows: Problem['priorRows'] = [];
  const slots = galaxies.map(({ name, curve }) => {
    // Refusals name the galaxy only in a sample.
    const who = sample ? `${name}: ` : '';
    if (!hasBaryons(curve)) throw new FitError(`${who}the table has no baryonic components (gas, stellar disk or bulge); fits need at least one`);
    const own = law.own(o, sample);
    const ownAt = specs.length;
    specs.push(...own);
    const ml = (key: 'disk' | 'bulge') => {
      if ((key === 'disk' ? curve.vDisk : curve.vBulge) === null) return null;
      const prior = o.priors[key];
      specs.push({ name: key === 'disk' ? 'ML_disk' : 'ML_bulge', unit: 'Msun/Lsun', scale: 1, ...ML_BOUNDS, starts: [prior?.centre ?? DEFAULT_PRIORS[key].centre] });
      if (prior) priorRows.push({ at: specs.length - 1, residual: (value) => priorResidual(value, prior) });
      return specs.length - 1;
    };
    const nuisance = (key: Nuisance) => {
      if (!o.nuisance.includes(key)) return null;
      const m = key === 'distance' ? curve.distanceMpc : curve.inclinationDeg;
      if (!m || m.error === undefined) throw new FitError(`${who}fitting the ${key} needs its value and error`);
      const { value, error } = m as Required<typeof m>;
      const [min, max] = key === 'distance' ? [Math.max(value - 5 * error, 0.2 * value), value + 5 * error] : [Math.max(value - 5 * error, MIN_INCLINATION_DEG), Math.min(value + 5 * error, 90)];
      if (!(min < max && value >= min)) throw new FitError(`${who}an inclination of ${value} degrees is too close to face-on to fit (at least ${MIN_INCLINATION_DEG})`);
      specs.push({ name: key, unit: key === 'distance' ? 'Mpc' : 'deg', scale: key === 'distance' ? value : 10, min, max, starts: [value] });
      priorRows.push({ at: specs.length - 1, residual: (x) => (x - value) / error });
      return specs.length - 1;
    };
    return { name, curve, own, ownAt, diskAt: ml('disk'), bulgeAt: ml('bulge'), distanceAt: nuisance('distance'), inclinationAt: nuisance('inclination') };
  });
  const points = slots.reduce((s, g) => s + g.curve.radiusKpc.length, 0);
  if (points <= specs.length) throw new FitError(`${points} points cannot constrain ${specs.length} free parameters under ${law.label}`);
  return { law, o, specs, sharedCount, galaxies: slots, points, priorRows };
}

interface GalaxyModel {
  /** The table as seen at the fitted distance and inclination. */
  curve: RotationCurve;
  v: number[];
  vBarSq: number[];
  ml: { disk: number; bulge: number };
}

function galaxyModel(pb: Problem, g: GalaxySlot, theta: number[]): GalaxyModel {
  const ml = { disk: g.diskAt === null ? 0 : theta[g.diskAt], bulge: g.bulgeAt === null ? 0 : theta[g.bulgeAt] };
  const curve = atDistanceAndInclination(g, theta);
  const model = tabulatedBaryonModel(curve, ml);
  const shared = theta.slice(0, pb.sharedCount);
  const own = theta.slice(g.ownAt, g.ownAt + g.own.length);
  const accel = pb.law.acceleration(shared, own, pb.o);
  const v = curve.radiusKpc.map((R) => {
    const speed = Math.sqrt(Math.max(0, R * accel(model, R)));
    return Number.isFinite(speed) ? speed : 1e6;
  });
  return { curve, v, vBarSq: baryonicSquared(curve, ml), ml };
}

/** Radii scale as D and baryonic speeds as sqrt(D) (luminosity and gas mass as D^2); observed speeds and errors as 1 / sin i. */
function atDistanceAndInclination(g: GalaxySlot, theta: number[]): RotationCurve {
  const c = g.curve;
  const d = g.distanceAt === null ? 1 : theta[g.distanceAt] / c.distanceMpc!.value;
  const deg = Math.PI / 180;
  const s = g.inclinationAt === null ? 1 : Math.sin(c.inclinationDeg!.value * deg) / Math.sin(theta[g.inclinationAt] * deg);
  if (d === 1 && s === 1) return c;
  const times = (list: number[] | null, f: number) => (list ? list.map((x) => x * f) : null);
  return {
    ...c,
    radiusKpc: c.radiusKpc.map((R) => R * d),
    vGas: times(c.vGas, Math.sqrt(d)),
    vDisk: times(c.vDisk, Math.sqrt(d)),
    vBulge: times(c.vBulge, Math.sqrt(d)),
    vObs: c.vObs.map((v) => v * s),
    vErr: c.vErr.map((e) => e * s),
  };
}

const priorResidual = (value: number, p: LogNormalPrior) => Math.log10(value / p.centre) / p.sigma_dex;

/** Normalised residuals: data rows (v_obs - v)/err, then one row per prior. */
function residuals(pb: Problem, theta: number[]): number[] {
  const out: number[] = [];
  for (const g of pb.galaxies) {
    const { curve, v } = galaxyModel(pb, g, theta);
    v.forEach((vi, i) => out.push((curve.vObs[i] - vi) / curve.vErr[i]));
  }
  for (const { at, residual } of pb.priorRows) out.push(-residual(theta[at]));
  return out;
}

const sumSq = (xs: number[]) => xs.reduce((s, x) => s + x * x, 0);

/** Levenberg-Marquardt from one start, in scaled parameters (the library's damping is additive, so order-one values matter). */
function optimise(pb: Problem, start: number[], maxIterations: number): number[] {
  const rows = pb.points + pb.priorRows.length;
  const x = Array.from({ length: rows }, (_, i) => i);
  // The library minimises sum ((y - f)/w)^2; with y = 0, w = 1 and f = -residual that is chi^2 + prior penalty.
  const result = levenbergMarquardt(
    { x, y: new Array(rows).fill(0) },
    (scaled: number[]) => {
      const r = residuals(pb, scaled.map((s, k) => s * pb.specs[k].scale));
      return (i: number) => -r[i];
    },
    {
      initialValues: start.map((v, k) => v / pb.specs[k].scale),
      minValues: pb.specs.map((s) => s.min / s.scale),
      maxValues: pb.specs.map((s) => s.max / s.scale),
      damping: 1e-2,
      gradientDifference: 1e-5,
      centralDifference: true,
      maxIterations,
      errorTolerance: 1e-10,
    },
  );
  return result.parameterValues.map((s, k) => s * pb.specs[k].scale);
}

/** Jacobian of the residuals by central differences (one-sided at a bound), natural units. */
function jacobian(pb: Problem, theta: number[]): number[][] {
  return pb.specs.map((s, k) => {
    const h = 1e-5 * s.scale;
    const up = Math.min(theta[k] + h, s.max), down = Math.max(theta[k] - h, s.min);
    const at = (value: number) => residuals(pb, theta.map((t, j) => (j === k ? value : t)));
    const ru = at(up), rd = at(down);
    return ru.map((r, i) => (r - rd[i]) / (up - down));
  });
}

/** Parameter uncertainties sqrt(diag((J^T J)^-1)), J of the normalised residuals (so W is folded in), priors included. */
function uncertainties(pb: Problem, theta: number[]): (number | null)[] {
  if (theta.length === 0) return [];
  const J = jacobian(pb, theta);
  const p = J.length;
  const JtJ = new Matrix(p, p);
  for (let a = 0; a < p; a++) for (let b = 0; b < p; b++) JtJ.set(a, b, J[a].reduce((s, x, i) => s + x * J[b][i], 0));
  try {
    const cov = inverse(JtJ);
    return theta.map((_, k) => {
      const v = cov.get(k, k);
      return Number.isFinite(v) && v > 0 ? Math.sqrt(v) : null;
    });
  } catch {
    return theta.map(() => null);
  }
}

/** Every combination of the parameters' starting values. */
const startGrid = (specs: FitParam[]): number[][] => specs.reduce<number[][]>((acc, s) => acc.flatMap((c) => s.starts.map((v) => [...c, v])), [[]]);

/** Best of several starts (the chi^2 surface of halo fits has more than one valley). */
function solve(pb: Problem, starts: number[][], maxIterations: number) {
  let best: { theta: number[]; total: number } | null = pb.specs.length === 0 ? { theta: [], total: 0 } : null;
  // Nothing free (a gas-only galaxy under MOND with a0 fixed): the curve is a prediction, just evaluated.
  for (const start of pb.specs.length === 0 ? [] : starts) {
    const theta = optimise(pb, start, maxIterations);
    const total = sumSq(residuals(pb, theta));
    if (!best || total < best.total) best = { theta, total };
  }
  const theta = best!.theta;
  const errors = uncertainties(pb, theta);
  const param = (k: number): FittedParam => {
    const s = pb.specs[k];
    const span = (s.max - s.min) * 1e-6;
    return { name: s.name, unit: s.unit, value: theta[k], error: errors[k], min: s.min, max: s.max, atBound: theta[k] - s.min < span || s.max - theta[k] < span };
  };
  return { theta, param };
}

function curveOf(pb: Problem, g: GalaxySlot, theta: number[]): FittedCurve {
  const { curve: c, v, vBarSq, ml } = galaxyModel(pb, g, theta);
  const scaled = (list: number[] | null, f: number) => (list ? list.map((x) => Math.sqrt(f) * x) : null);
  return {
    radiusKpc: c.radiusKpc,
    vObs: c.vObs,
    vErr: c.vErr,
    v,
    vBaryons: vBarSq.map((q) => Math.sign(q) * Math.sqrt(Math.abs(q))),
    vGas: c.vGas,
    vDisk: scaled(c.vDisk, ml.disk),
    vBulge: scaled(c.vBulge, ml.bulge),
    vExtra: v.map((vi, i) => {
      const d = vi * vi - vBarSq[i];
      return Math.sign(d) * Math.sqrt(Math.abs(d));
    }),
    residuals: v.map((vi, i) => (c.vObs[i] - vi) / c.vErr[i]),
  };
}

function criteria(chi2: number, points: number, k: number) {
  const dof = points - k;
  return { points, freeParams: k, dof, reducedChi2: chi2 / dof, aic: chi2 + 2 * k, bic: chi2 + k * Math.log(points) };
}

function verdict(fits: { law: FitLaw; bic: number }[]): Verdict {
  const best = fits.reduce((a, b) => (b.bic < a.bic ? b : a));
  return { criterion: 'BIC', preferred: best.law, deltaBic: Object.fromEntries(fits.map((f) => [f.law, f.bic - best.bic])) };
}

/** The mass-to-light ratios a fit settled on, for the acceleration relation of that fit (a missing component takes its prior centre; it has no speed, so it does not matter). */
export function fittedMassToLight(params: FittedParam[]): MassToLight {
  const value = (name: string, fallback: number) => params.find((p) => p.name === name)?.value ?? fallback;
  return { disk: value('ML_disk', DEFAULT_PRIORS.disk.centre), bulge: value('ML_bulge', DEFAULT_PRIORS.bulge.centre) };
}

function lawsOf(options: FitOptions): FitLaw[] {
  const laws = options.laws?.length ? [...options.laws] : [...FIT_LAWS];
  const unknown = laws.find((l) => !FIT_LAWS.includes(l));
  if (unknown) throw new FitError(`unknown law "${unknown}"; choose from ${FIT_LAWS.join(', ')}`);
  return laws;
}

/** Fit one galaxy under one law. */
export function fitGalaxyLaw(curve: RotationCurve, law: FitLaw, options: FitOptions = {}): LawFit {
  const o = resolve(options);
  const pb = buildProblem(law, [{ name: 'galaxy', curve }], o, false);
  const { theta, param } = solve(pb, startGrid(pb.specs), 80);
  const g = pb.galaxies[0];
  const curveFit = curveOf(pb, g, theta);
  const chi2 = sumSq(curveFit.residuals);
  const own = theta.slice(g.ownAt, g.ownAt + g.own.length);
  return {
    law,
    label: pb.law.label,
    params: pb.specs.map((_, k) => param(k)),
    derived: pb.law.derived?.(theta.slice(0, pb.sharedCount), own) ?? {},
    chi2,
    priorPenalty: sumSq(pb.priorRows.map(({ at, residual }) => residual(theta[at]))),
    ...criteria(chi2, pb.points, pb.specs.length),
    curve: curveFit,
  };
}

/** Fit one galaxy under each requested law (default all), with a verdict by BIC. */
export function fitGalaxy(curve: RotationCurve, options: FitOptions = {}): GalaxyFitReport {
  const { fits, refused } = eachLaw(lawsOf(options), (law) => fitGalaxyLaw(curve, law, options));
  return { laws: fits, refused, verdict: verdict(fits) };
}

/** Fit under each law; a law refused with a FitError is reported beside the others, unless every law is refused. */
function eachLaw<T>(laws: FitLaw[], fit: (law: FitLaw) => T): { fits: T[]; refused: RefusedLaw[] } {
  const fits: T[] = [], refused: RefusedLaw[] = [];
  for (const law of laws) {
    try {
      fits.push(fit(law));
    } catch (err) {
      if (!(err instanceof FitError)) throw err;
      refused.push({ law, reason: err.message });
    }
  }
  if (fits.length === 0) throw new FitError(refused.map((r) => `${r.law}: ${r.reason}`).join('; '));
  return { fits, refused };
}

/**
 * Fit a sample: per law, the shared parameter (a0 for MOND when free, H0 for
 * emergent gravity when free, the concentration-mass normalisation for NFW)
 * is one number for all galaxies; halo and mass-to-light parameters are
 * per-galaxy nuisance parameters, started from each galaxy's own fit.
 */
export function fitSample(galaxies: SampleGalaxy[], options: FitOptions = {}): SampleFitReport {
  if (galaxies.length < 2) throw new FitError('a sample needs at least two galaxies');
  const o = resolve(options);
  const { fits, refused } = eachLaw(lawsOf(options), (law): SampleLawFit => {
    const pb = buildProblem(law, galaxies, o, true);
    const base = new Array<number>(pb.specs.length);
    for (const g of pb.galaxies) {
      const alone = fitGalaxyLaw(g.curve, law, options);
      const pick = (name: string, fallback: number) => alone.params.find((p) => p.name === name)?.value ?? fallback;
      g.own.forEach((s, j) => (base[g.ownAt + j] = pick(s.name, s.starts[0])));
      for (const at of [g.diskAt, g.bulgeAt, g.distanceAt, g.inclinationAt]) if (at !== null) base[at] = pick(pb.specs[at].name, pb.specs[at].starts[0]);
    }
    const starts = startGrid(pb.specs.slice(0, pb.sharedCount)).map((shared) => [...shared, ...base.slice(pb.sharedCount)]);
    const { theta, param } = solve(pb, starts, 120);
    const perGalaxy = pb.galaxies.map((g) => {
      const curve = curveOf(pb, g, theta);
      const own = [...g.own.map((_, j) => g.ownAt + j), ...[g.diskAt, g.bulgeAt, g.distanceAt, g.inclinationAt].filter((at): at is number => at !== null)];
      const derived = pb.law.derived?.(theta.slice(0, pb.sharedCount), theta.slice(g.ownAt, g.ownAt + g.own.length)) ?? {};
      return { name: g.name, params: own.map(param), derived, chi2: sumSq(curve.residuals), points: curve.v.length, curve };
    });
    const chi2 = perGalaxy.reduce((s, g) => s + g.chi2, 0);
    return {
      law,
      label: pb.law.label,
      shared: pb.specs.slice(0, pb.sharedCount).map((_, k) => param(k)),
      galaxies: perGalaxy,
      chi2,
      priorPenalty: sumSq(pb.priorRows.map(({ at, residual }) => residual(theta[at]))),
      ...criteria(chi2, pb.points, pb.specs.length),
    };
  });
  return { laws: fits, refused, verdict: verdict(fits) };
}
