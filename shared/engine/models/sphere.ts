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
import { lawPullRatio, sphereDirections } from './lawPull';
import { makeSolver } from '../solvers';
import type { Sources } from '../state';

type Sphere = { n: number; mass_Msun: number; halo?: HaloSpec };

/** The sphere with its halo, if any; curves are drawn out to the sphere's own extent. */
export function sphereMassModel(profile: SphericalProfile, halo: HaloSpec | undefined): MassModel {
  const sphere = sphericalModel(profile);
  if (!halo) return sphere;
  return { ...combinedModel([sphere, sphericalModel(haloProfile(halo))]), extent_kpc: sphere.extent_kpc };
}

export const sphereMass = (s: Sphere): number => s.mass_Msun + (s.halo?.mass_Msun ?? 0);

export const sphereComponents = (label: string, s: Sphere): string[] => (s.halo ? [label, 'halo'] : [label]);

/** Probe shells for the law's own pull: from a twentieth of the scale radius out to the outermost part's truncation (or 50 scale radii, beyond which the pull is the point mass's). */
const SHELLS = 32, SHELL_DIRECTIONS = 128;

/**
 * The law's own spherically averaged pull among the sampled particles (sphere and halo), as a
 * ratio to the model curve: 1 unless that curve approximates the law's field (lawPull.ts).
 * The field form of MOND on its default grid, whose cell can be as large as the sphere's scale
 * radius, pulls a 20,000-particle Plummer sphere's particles 2K/|sum m r.a| = 1.13 harder than the
 * algebraic curve it was balanced for, a Hernquist one 1.56 (measured).
 */
function shellCorrection(profile: SphericalProfile, halo: SphericalProfile | undefined, law: LawSpec, spec: SampleContext['spec'], sources: Sources, field: MassModel): (r: number) => number {
  const inner = 0.05 * profile.scale_kpc;
  const outer = Math.min(Math.max(profile.outerRadius_kpc, halo?.outerRadius_kpc ?? 0), 50 * Math.max(profile.scale_kpc, halo?.scale_kpc ?? 0));
  const lnR = Float64Array.from({ length: SHELLS }, (_, k) => Math.log(inner) + ((Math.log(outer) - Math.log(inner)) * k) / (SHELLS - 1));
  return lawPullRatio(law, { solver: makeSolver(spec.solver), softening_kpc: spec.softening_kpc }, sources, field, lnR, sphereDirections(SHELL_DIRECTIONS));
}

/**
 * Positions from the profile (then the halo's), then isotropic velocities from
 * each part's distribution function in the softened field of both under `law`
 * (its own pull among the particles where its model curve only approximates it).
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
  const count = s.n + (s.halo?.n ?? 0);
  const view = (a: Float64Array) => a.subarray(start, start + count);
  const correction = shellCorrection(profile, halo, law, spec, { x: view(out.x), y: view(out.y), z: view(out.z), m: view(out.m) }, field);
  assignIsotropicVelocities(out, start, s.n, isotropicSpeedSampler(profile, field, law, correction), rng);
  const parts: Component[] = [{ label, start, count: s.n }];
  if (s.halo && halo) {
    assignIsotropicVelocities(out, start + s.n, s.halo.n, isotropicSpeedSampler(halo, field, law, correction), rng);
    parts.push({ label: 'halo', start: start + s.n, count: s.halo.n });
  }
  return parts;
}
