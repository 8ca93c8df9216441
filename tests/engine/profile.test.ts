// The smoothed mass profile the emergent law's apparent dark mass is built from.
import { buildInitialConditions } from '../../shared/engine';
import { apparentDarkAcceleration, emergentScale } from '../../shared/engine/laws/emergent';
import { samplePlummerPositions } from '../../shared/engine/models/plummer';
import { radialProfile } from '../../shared/engine/radialProfile';
import { seedRng } from '../../shared/engine/rng';
import { allocateParticles } from '../../shared/engine/state';
import { specWith } from './helpers';

const M = 1e10, A = 1;
/** Plummer (1911): M(r) = M r^3 / (r^2 + a^2)^(3/2), so d(M r)/dr = M(r) + r dM/dr with dM/dr = 3 M a^2 r^2 / (r^2 + a^2)^(5/2). */
const plummerDMr = (r: number) => (M * r ** 3) / (r * r + A * A) ** 1.5 + r * ((3 * M * A * A * r * r) / (r * r + A * A) ** 2.5);

const plummer = (seed: number) =>
  buildInitialConditions(specWith({ model: { kind: 'plummer', n: 20_000, mass_Msun: M, scale_kpc: A }, seed })).particles;

describe('kernel-smoothed cumulative mass (biweight kernel in r^3, reflected at the centre)', () => {
  test('20,000-particle Plummer spheres: d(M r)/dr within 5% of the analytic one from 0.2 a outwards, averaged over 16 seeds to beat the sampling noise of the few particles there', () => {
    // 0.2 a encloses 0.7% of the mass: ~145 particles per sphere (8% Poisson noise each), ~2,300 in
    // the 16 together (2%). Further in, the particles themselves cannot pin M(r) down to 5%.
    // Only positions matter here, so they are drawn alone, about the origin.
    const positions = (seed: number) => {
      const out = allocateParticles(20_000);
      samplePlummerPositions({ mass_Msun: M, scale_kpc: A }, seedRng(seed), out, 0, 20_000);
      return out;
    };
    const radii = [0.2, 0.26, 0.5, 1, 2, 4].map((x) => x * A);
    const mean = radii.map(() => 0);
    const seeds = Array.from({ length: 16 }, (_, k) => k + 1);
    for (const seed of seeds) {
      const profile = radialProfile(positions(seed), 0, 0, 0);
      radii.forEach((r, k) => {
        mean[k] += (profile.enclosedMass(r) + r * profile.enclosedMassSlope(r)) / plummerDMr(r) / seeds.length;
      });
    }
    radii.forEach((_, k) => expect(Math.abs(mean[k] - 1)).toBeLessThan(0.05));
  });

  test('M(r) grows as r^3 at the centre and reaches the total mass, never overshooting', () => {
    const p = plummer(1);
    const profile = radialProfile(p, 0, 0, 0);
    const r1 = 0.01 * A;
    expect(profile.enclosedMass(r1 / 2) / profile.enclosedMass(r1)).toBeCloseTo(1 / 8, 2);
    expect(profile.enclosedMass(profile.outerRadius_kpc)).toBe(profile.total_Msun);
    expect(profile.enclosedMassSlope(profile.outerRadius_kpc * 1.01)).toBe(0);
    let last = 0;
    for (let x = 0.01; x < 100; x *= 1.05) {
      const m = profile.enclosedMass(x * A);
      expect(m).toBeGreaterThanOrEqual(last - 1e-6 * M);
      expect(m).toBeLessThanOrEqual(profile.total_Msun);
      last = m;
    }
  });

  test('the apparent-dark-mass pull has no steps: between radii 0.01% apart it changes by under 0.2% anywhere from 0.02 a to 20 a (a 5% step at a shell edge would fail)', () => {
    const p = plummer(2);
    const profile = radialProfile(p, 0, 0, 0);
    const aM = emergentScale({ kind: 'emergent', H0_km_s_Mpc: 70 });
    const g = (r: number) => apparentDarkAcceleration(aM, profile.enclosedMass(r), profile.enclosedMassSlope(r), r);
    let worst = 0;
    for (let r = 0.02 * A; r < 20 * A; r *= 1.0001) worst = Math.max(worst, Math.abs(g(r * 1.0001) / g(r) - 1));
    expect(worst).toBeLessThan(2e-3);
  });
});
