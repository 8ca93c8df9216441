// What the Plummer and Hernquist modules share: a spherical profile, an
// optional live halo, and isotropic velocities in the field of both.
import type { LawSpec } from '../laws/registry';
import type { RngState } from '../rng';
import type { ParticleState } from '../state';
import type { HaloSpec } from './fields';
import { haloProfile, sampleHaloPositions } from './halo';
import { assignIsotropicVelocities, isotropicSpeedSampler, softenedSphericalModel } from './isotropic';
import { combinedModel, sphericalModel, type MassModel, type SphericalProfile } from './massModel';
import type { Component, SampleContext } from './types';

type Sphere = { n: number; mass_Msun: number; halo?: HaloSpec };

/** The sphere with its halo, if any; curves are drawn out to the sphere's own extent. */
export function sphereMassModel(profile: SphericalProfile, halo: HaloSpec | undefined): MassModel {
  const sphere = sphericalModel(profile);
  if (!halo) return sphere;
  return { ...combinedModel([sphere, sphericalModel(haloProfile(halo))]), extent_kpc: sphere.extent_kpc };
}

export const sphereMass = (s: Sphere): number => s.mass_Msun + (s.halo?.mass_Msun ?? 0);

export const sphereComponents = (label: string, s: Sphere): string[] => (s.halo ? [label, 'halo'] : [label]);

/**
 * Positions from the profile (then the halo's), then isotropic velocities from
 * each part's distribution function in the softened field of both under `law`.
 */
export function sampleSphere(
  s: Sphere,
  label: string,
  profile: SphericalProfile,
  positions: (rng: RngState, out: ParticleState, start: number, count: number) => void,
  law: LawSpec,
  { spec, rng }: SampleContext,
  out: ParticleState,
  start: number,
): Component[] {
  positions(rng, out, start, s.n);
  if (s.halo) sampleHaloPositions(s.halo, rng, out, start + s.n);
  const halo = s.halo && haloProfile(s.halo);
  const own = softenedSphericalModel(profile, spec.softening_kpc);
  const field = halo ? combinedModel([own, softenedSphericalModel(halo, spec.softening_kpc)]) : own;
  assignIsotropicVelocities(out, start, s.n, isotropicSpeedSampler(profile, field, law), rng);
  const parts: Component[] = [{ label, start, count: s.n }];
  if (s.halo && halo) {
    assignIsotropicVelocities(out, start + s.n, s.halo.n, isotropicSpeedSampler(halo, field, law), rng);
    parts.push({ label: 'halo', start: start + s.n, count: s.halo.n });
  }
  return parts;
}
