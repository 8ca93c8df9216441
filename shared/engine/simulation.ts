import type { RunSpec } from '../spec/runSpec';
import { stepCount } from '../spec/runSpec';
import { makeIntegrator, type Integrator } from './integrators';
import { createLaw } from './laws/registry';
import type { ForceLaw } from './laws/types';
import { buildInitialConditions, type InitialConditions } from './models';
import { seedRng, type RngState } from './rng';
import { makeSolver, type FieldSolver } from './solvers';
import { cloneParticles, type ParticleState } from './state';
import { internalToMyr, myrToInternal } from './units';

/**
 * The complete evolving state: typed arrays, the step counter and the RNG
 * words. Serialising these three is a checkpoint; `new Simulation(spec, ic,
 * state)` resumes bit-identically because time is step * dt, not a sum.
 */
export interface SimulationState {
  particles: ParticleState;
  step: number;
  rng: RngState;
}

/** Thrown when a run is cancelled during its set-up, before it has a first state to return. */
export class CancelledDuringSetup extends Error {
  constructor() {
    super('the run was cancelled while its initial conditions were being set up');
  }
}

export class Simulation {
  readonly spec: RunSpec;
  readonly law: ForceLaw;
  /** The solver the law sums with (the spec's, or the one given in its place). */
  readonly solver: FieldSolver;
  readonly initial: InitialConditions;
  readonly totalSteps: number;
  readonly state: SimulationState;
  private readonly integrator: Integrator;
  private readonly dt: number;
  forceEvaluations = 0;

  /**
   * `solver` replaces the one the spec names (see RunHooks.solver). `shouldCancel` is asked
   * once the particles are sampled: a cancel then skips the first force sum, which for the
   * largest direct-sum models takes far longer than the sampling.
   */
  constructor(spec: RunSpec, state?: SimulationState, solver: FieldSolver = makeSolver(spec.solver), shouldCancel?: () => boolean) {
    this.spec = spec;
    // Initial conditions always come from a fresh generator, so a resumed run knows its t = 0 too.
    const icRng = seedRng(spec.seed);
    this.initial = buildInitialConditions(spec, icRng);
    if (shouldCancel?.()) throw new CancelledDuringSetup();
    this.solver = solver;
    this.law = createLaw(spec.law, { solver, softening_kpc: spec.softening_kpc, initial: this.initial.particles });
    this.totalSteps = stepCount(spec);
    this.dt = myrToInternal(spec.timestep_Myr);
    this.integrator = makeIntegrator(spec.integrator, this.initial.particles.n);
    if (state) {
      this.state = state;
    } else {
      // The initial particles are copied so `initial` stays a record of t = 0.
      this.state = { particles: cloneParticles(this.initial.particles), step: 0, rng: icRng };
      this.evaluate();
    }
  }

  get particles(): ParticleState {
    return this.state.particles;
  }

  get time_Myr(): number {
    return internalToMyr(this.state.step * this.dt);
  }

  get done(): boolean {
    return this.state.step >= this.totalSteps;
  }

  /** Refreshes the accelerations from the current positions. */
  private readonly evaluate = (): void => {
    const p = this.state.particles;
    this.law.accelerations(p, p, p);
    this.forceEvaluations++;
  };

  advance(): void {
    this.integrator.step(this.state.particles, this.dt, this.evaluate);
    this.state.step++;
  }
}
