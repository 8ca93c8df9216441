import { z } from 'zod';
import { lawSchema, type LawSpec } from '../engine/laws/registry';

/**
 * The run spec: one versioned document that fully determines a run. The same
 * spec (seed included) gives bit-identical results. Units sit in field names:
 * kpc, km/s, Msun, Myr at the interface.
 */
export const RUN_SPEC_VERSION = 2 as const;
// Version 1 is still read. It differs in one meaning only: a sphere with no
// equilibriumLaw is balanced for Newton (version 2: for the run's law).

/** Hard limits: the engine refuses anything beyond them. */
export const LIMITS = {
  maxParticles: 100_000,
  maxSteps: 200_000,
  maxTableRows: 20_000,
  /** Snapshots and diagnostic samples are kept in memory and shipped to the browser. */
  maxSnapshots: 1_000,
  maxDiagnostics: 2_000,
} as const;

/** The one length limit for run and template names; the API, the form, the CLI and templates all use it. */
export const NAME_MAX_LENGTH = 120;
export const runNameSchema = z
  .string()
  .trim()
  .min(1, 'name must not be empty')
  .max(NAME_MAX_LENGTH, `name is at most ${NAME_MAX_LENGTH} characters`)
  .describe('free label for the run');

const count = z.number().int().min(2).max(LIMITS.maxParticles).describe('number of particles');
const mass = z.number().positive().max(1e15);
const length = z.number().positive().max(1e4);
const truncation = length.optional().describe('no particle is placed beyond this radius; defaults per model');
const equilibriumLaw = lawSchema
  .optional()
  .describe("law whose field the velocities are balanced in; defaults to the run's law (set it to compare laws from identical initial conditions)");

const haloSchema = z
  .strictObject({
    profile: z.enum(['nfw', 'hernquist']).describe('NFW (Navarro, Frenk & White 1996) or Hernquist (1990) density'),
    n: count.describe('halo particles, in addition to the model\'s n; each carries mass_Msun / n'),
    mass_Msun: mass.describe('halo mass inside its truncation radius'),
    scale_kpc: length.describe('scale radius r_s (NFW) or a (Hernquist)'),
    truncationRadius_kpc: truncation.describe('NFW: where an exponential cut-off begins (decay length a tenth of it, particles out to 3 times it), default 10 r_s; Hernquist: a sharp cut, default the 99% mass radius'),
  })
  .optional()
  .describe('optional live dark halo of particles, isotropic velocities from its distribution function in the whole system\'s field');

const plummerSchema = z
  .strictObject({
    kind: z.literal('plummer'),
    n: count,
    mass_Msun: mass,
    scale_kpc: length.describe('Plummer radius a'),
    truncationRadius_kpc: truncation,
    halo: haloSchema,
    equilibriumLaw,
  })
  .describe('Plummer sphere: radii as Aarseth, Henon & Wielen (1974), isotropic velocities from the distribution function in the equilibrium law\'s field');

const hernquistSchema = z
  .strictObject({
    kind: z.literal('hernquist'),
    n: count,
    mass_Msun: mass,
    scale_kpc: length.describe('Hernquist scale radius a'),
    truncationRadius_kpc: truncation,
    halo: haloSchema,
    equilibriumLaw,
  })
  .describe('Hernquist (1990) sphere, isotropic velocities from the distribution function in the equilibrium law\'s field');

const diskSchema = z
  .strictObject({
    kind: z.literal('disk'),
    n: count.describe('number of particles, disk and bulge together'),
    mass_Msun: mass.describe('disk mass'),
    scaleLength_kpc: length.describe('exponential scale length R_d'),
    scaleHeight_kpc: length.describe('sech^2 scale height z0: rho ~ sech^2(z / z0)'),
    toomreQ: z.number().min(0.5).max(10).default(1.5).describe('Toomre (1964) stability parameter setting the radial dispersion'),
    truncationRadius_kpc: truncation,
    bulge: z
      .strictObject({ mass_Msun: mass, scale_kpc: length.describe('Hernquist scale radius of the bulge') })
      .optional()
      .describe('optional Hernquist bulge; particles are shared out in proportion to mass'),
    halo: haloSchema,
    equilibriumLaw,
  })
  .describe('Exponential disk (Freeman 1970) with sech^2 vertical profile');

const systemSchema = z.discriminatedUnion('kind', [plummerSchema, hernquistSchema, diskSchema]);

const encounterSchema = z
  .strictObject({
    kind: z.literal('encounter'),
    primary: systemSchema,
    secondary: systemSchema,
    pericentre_kpc: length.describe('pericentre of the parabolic point-mass orbit'),
    initialSeparation_kpc: length.describe('starting distance between the two centres'),
    primaryTilt_deg: z.number().min(-180).max(180).default(0).describe('rotation of the primary about the x axis (orbit in the x-y plane)'),
    secondaryTilt_deg: z.number().min(-180).max(180).default(0),
  })
  .describe('Two systems approaching on a parabolic orbit');

const keplerSchema = z
  .strictObject({
    kind: z.literal('kepler'),
    mass1_Msun: mass,
    mass2_Msun: mass,
    semiMajorAxis_kpc: length,
    eccentricity: z.number().min(0).max(0.99).default(0),
  })
  .describe('Two bodies on a Kepler orbit, starting at pericentre');

const coordinate = z.number().min(-1e5).max(1e5);
const speed = z.number().min(-1e5).max(1e5);
const tableSchema = z
  .strictObject({
    kind: z.literal('table'),
    particles: z
      .array(
        z.strictObject({
          x_kpc: coordinate, y_kpc: coordinate, z_kpc: coordinate,
          vx_km_s: speed, vy_km_s: speed, vz_km_s: speed,
          mass_Msun: mass,
        }),
      )
      .min(2)
      .max(LIMITS.maxTableRows),
    recentre: z.boolean().default(true).describe('move the particles into their centre-of-mass frame'),
  })
  .describe('Uploaded particles');

export const modelSchema = z.discriminatedUnion('kind', [
  keplerSchema,
  plummerSchema,
  hernquistSchema,
  diskSchema,
  encounterSchema,
  tableSchema,
]);

export const solverSchema = z.discriminatedUnion('kind', [
  z.strictObject({ kind: z.literal('direct') }).describe('direct pairwise sum'),
  z
    .strictObject({ kind: z.literal('tree'), theta: z.number().min(0.1).max(1.5).default(0.6).describe('opening angle') })
    .describe('Barnes & Hut (1986) octree'),
]);

export const integratorSchema = z
  .enum(['leapfrog', 'yoshida4', 'rk4'])
  .describe('leapfrog kick-drift-kick; fourth-order symplectic (Yoshida 1990); classical RK4 (not symplectic)');

/**
 * A truncation radius below this fraction of the scale radius leaves a sliver of the
 * profile's mass (below 1e-6 of it for Plummer and Hernquist) that the samplers
 * cannot draw from, and is a point mass in all but name (our own bound).
 */
export const MIN_TRUNCATION_FRACTION = 0.01;

type Truncated = { kind: string; truncationRadius_kpc?: number; scale_kpc?: number; scaleLength_kpc?: number };

function checkTruncation(m: Truncated & { halo?: Omit<Truncated, 'kind'> }, path: (string | number)[], ctx: z.RefinementCtx): void {
  if (m.halo) checkTruncation({ kind: 'halo', ...m.halo }, [...path, 'halo'], ctx);
  const rt = m.truncationRadius_kpc;
  const scale = m.kind === 'disk' ? m.scaleLength_kpc : m.scale_kpc;
  const scaleName = m.kind === 'disk' ? 'scaleLength_kpc' : 'scale_kpc';
  if (rt === undefined || scale === undefined || !(rt < MIN_TRUNCATION_FRACTION * scale)) return;
  ctx.addIssue({
    code: 'custom',
    path: [...path, 'truncationRadius_kpc'],
    message: `truncationRadius_kpc ${rt} is below ${MIN_TRUNCATION_FRACTION} x ${scaleName} (${scale}); the model would hold almost none of its mass`,
  });
}

export const runSpecSchema = z
  .strictObject({
    version: z.union([z.literal(1), z.literal(RUN_SPEC_VERSION)]).describe('2 is current; 1 is read with its own default for equilibriumLaw'),
    name: runNameSchema.optional(),
    model: modelSchema,
    law: lawSchema,
    integrator: integratorSchema.default('leapfrog'),
    solver: solverSchema.default({ kind: 'direct' }),
    timestep_Myr: z.number().positive().max(1e4),
    duration_Myr: z.number().positive().max(1e6),
    softening_kpc: z.number().min(0).max(100).describe('Plummer softening length eps'),
    snapshotEvery: z.number().int().min(1).describe('steps between snapshots'),
    diagnosticsEvery: z.number().int().min(1).optional().describe('steps between diagnostic samples; default gives about 200'),
    seed: z.number().int().min(0).max(4_294_967_295).default(1),
  })
  .superRefine((spec, ctx) => {
    const steps = stepsFor(spec.duration_Myr, spec.timestep_Myr);
    if (Number.isNaN(steps)) return; // the fields themselves are already reported
    if (!Number.isFinite(steps)) {
      // A subnormal timestep passes positive() but divides the duration into infinitely many steps.
      ctx.addIssue({ code: 'custom', path: ['timestep_Myr'], message: `timestep_Myr ${spec.timestep_Myr} gives more than ${LIMITS.maxSteps} steps over duration_Myr` });
      return;
    }
    if (steps > LIMITS.maxSteps) {
      ctx.addIssue({
        code: 'custom',
        path: ['duration_Myr'],
        message: `duration_Myr / timestep_Myr gives ${steps} steps; at most ${LIMITS.maxSteps} are allowed`,
      });
    }
    if (Number.isInteger(spec.snapshotEvery) && Math.floor(steps / spec.snapshotEvery) + 1 > LIMITS.maxSnapshots) {
      ctx.addIssue({
        code: 'custom',
        path: ['snapshotEvery'],
        message: `snapshotEvery ${spec.snapshotEvery} gives more than ${LIMITS.maxSnapshots} snapshots over ${steps} steps; use at least ${Math.ceil(steps / (LIMITS.maxSnapshots - 1))}`,
      });
    }
    if (spec.diagnosticsEvery !== undefined && Math.floor(steps / spec.diagnosticsEvery) + 1 > LIMITS.maxDiagnostics) {
      ctx.addIssue({
        code: 'custom',
        path: ['diagnosticsEvery'],
        message: `diagnosticsEvery ${spec.diagnosticsEvery} gives more than ${LIMITS.maxDiagnostics} samples; use at least ${Math.ceil(steps / (LIMITS.maxDiagnostics - 1))}`,
      });
    }
    const m = spec.model;
    if (m?.kind === 'encounter') {
      if (m.primary) checkTruncation(m.primary, ['model', 'primary'], ctx);
      if (m.secondary) checkTruncation(m.secondary, ['model', 'secondary'], ctx);
    } else if (m) checkTruncation(m, ['model'], ctx);
    if (m && m.kind !== 'encounter' && 'halo' in m && m.halo && m.n + m.halo.n > LIMITS.maxParticles) {
      ctx.addIssue({ code: 'custom', path: ['model', 'halo', 'n'], message: `n + halo.n must be at most ${LIMITS.maxParticles}` });
    }
    if (m?.kind === 'encounter' && m.primary && m.secondary) {
      if (systemParticles(m.primary) + systemParticles(m.secondary) > LIMITS.maxParticles) {
        ctx.addIssue({ code: 'custom', path: ['model', 'secondary', 'n'], message: `primary.n + secondary.n (haloes included) must be at most ${LIMITS.maxParticles}` });
      }
      if (m.initialSeparation_kpc < m.pericentre_kpc) {
        ctx.addIssue({ code: 'custom', path: ['model', 'initialSeparation_kpc'], message: 'initialSeparation_kpc must be at least pericentre_kpc' });
      }
    }
  });

export type RunSpec = z.infer<typeof runSpecSchema>;
/** What a client may send: defaults not yet filled in. */
export type RunSpecInput = z.input<typeof runSpecSchema>;
export type ModelSpec = RunSpec['model'];
export type SystemSpec = z.infer<typeof systemSchema>;
export type DiskSpec = z.infer<typeof diskSchema>;
export type HaloSpec = NonNullable<z.infer<typeof haloSchema>>;

/** Particles of one system: its own n plus its live halo's. */
export const systemParticles = (s: { n: number; halo?: { n: number } }): number => s.n + (s.halo?.n ?? 0);
export type SolverSpec = RunSpec['solver'];
export type IntegratorKind = RunSpec['integrator'];
export type { LawSpec, LawKind } from '../engine/laws/registry';

const NEWTON: LawSpec = { kind: 'newton' };

/** The law a system's velocities are balanced for: its own equilibriumLaw, else the run's law (a version-1 sphere: Newton). */
export function equilibriumLawOf(system: SystemSpec, spec: Pick<RunSpec, 'version' | 'law'>): LawSpec {
  if (system.equilibriumLaw) return system.equilibriumLaw;
  return spec.version === 1 && system.kind !== 'disk' ? NEWTON : spec.law;
}

export type SpecIssue = { path: string; message: string };

export function parseRunSpec(input: unknown): { ok: true; spec: RunSpec } | { ok: false; issues: SpecIssue[] } {
  const result = runSpecSchema.safeParse(input);
  if (result.success) return { ok: true, spec: result.data };
  return {
    ok: false,
    issues: result.error.issues.map((i) => ({ path: i.path.map(String).join('.') || '(spec)', message: i.message })),
  };
}

// A hair of tolerance so 100 / 0.1 counts as 1000 steps, not 1001.
const stepsFor = (duration_Myr: number, timestep_Myr: number): number =>
  Math.max(1, Math.ceil(duration_Myr / timestep_Myr - 1e-9));

/** Steps the run takes; the last one ends at stepCount * timestep_Myr (at or just past duration_Myr). */
export const stepCount = (spec: RunSpec): number => stepsFor(spec.duration_Myr, spec.timestep_Myr);

export function particleCount(spec: RunSpec): number {
  const m = spec.model;
  switch (m.kind) {
    case 'kepler':
      return 2;
    case 'table':
      return m.particles.length;
    case 'encounter':
      return systemParticles(m.primary) + systemParticles(m.secondary);
    default:
      return systemParticles(m);
  }
}

/** Force evaluations per step: leapfrog 1, Yoshida's scheme 3 (one per sub-step), RK4 4. */
export const FORCE_EVALUATIONS_PER_STEP: Record<IntegratorKind, number> = { leapfrog: 1, yoshida4: 3, rk4: 4 };

/**
 * Quota cost in pair interactions. Direct sum: every target visits every
 * source, N^2 per force evaluation. Tree: our own estimate,
 * N * 48 * log2(N) * (0.6 / theta)^2 per evaluation, calibrated on this
 * engine's walk (Plummer spheres and disks of 1e3-2e4 particles interact
 * with 25-75 cells and leaf particles per log2 N at theta 0.6, and the count
 * grows roughly as theta^-2); never more than the direct cost. The grid of the
 * field form of MOND adds its own share (gridInteractions). All are multiplied by
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

/**
 * Grid work of the field form of MOND per force evaluation, in pair
 * interactions: two isolated FFT solves on a doubled grid cost about
 * 30 g^3 log2(2g) pair interactions for g nodes per side (our own
 * measurement against the direct sum, best of four at g = 32 and 64, on a busy machine).
 */
export function gridInteractions(spec: RunSpec): number {
  if (spec.law.kind !== 'qumond') return 0;
  const g = spec.law.grid;
  return 30 * g ** 3 * Math.log2(2 * g);
}

/** A small valid run: a 500-particle Plummer sphere under Newton for about 4 crossing times. */
export function defaultRunSpec(): RunSpec {
  const parsed = parseRunSpec({
    version: RUN_SPEC_VERSION,
    model: { kind: 'plummer', n: 500, mass_Msun: 1e10, scale_kpc: 1 },
    law: { kind: 'newton' },
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
