import { z } from 'zod';
import { extraInteractions, lawSchema, referenceLaw } from '../engine/laws/registry';
import { modelModule, modelModules, modelSchema } from '../engine/models/registry';
import { SYSTEM_MODULES } from '../engine/models/systems';
import { groupDigits, LIMITS } from './limits';
import { solverSchema } from './solver';

/**
 * The run spec: one versioned document that fully determines a run. The same
 * spec (seed included) gives bit-identical results. Units sit in field names:
 * kpc, km/s, Msun, Myr at the interface.
 */
export const RUN_SPEC_VERSION = 3 as const;
// Versions 1 and 2 are still read, each with its own meaning where it differs:
// version 1, a sphere with no equilibriumLaw is balanced for Newton (from 2 on: for
// the run's law); versions 1 and 2, a disk's velocities are Gaussians about moments
// with Toomre's Q taken with Newton's G (from 3 on: drawn from a distribution
// function, Q taken with the law's short-range coupling; models/disk.ts).

export { LIMITS } from './limits';

/**
 * The one length limit for every name a person gives (runs, templates, cohorts, galaxies, API
 * tokens): the API, the forms and the CLI all check names with `nameSchema`.
 */
export const NAME_MAX_LENGTH = 120;
export const nameSchema = z.string().trim().min(1, 'name must not be empty').max(NAME_MAX_LENGTH, `name is at most ${NAME_MAX_LENGTH} characters`);
export const runNameSchema = nameSchema.describe('free label for the run').meta({ title: 'Name' });

/** What is wrong with a typed name, in the schema's words, or undefined; empty is the caller's business. */
export function nameProblem(text: string): string | undefined {
  if (!text.trim()) return undefined;
  const r = nameSchema.safeParse(text);
  return r.success ? undefined : r.error.issues[0].message;
}

export { solverSchema } from './solver';
export { modelSchema } from '../engine/models/registry';

export const integratorSchema = z
  .enum(['leapfrog', 'yoshida4', 'rk4'])
  .describe('leapfrog kick-drift-kick; fourth-order symplectic (Yoshida 1990); classical RK4 (not symplectic)')
  .meta({ title: 'Integrator', optionLabels: { leapfrog: 'Leapfrog (KDK)', yoshida4: 'Yoshida 4th order', rk4: 'RK4' } });

export { MIN_TRUNCATION_FRACTION } from '../engine/models/fields';

export const runSpecSchema = z
  .strictObject({
    version: z.union([z.literal(1), z.literal(2), z.literal(RUN_SPEC_VERSION)], `version must be ${RUN_SPEC_VERSION}, the current spec format (1 and 2 are still read)`).describe('3 is current; 1 and 2 are read with their own set-ups (equilibriumLaw default, disk velocities)'),
    name: runNameSchema.optional(),
    model: modelSchema.meta({ title: 'Model' }),
    law: lawSchema.meta({ title: 'Force law' }),
    integrator: integratorSchema.default('leapfrog'),
    solver: solverSchema.default({ kind: 'direct' }).meta({ title: 'Solver' }),
    timestep_Myr: z.number().positive().max(1e4).meta({ title: 'Timestep Δt' }),
    duration_Myr: z.number().positive().max(1e6).meta({ title: 'Duration' }),
    softening_kpc: z.number().min(0).max(100).describe('Plummer softening length eps').meta({ title: 'Softening ε' }),
    snapshotEvery: z.number().int().min(1).describe('steps between snapshots').meta({ title: 'Snapshot every', unit: 'steps' }),
    diagnosticsEvery: z.number().int().min(1).optional().describe('steps between diagnostic samples; default gives about 200').meta({ title: 'Diagnostics every', unit: 'steps', absent: 'about 200 samples' }),
    seed: z.number().int().min(0).max(4_294_967_295).default(1).meta({ title: 'Random seed' }),
  })
  .superRefine((spec, ctx) => {
    const steps = stepsFor(spec.duration_Myr, spec.timestep_Myr);
    if (Number.isNaN(steps)) return; // the fields themselves are already reported
    if (!Number.isFinite(steps)) {
      // A subnormal timestep passes positive() but divides the duration into infinitely many steps.
      ctx.addIssue({ code: 'custom', path: ['timestep_Myr'], message: `Timestep Δt ${spec.timestep_Myr} Myr is too short: the duration would take more than ${groupDigits(LIMITS.maxSteps)} steps` });
      return;
    }
    if (steps > LIMITS.maxSteps) {
      ctx.addIssue({
        code: 'custom',
        path: ['duration_Myr'],
        message: `Duration ${spec.duration_Myr} Myr at a timestep of ${spec.timestep_Myr} Myr takes ${groupDigits(steps)} steps; at most ${groupDigits(LIMITS.maxSteps)} are allowed: shorten the duration or lengthen the timestep`,
      });
    }
    if (Number.isInteger(spec.snapshotEvery) && Math.floor(steps / spec.snapshotEvery) + 1 > LIMITS.maxSnapshots) {
      ctx.addIssue({
        code: 'custom',
        path: ['snapshotEvery'],
        message: `A snapshot every ${groupDigits(spec.snapshotEvery)} steps gives more than ${groupDigits(LIMITS.maxSnapshots)} snapshots over ${groupDigits(steps)} steps: take one every ${groupDigits(Math.ceil(steps / (LIMITS.maxSnapshots - 1)))} steps or more`,
      });
    }
    if (spec.diagnosticsEvery !== undefined && Math.floor(steps / spec.diagnosticsEvery) + 1 > LIMITS.maxDiagnostics) {
      ctx.addIssue({
        code: 'custom',
        path: ['diagnosticsEvery'],
        message: `Diagnostics every ${groupDigits(spec.diagnosticsEvery)} steps gives more than ${groupDigits(LIMITS.maxDiagnostics)} samples over ${groupDigits(steps)} steps: take one every ${groupDigits(Math.ceil(steps / (LIMITS.maxDiagnostics - 1)))} steps or more`,
      });
    }
    // A model of unknown kind is already reported by the union.
    if (spec.model) modelModules().find((m) => m.kind === spec.model.kind)?.check?.(spec.model, ['model'], ctx);
  });

export type RunSpec = z.infer<typeof runSpecSchema>;
/** What a client may send: defaults not yet filled in. */
export type RunSpecInput = z.input<typeof runSpecSchema>;
export type ModelSpec = RunSpec['model'];
export type { ModelKind } from '../engine/models/registry';
export type { SystemSpec } from '../engine/models/systems';
export type { DiskSpec } from '../engine/models/disk';
export type { HaloSpec } from '../engine/models/fields';
export { systemParticles } from '../engine/models/fields';
export type { SolverSpec } from './solver';
export type IntegratorKind = RunSpec['integrator'];
export type { LawSpec, LawKind, LawSpecInput } from '../engine/laws/registry';

export type SpecIssue = { path: string; message: string };

/** Where an input's problem is, dotted; one unknown key is named in the path too, so the field points at it. */
export function issuePath(issue: z.core.$ZodIssue): string {
  const keys = issue.code === 'unrecognized_keys' && issue.keys.length === 1 ? issue.keys : [];
  return [...issue.path, ...keys].map(String).join('.');
}

export function parseRunSpec(input: unknown): { ok: true; spec: RunSpec } | { ok: false; issues: SpecIssue[] } {
  const result = runSpecSchema.safeParse(input);
  if (result.success) return { ok: true, spec: result.data };
  return {
    ok: false,
    issues: result.error.issues.map((i) => ({ path: issuePath(i) || '(spec)', message: i.message })),
  };
}

// A hair of tolerance so 100 / 0.1 counts as 1000 steps, not 1001.
const stepsFor = (duration_Myr: number, timestep_Myr: number): number =>
  Math.max(1, Math.ceil(duration_Myr / timestep_Myr - 1e-9));

/** Steps the run takes; the last one ends at stepCount * timestep_Myr (at or just past duration_Myr). */
export const stepCount = (spec: RunSpec): number => stepsFor(spec.duration_Myr, spec.timestep_Myr);

export const particleCount = (spec: RunSpec): number => modelModule(spec.model.kind).particleCount(spec.model);

/** Force evaluations per step: leapfrog 1, Yoshida's scheme 3 (one per sub-step), RK4 4. */
export const FORCE_EVALUATIONS_PER_STEP: Record<IntegratorKind, number> = { leapfrog: 1, yoshida4: 3, rk4: 4 };

/**
 * Quota cost in pair interactions. Direct sum: every target visits every
 * source, N^2 per force evaluation. Tree: our own estimate,
 * N * 48 * log2(N) * (0.6 / theta)^2 per evaluation, calibrated on this
 * engine's walk (Plummer spheres and disks of 1e3-2e4 particles interact
 * with 25-75 cells and leaf particles per log2 N at theta 0.6, and the count
 * grows roughly as theta^-2); never more than the direct cost. A law that
 * solves on a grid adds its own share (gridInteractions). All are multiplied by
 * force evaluations per step and by steps.
 */
export function estimateInteractions(spec: RunSpec): number {
  const n = particleCount(spec);
  const pairs =
    spec.solver.kind === 'direct'
      ? n * n
      : Math.min(n * n, n * 48 * Math.log2(Math.max(2, n)) * (0.6 / spec.solver.theta) ** 2);
  const perEval = pairs + gridInteractions(spec);
  return Math.round(perEval * FORCE_EVALUATIONS_PER_STEP[spec.integrator] * stepCount(spec));
}

/** Work per force evaluation beyond the pair sum (the grid of a field-form law), in pair interactions. */
export const gridInteractions = (spec: RunSpec): number => extraInteractions(spec.law);

/** A small valid run: the first system's preset (a 500-particle Plummer sphere) under the reference law (Newton) for about 4 crossing times. */
export function defaultRunSpec(): RunSpec {
  const parsed = parseRunSpec({
    version: RUN_SPEC_VERSION,
    model: SYSTEM_MODULES[0].preset,
    law: referenceLaw(),
    integrator: 'leapfrog',
    solver: { kind: 'direct' },
    timestep_Myr: 0.2,
    duration_Myr: 50,
    softening_kpc: 0.05,
    snapshotEvery: 10,
    seed: 1,
  });
  if (!parsed.ok) throw new Error(`default spec is invalid: ${JSON.stringify(parsed.issues)}`);
  return parsed.spec;
}
