import type { RunSpec } from '../spec/runSpec';
import { estimateInteractions, FORCE_EVALUATIONS_PER_STEP, particleCount, stepCount } from '../spec/runSpec';
import { lagrangianRadii } from './diagnostics';
import { lawInfo, lawModule, modelAcceleration } from './laws/registry';
import { balancedSystems, modelModule, type InitialConditions } from './models';
import { totalMass } from './state';
import { internalToMyr } from './units';

export interface Timescales {
  halfMassRadius_kpc: number;
  rmsSpeed_km_s: number;
  /** r_half / v_rms of the initial particles. */
  crossingTime_Myr: number;
  /** N / (8 ln N) t_cross (Binney & Tremaine 2008, eq. 1.38); null below 10 particles, where it means nothing. */
  relaxationTime_Myr: number | null;
  /** Kepler pairs only. */
  orbitalPeriod_Myr: number | null;
  /** Largest timestep all the rules below accept. */
  suggestedTimestep_Myr: number;
  steps: number;
  forceEvaluations: number;
  /** Quota cost, see estimateInteractions. */
  interactions: number;
}

export interface EngineWarning {
  code: string;
  severity: 'info' | 'warning';
  message: string;
  /** Where the rule comes from, or "common practice". */
  source: string;
}

/** Power et al. (2003, MNRAS 338, 14) step criterion dt <= eta sqrt(eps / a) with eta about 0.2 (from memory). */
const POWER_ETA = 0.2;
/** At least this many steps per crossing time or orbital period (common practice). */
const STEPS_PER_CROSSING = 50;
const STEPS_PER_PERIOD = 200;

/** Largest analytic acceleration of the model under the run's law outside the softening length. */
function peakAcceleration(spec: RunSpec, ic: InitialConditions): number {
  const extent = ic.massModel.extent_kpc;
  const orbit = modelModule(spec.model.kind).orbit?.(spec.model);
  const inner = Math.max(spec.softening_kpc, orbit ? orbit.innerRadius_kpc : 1e-3 * extent);
  let peak = 0;
  const samples = 200;
  for (let k = 0; k <= samples; k++) {
    const R = inner * (Math.max(extent, inner) / inner) ** (k / samples);
    peak = Math.max(peak, modelAcceleration(spec.law, ic.massModel, R));
  }
  return peak;
}

export function timescalesFor(spec: RunSpec, ic: InitialConditions): { timescales: Timescales; warnings: EngineWarning[] } {
  const p = ic.particles;
  const n = particleCount(spec);
  const M = totalMass(p.m);
  let kin2 = 0;
  for (let i = 0; i < p.n; i++) kin2 += p.m[i] * (p.vx[i] ** 2 + p.vy[i] ** 2 + p.vz[i] ** 2);
  const vrms = Math.sqrt(kin2 / M);
  const [rHalf] = lagrangianRadii(p, [0.5]);
  const tCross = internalToMyr(rHalf / vrms);
  const tRelax = n >= 10 ? (n / (8 * Math.log(n))) * tCross : null;
  const period = modelModule(spec.model.kind).orbit?.(spec.model).period_Myr ?? null;

  const warnings: EngineWarning[] = [];
  const eps = spec.softening_kpc;
  const dt = spec.timestep_Myr;
  const rules: number[] = [];

  if (eps > 0) {
    const dtPower = POWER_ETA * internalToMyr(Math.sqrt(eps / peakAcceleration(spec, ic)));
    rules.push(dtPower);
    if (dt > dtPower) {
      warnings.push({
        code: 'timestep-coarse-for-softening',
        severity: 'warning',
        message: `timestep ${dt} Myr is longer than ${dtPower.toPrecision(3)} Myr = 0.2 sqrt(eps / a_max): orbits near the softening length are not resolved`,
        source: 'Power et al. 2003 (MNRAS 338, 14), eta = 0.2',
      });
    }
  } else if (n > 2) {
    warnings.push({
      code: 'no-softening',
      severity: 'warning',
      message: 'softening is 0: close pairs will produce large, badly integrated forces',
      source: 'common practice',
    });
  }
  const orbitTime = period ?? tCross;
  const perOrbit = period === null ? STEPS_PER_CROSSING : STEPS_PER_PERIOD;
  rules.push(orbitTime / perOrbit);
  if (dt > orbitTime / perOrbit) {
    warnings.push({
      code: period === null ? 'timestep-coarse-for-crossing' : 'timestep-coarse-for-orbit',
      severity: 'warning',
      message: `timestep ${dt} Myr gives fewer than ${perOrbit} steps per ${period === null ? 'crossing time' : 'orbital period'} (${orbitTime.toPrecision(3)} Myr)`,
      source: 'common practice',
    });
  }
  if (eps > 0.5 * rHalf && n > 2) {
    warnings.push({
      code: 'softening-large',
      severity: 'warning',
      message: `softening ${eps} kpc exceeds half the half-mass radius (${rHalf.toPrecision(3)} kpc): the system's own structure is smoothed away`,
      source: 'common practice',
    });
  }
  if (tRelax !== null && spec.duration_Myr > tRelax) {
    warnings.push({
      code: 'outlasts-relaxation',
      severity: 'warning',
      message: `the run (${spec.duration_Myr} Myr) outlasts the two-body relaxation time (${tRelax.toPrecision(3)} Myr): particle noise, not the force law, will shape the result; use more particles`,
      source: 'Binney & Tremaine 2008, eq. 1.38',
    });
  }
  const info = lawInfo(spec.law);
  if (!info.hasPotential) {
    warnings.push({
      code: 'law-without-potential',
      severity: 'info',
      message: `${info.label} has no potential: energy is not reported${info.conservesMomentum ? '' : ' and momentum is not conserved'}. ${info.notes}`,
      source: 'the law itself (no pairwise potential)',
    });
  }
  const traits = modelModule(spec.model.kind).traits;
  warnings.push(...(lawModule(spec.law.kind).warnings?.(spec.law, { traits, particles: p, halfMassRadius_kpc: rHalf }) ?? []));
  warnings.push(...modelAndMethodNotes(spec, n));
  const steps = stepCount(spec);
  return {
    timescales: {
      halfMassRadius_kpc: rHalf,
      rmsSpeed_km_s: vrms,
      crossingTime_Myr: tCross,
      relaxationTime_Myr: tRelax,
      orbitalPeriod_Myr: period,
      suggestedTimestep_Myr: Math.min(...rules),
      steps,
      forceEvaluations: steps * FORCE_EVALUATIONS_PER_STEP[spec.integrator],
      interactions: estimateInteractions(spec),
    },
    warnings,
  };
}

/** Below this many particles the tree saves nothing over the exact sum (common practice, confirmed by this engine's timings). */
const TREE_WORTHWHILE_N = 2000;

/** Notes on the pairing of model, law and method that the numbers above cannot show. */
function modelAndMethodNotes(spec: RunSpec, n: number): EngineWarning[] {
  const notes: EngineWarning[] = [];
  for (const s of balancedSystems(spec).filter((b) => !b.ownLaw)) {
    notes.push({
      code: 'set-up-for-another-law',
      severity: 'info',
      message: `${s.system} velocities balance ${lawInfo(s.law).label}, not the run's law, so the run starts out of equilibrium under its law (and a run under that law starts from identical particles)`,
      source: 'this engine',
    });
  }
  if (spec.solver.kind === 'tree' && n < TREE_WORTHWHILE_N) {
    notes.push({
      code: 'tree-not-needed',
      severity: 'info',
      message: `with ${n} particles the direct sum is exact and about as fast as the tree`,
      source: 'common practice',
    });
  }
  if (spec.integrator === 'rk4') {
    notes.push({
      code: 'rk4-secular-drift',
      severity: 'info',
      message: 'RK4 is not symplectic: its energy error grows steadily with time instead of staying bounded as leapfrog\'s does',
      source: 'Hairer, Lubich & Wanner 2006, Geometric Numerical Integration (from memory)',
    });
  }
  return notes;
}
