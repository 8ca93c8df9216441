// Run specs and particle sets the bench measures on: seeded, so every run of the
// bench times the same work. The systems are invented.
import { buildInitialConditions } from '../../shared/engine';
import type { ParticleState } from '../../shared/engine/state';
import { parseRunSpec, RUN_SPEC_VERSION, type RunSpec, type RunSpecInput } from '../../shared/spec';

export function spec(input: Omit<RunSpecInput, 'version'>): RunSpec {
  const parsed = parseRunSpec({ version: RUN_SPEC_VERSION, ...input });
  if (!parsed.ok) throw new Error(`bench spec is invalid: ${JSON.stringify(parsed.issues)}`);
  return parsed.spec;
}

/** A Plummer sphere of n particles (1e10 Msun, a = 1 kpc), direct sum, `steps` leapfrog steps of 0.25 Myr. */
export function plummerRun(n: number, steps: number, extra: Partial<Omit<RunSpecInput, 'version'>> = {}): RunSpec {
  return spec({
    name: `Bench Plummer sphere, ${n} particles (invented)`,
    model: { kind: 'plummer', n, mass_Msun: 1e10, scale_kpc: 1 },
    law: { kind: 'newton' },
    solver: { kind: 'direct' },
    timestep_Myr: 0.25,
    duration_Myr: 0.25 * steps,
    softening_kpc: 0.05,
    snapshotEvery: steps,
    diagnosticsEvery: Math.max(1, Math.floor(steps / 10)),
    seed: 7,
    ...extra,
  });
}

/** The exponential disk of the end-to-end figure: 2,000 particles, 1,000 Newtonian direct-sum steps. */
export function diskRun(n: number, steps: number): RunSpec {
  return spec({
    name: `Bench disk, ${n} particles, ${steps} steps (invented)`,
    model: { kind: 'disk', n, mass_Msun: 5e10, scaleLength_kpc: 3, scaleHeight_kpc: 0.3, toomreQ: 1.5 },
    law: { kind: 'newton' },
    solver: { kind: 'direct' },
    timestep_Myr: 0.5,
    duration_Myr: 0.5 * steps,
    softening_kpc: 0.1,
    snapshotEvery: Math.max(1, Math.floor(steps / 100)),
    seed: 11,
  });
}

/** The particles of plummerRun(n, 1); beyond the largest N a spec accepts (the tree bench's 3e5) from the same spec with only n changed. */
export function plummerParticles(n: number): ParticleState {
  const run = plummerRun(Math.min(n, 1_000), 1);
  return buildInitialConditions({ ...run, model: { ...run.model, n } as RunSpec['model'] }).particles;
}

/** The big disk of the end-to-end figure: 8,000 particles of a disk with a bulge, tree solver at theta 0.6. */
export function bigDiskRun(n: number, steps: number): RunSpec {
  return spec({
    name: `Bench disk with bulge, ${n} particles, ${steps} steps, tree (invented)`,
    model: { kind: 'disk', n, mass_Msun: 5e10, scaleLength_kpc: 3, scaleHeight_kpc: 0.3, toomreQ: 1.5, bulge: { mass_Msun: 1e10, scale_kpc: 0.5 } },
    law: { kind: 'newton' },
    solver: { kind: 'tree', theta: 0.6 },
    timestep_Myr: 0.5,
    duration_Myr: 0.5 * steps,
    softening_kpc: 0.1,
    snapshotEvery: Math.max(1, Math.floor(steps / 100)),
    seed: 13,
  });
}
