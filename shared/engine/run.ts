import type { RunSpec } from '../spec/runSpec';
import { particleCount } from '../spec/runSpec';
import type { DensityCentre } from './centre';
import { analyticCurves, CURVE_BINS, type AnalyticCurves } from './analytic';
import { sampleDiagnostics, type DiagnosticSample, type DriftReference } from './diagnostics';
import { lawInfo, localCoupling } from './laws/registry';
import type { LawInfo } from './laws/types';
import { balancedSystems, modelModule, type Component } from './models';
import { measureRotationCurve, type RotationCurve } from './rotationCurves';
import { CancelledDuringSetup, Simulation, type SimulationState } from './simulation';
import type { FieldSolver } from './solvers';
import { cloneParticles, firstNonFinite, type ParticleState } from './state';
import { timescalesFor, type EngineWarning, type Timescales } from './timescales';
import { toomreProfile } from './toomre';

export interface RunProgress {
  step: number;
  totalSteps: number;
  percent: number;
  time_Myr: number;
  /** Relative energy drift at the latest diagnostic sample (0 at the start); null when the law has no potential. */
  energyDrift: number | null;
}

export interface RunHooks {
  onProgress?(p: RunProgress): void;
  shouldCancel?(): boolean;
  /** Upper bound on particles stored per snapshot (default 5000). */
  maxSnapshotParticles?: number;
  /** Also store velocities in snapshots (default false). */
  snapshotVelocities?: boolean;
  /**
   * Computes the forces in place of the solver the spec names, e.g. the
   * worker's direct sum split across threads. It must give the same numbers
   * as that solver, so results stay a function of the spec alone.
   */
  solver?: FieldSolver;
  /** Continues from a checkpoint this spec's run (or a shorter run of it) produced. */
  resumeFrom?: RunCheckpoint;
  /** Called with a copy of the run so far every `checkpointEvery.steps` steps or `.ms` milliseconds, whichever comes first. */
  onCheckpoint?(checkpoint: RunCheckpoint): void;
  checkpointEvery?: { steps: number; ms: number };
}

/**
 * Everything the run loop needs to carry on as if never stopped: the
 * simulation state and what the loop has collected so far. Resuming from it
 * gives the same result, bit for bit, as the uninterrupted run.
 */
export interface RunCheckpoint {
  state: SimulationState;
  forceEvaluations: number;
  diagnostics: DiagnosticSample[];
  snapshots: Snapshot[];
  reference: DriftReference | null;
  initialCurve: RotationCurve;
}

export interface Snapshot {
  step: number;
  time_Myr: number;
  /** x, y, z interleaved, kpc, for the particles listed in RunResult.snapshotParticles. */
  positions: Float32Array;
  /** vx, vy, vz interleaved, km/s, when requested. */
  velocities?: Float32Array;
}

/** How to read each conserved quantity of this run. */
export type QuantityMeaning = 'conserved' | 'not-conserved' | 'undefined';

export interface RunSummary {
  particleCount: number;
  totalSteps: number;
  stepsCompleted: number;
  forceEvaluations: number;
  finalTime_Myr: number;
  /** Final and largest absolute relative energy drift; null without a potential. */
  finalEnergyDrift: number | null;
  maxAbsEnergyDrift: number | null;
  finalMomentumDrift: number;
  finalAngularMomentumDrift: number;
  /** What the law says about each quantity, so a drift can be read as integrator error or as physics. */
  quantities: { energy: QuantityMeaning; momentum: QuantityMeaning; angularMomentum: QuantityMeaning };
  equilibrium: EquilibriumRecord;
}

/** What the initial velocities were balanced for, so a pair's differences can be told apart (set-up or law). */
export interface EquilibriumRecord {
  /** Per system: the law whose field its velocities balance (kind and label). */
  balancedFor: { system: string; law: string; label: string; ownLaw: boolean }[];
  /** Every system balanced for the run's own law; null when the velocities were uploaded. */
  ownLaw: boolean | null;
  /** 2K / |sum m r . a| at t = 0 under the run's law: 1 for a system in equilibrium under it. */
  initialClausiusRatio: number;
}

export interface RunResult {
  cancelled: boolean;
  law: LawInfo;
  timescales: Timescales;
  warnings: EngineWarning[];
  components: Component[];
  diagnostics: DiagnosticSample[];
  /** Particle indices stored in every snapshot, in order. */
  snapshotParticles: number[];
  /** Masses of those particles, Msun (they do not change during a run). */
  snapshotMasses: number[];
  snapshots: Snapshot[];
  rotationCurves: { initial: RotationCurve; final: RotationCurve; analytic: AnalyticCurves };
  summary: RunSummary;
  /** Units of the unnamed numbers above. */
  units: { energy: string; momentum: string; angularMomentum: string };
}

export const RESULT_UNITS = {
  energy: 'Msun (km/s)^2',
  momentum: 'Msun km/s',
  angularMomentum: 'Msun kpc km/s',
} as const;

/** Default samples when the spec does not say: about 200 (common practice for a smooth drift plot). */
const DEFAULT_DIAGNOSTIC_SAMPLES = 200;

/** Toomre Q is profiled in this many bins out to this many scale lengths (where the disk has particles enough). */
const TOOMRE_BINS = 10;
const TOOMRE_RANGE_SCALE_LENGTHS = 4;

function equilibriumRecord(spec: RunSpec, initialClausiusRatio: number): EquilibriumRecord {
  const systems = balancedSystems(spec);
  return {
    balancedFor: systems.map((s) => ({ system: s.system, law: s.law.kind, label: lawInfo(s.law).label, ownLaw: s.ownLaw })),
    ownLaw: systems.length ? systems.every((s) => s.ownLaw) : null,
    initialClausiusRatio,
  };
}

function copyState(s: SimulationState): SimulationState {
  return { particles: cloneParticles(s.particles), step: s.step, rng: s.rng.slice() };
}

/** An evenly spread subset of indices, the same for every snapshot. */
function snapshotSubset(n: number, max: number): Uint32Array {
  if (n <= max) return Uint32Array.from({ length: n }, (_, i) => i);
  return Uint32Array.from({ length: max }, (_, k) => Math.floor((k * n) / max));
}

/**
 * A relative energy drift |E - E0| / (K0 + |W0|) beyond this ends the run as blown up: the
 * numbers then describe integration error, not the system. Laws that conserve energy get 1;
 * laws that exchange energy with a field or a non-pairwise pull get 1000 (our own bounds).
 */
export const BLOW_UP_DRIFT = { conserving: 1, other: 1000 } as const;

/** The likeliest cause of a blow-up, from the warnings the spec already earned. */
export function blowUpCause(warnings: EngineWarning[], suggestedTimestep_Myr: number): string {
  const has = (code: string) => warnings.some((w) => w.code === code);
  if (has('no-softening')) return 'softening_kpc is 0, so close pairs get unbounded forces; raise softening_kpc';
  if (has('timestep-coarse-for-softening') || has('timestep-coarse-for-crossing') || has('timestep-coarse-for-orbit')) {
    return `timestep_Myr is too long for the closest orbits; lower it to about ${suggestedTimestep_Myr.toPrecision(2)} Myr or raise softening_kpc`;
  }
  return 'the initial conditions hold close pairs or are far from equilibrium for this law; check the model, or raise softening_kpc';
}

/** Runs a spec to completion (or cancellation). Synchronous and pure: same spec, same result, bit for bit. */
export function runSimulation(spec: RunSpec, hooks: RunHooks = {}): RunResult {
  const resume = hooks.resumeFrom;
  // The checkpoint is copied, so the caller's stays a record of where it was taken.
  // A fresh run cancelled during its set-up throws CancelledDuringSetup (it has no state to return
  // yet); a resumed one has its checkpoint and ends through the loop's check like any cancel.
  const setupCancel = resume ? undefined : hooks.shouldCancel;
  const sim = new Simulation(spec, resume && copyState(resume.state), hooks.solver, setupCancel);
  if (resume) sim.forceEvaluations = resume.forceEvaluations;
  const { timescales, warnings } = timescalesFor(spec, sim.initial);
  const total = sim.totalSteps;
  const diagEvery = spec.diagnosticsEvery ?? Math.max(1, Math.ceil(total / DEFAULT_DIAGNOSTIC_SAMPLES));
  const progressEvery = Math.max(1, Math.floor(total / 100));
  const subset = snapshotSubset(sim.particles.n, hooks.maxSnapshotParticles ?? 5000);
  const curveRadius = sim.initial.massModel.extent_kpc;
  const info = sim.law.info;
  const driftLimit = info.conservesEnergy ? BLOW_UP_DRIFT.conserving : BLOW_UP_DRIFT.other;

  const diagnostics: DiagnosticSample[] = resume ? resume.diagnostics.slice() : [];
  const snapshots: Snapshot[] = resume ? resume.snapshots.slice() : [];
  let reference: DriftReference | null = resume?.reference ?? null;
  let latestDrift: number | null = diagnostics.length ? diagnostics[diagnostics.length - 1].energyDrift : null;

  const disk = modelModule(spec.model.kind).diskPart?.(spec.model);
  const diskPart = disk && sim.initial.components.find((c) => c.label === disk.component);
  const toomre =
    disk && diskPart
      ? (p: ParticleState, centre: DensityCentre) => toomreProfile(p, sim.law, diskPart, TOOMRE_RANGE_SCALE_LENGTHS * disk.scaleLength_kpc, TOOMRE_BINS, centre, localCoupling(spec.law))
      : null;

  const diagnose = () => {
    const out = sampleDiagnostics(sim.particles, sim.law, sim.state.step, sim.time_Myr, reference, toomre, sim.solver);
    reference = out.reference;
    diagnostics.push(out.sample);
    latestDrift = out.sample.energyDrift;
  };
  const snapshot = () => {
    const p = sim.particles;
    const positions = new Float32Array(3 * subset.length);
    const velocities = hooks.snapshotVelocities ? new Float32Array(3 * subset.length) : undefined;
    subset.forEach((i, k) => {
      positions[3 * k] = p.x[i]; positions[3 * k + 1] = p.y[i]; positions[3 * k + 2] = p.z[i];
      if (velocities) {
        velocities[3 * k] = p.vx[i]; velocities[3 * k + 1] = p.vy[i]; velocities[3 * k + 2] = p.vz[i];
      }
    });
    snapshots.push({ step: sim.state.step, time_Myr: sim.time_Myr, positions, ...(velocities ? { velocities } : {}) });
  };
  const report = () =>
    hooks.onProgress?.({
      step: sim.state.step,
      totalSteps: total,
      percent: (100 * sim.state.step) / total,
      time_Myr: sim.time_Myr,
      energyDrift: latestDrift,
    });

  // The initial curve and diagnostics sum over all pairs again: a cancel that came during the first force sum skips them.
  if (setupCancel?.()) throw new CancelledDuringSetup();
  let initialCurve: RotationCurve;
  if (resume) {
    initialCurve = resume.initialCurve;
  } else {
    initialCurve = measureRotationCurve(sim.particles, sim.law, curveRadius, CURVE_BINS, 0, 0, sim.initial.components);
    diagnose();
    snapshot();
  }
  report();

  const every = hooks.onCheckpoint ? hooks.checkpointEvery ?? { steps: Infinity, ms: Infinity } : null;
  let lastCheckpointStep = sim.state.step;
  let lastCheckpointAt = Date.now();
  const checkpointDue = () =>
    every !== null && (sim.state.step - lastCheckpointStep >= every.steps || Date.now() - lastCheckpointAt >= every.ms);
  const checkpoint = () => {
    lastCheckpointStep = sim.state.step;
    lastCheckpointAt = Date.now();
    hooks.onCheckpoint?.({
      state: copyState(sim.state),
      forceEvaluations: sim.forceEvaluations,
      diagnostics: diagnostics.slice(),
      snapshots: snapshots.slice(),
      reference,
      initialCurve,
    });
  };

  let cancelled = false;
  while (!sim.done) {
    if (hooks.shouldCancel?.()) {
      cancelled = true;
      break;
    }
    sim.advance();
    const step = sim.state.step;
    const broken = firstNonFinite(sim.particles);
    if (broken >= 0) {
      throw new Error(
        `the run blew up: particle ${broken} left finite numbers at step ${step} (t = ${sim.time_Myr.toPrecision(4)} Myr); ` +
          blowUpCause(warnings, timescales.suggestedTimestep_Myr),
      );
    }
    const last = sim.done;
    const diagNow = step % diagEvery === 0 || last;
    if (diagNow) {
      diagnose();
      const drift = latestDrift as number | null;
      if (drift !== null && !(Math.abs(drift) <= driftLimit)) {
        throw new Error(
          `the run blew up: the energy changed by ${drift.toPrecision(3)} of its scale by step ${step} (t = ${sim.time_Myr.toPrecision(4)} Myr), ` +
            `beyond the ${driftLimit} allowed; ${blowUpCause(warnings, timescales.suggestedTimestep_Myr)}`,
        );
      }
    }
    if (step % spec.snapshotEvery === 0 || last) snapshot();
    if (diagNow || step % progressEvery === 0) report();
    // Taken after the step's samples, so a resumed run never samples a step twice.
    if (checkpointDue() || (last && every !== null)) checkpoint();
  }
  // A cancelled run still ends with a sample and a frame of where it stopped.
  if (cancelled && diagnostics[diagnostics.length - 1].step !== sim.state.step) {
    diagnose();
    snapshot();
    report();
  }

  const finalCurve = measureRotationCurve(sim.particles, sim.law, curveRadius, CURVE_BINS, sim.state.step, sim.time_Myr, sim.initial.components);
  const last = diagnostics[diagnostics.length - 1];
  const drifts = diagnostics.map((d) => d.energyDrift).filter((d): d is number => d !== null);
  const meaning = (conserved: boolean, defined = true): QuantityMeaning => (!defined ? 'undefined' : conserved ? 'conserved' : 'not-conserved');

  return {
    cancelled,
    law: info,
    timescales,
    warnings,
    components: sim.initial.components,
    diagnostics,
    snapshotParticles: Array.from(subset),
    snapshotMasses: Array.from(subset, (i) => sim.particles.m[i]),
    snapshots,
    rotationCurves: { initial: initialCurve, final: finalCurve, analytic: analyticCurves(spec) },
    summary: {
      particleCount: particleCount(spec),
      totalSteps: total,
      stepsCompleted: sim.state.step,
      forceEvaluations: sim.forceEvaluations,
      finalTime_Myr: sim.time_Myr,
      finalEnergyDrift: last.energyDrift,
      maxAbsEnergyDrift: drifts.length ? Math.max(...drifts.map(Math.abs)) : null,
      finalMomentumDrift: last.momentumDrift,
      finalAngularMomentumDrift: last.angularMomentumDrift,
      quantities: {
        energy: meaning(info.conservesEnergy, info.hasPotential),
        momentum: meaning(info.conservesMomentum),
        angularMomentum: meaning(info.conservesAngularMomentum),
      },
      equilibrium: equilibriumRecord(spec, diagnostics[0].clausiusVirialRatio),
    },
    units: { ...RESULT_UNITS },
  };
}
