// Field schemas the model modules share, so a mass or a particle count reads and
// is bounded the same in every model.
import { z } from 'zod';
import { groupDigits, LIMITS } from '../../spec/limits';
import { lawSchema } from '../laws/registry';

export const count = z.number().int().min(2).max(LIMITS.maxParticles).describe('number of particles').meta({ title: 'Particles N' });
export const mass = z.number().positive().max(1e15).meta({ title: 'Mass' });
export const length = z.number().positive().max(1e4);
// `absent`: what a spec table says for an optional field left out.
export const truncation = length.optional().describe('no particle is placed beyond this radius; defaults per model').meta({ title: 'Truncation radius', absent: 'the model’s default' });
export const equilibriumLaw = lawSchema
  .optional()
  .describe("law whose field the velocities are balanced in; defaults to the run's law (set it to compare laws from identical initial conditions)")
  .meta({ title: 'Velocities balanced for', absent: 'the run’s law' });

/**
 * A truncation radius below this fraction of the scale radius leaves a sliver of the
 * profile's mass (below 1e-6 of it for Plummer and Hernquist) that the samplers
 * cannot draw from, and is a point mass in all but name (our own bound).
 */
export const MIN_TRUNCATION_FRACTION = 0.01;

/** Refuses a truncation radius far inside the scale radius (`scaleName` names the scale field, `scaleWords` says it to people). */
export function checkTruncation(
  m: { truncationRadius_kpc?: number } & Record<string, unknown>,
  scaleName: string,
  path: (string | number)[],
  ctx: z.RefinementCtx,
  scaleWords = scaleName === 'scaleLength_kpc' ? 'scale length' : 'scale radius',
): void {
  const rt = m.truncationRadius_kpc;
  const scale = m[scaleName];
  if (rt === undefined || typeof scale !== 'number' || !(rt < MIN_TRUNCATION_FRACTION * scale)) return;
  ctx.addIssue({
    code: 'custom',
    path: [...path, 'truncationRadius_kpc'],
    message: `Truncation radius ${rt} kpc is below ${MIN_TRUNCATION_FRACTION * 100}% of the ${scaleWords} (${scale} kpc): the model would hold almost none of its mass`,
  });
}

/** The optional live dark halo a sphere or a disk may carry. */
export const liveHaloSchema = z
  .strictObject({
    profile: z
      .enum(['nfw', 'hernquist'])
      .describe('NFW (Navarro, Frenk & White 1996) or Hernquist (1990) density')
      .meta({ title: 'Halo profile', optionLabels: { nfw: 'NFW', hernquist: 'Hernquist' } }),
    n: count.describe('halo particles, in addition to the model\'s n; each carries mass_Msun / n').meta({ title: 'Halo particles' }),
    mass_Msun: mass.describe('halo mass inside its truncation radius').meta({ title: 'Halo mass' }),
    scale_kpc: length.describe('scale radius r_s (NFW) or a (Hernquist)').meta({ title: 'Halo scale radius' }),
    truncationRadius_kpc: truncation
      .describe('NFW: where an exponential cut-off begins (decay length a tenth of it, particles out to 3 times it), default 10 r_s; Hernquist: a sharp cut, default the 99% mass radius')
      .meta({ title: 'Halo truncation radius' }),
  })
  .optional()
  .describe('optional live dark halo of particles, isotropic velocities from its distribution function in the whole system\'s field')
  .meta({ title: 'Live halo', absent: 'none' });

export type HaloSpec = NonNullable<z.infer<typeof liveHaloSchema>>;

/** A live halo for the preset systems: about ten times their mass, as galaxies hold (common practice). */
export const LIVE_HALO_PRESET: z.input<typeof liveHaloSchema> = { profile: 'nfw', n: 4000, mass_Msun: 5e11, scale_kpc: 15 };

/** Particles of one system: its own n plus its live halo's. */
export const systemParticles = (s: { n: number; halo?: { n: number } }): number => s.n + (s.halo?.n ?? 0);

/** A system's own checks: its truncation and its halo's, and n + halo.n within the limit. */
export function checkSystem(
  s: { n: number; truncationRadius_kpc?: number; halo?: HaloSpec } & Record<string, unknown>,
  scaleName: string,
  path: (string | number)[],
  ctx: z.RefinementCtx,
): void {
  if (s.halo) checkTruncation(s.halo, 'scale_kpc', [...path, 'halo'], ctx, "halo's scale radius");
  checkTruncation(s, scaleName, path, ctx);
}

/** n + halo.n within the limit, for a system standing alone (an encounter checks both together). */
export function checkSystemParticles(s: { n: number; halo?: HaloSpec }, path: (string | number)[], ctx: z.RefinementCtx): void {
  if (s.halo && s.n + s.halo.n > LIMITS.maxParticles) {
    ctx.addIssue({ code: 'custom', path: [...path, 'halo', 'n'], message: `Particles N and halo particles together must be at most ${groupDigits(LIMITS.maxParticles)}` });
  }
}
