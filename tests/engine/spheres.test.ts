import { buildInitialConditions } from '../../shared/engine';
import { lagrangianRadii } from '../../shared/engine/diagnostics';
import { newtonKernel } from '../../shared/engine/laws/newton';
import { directPotentialRange } from '../../shared/engine/solvers';
import type { ParticleState } from '../../shared/engine/state';
import { G } from '../../shared/engine/units';
import { specWith } from './helpers';

const M = 1e10, A = 1.5;
// Pair sums use 4000 particles (quick); radii, which cost nothing, use 20000.
const N_PAIRS = 4000, N_RADII = 20_000;

/** Unsoftened W = 1/2 sum m_i phi_i, straight from the pair sum. */
function potentialEnergy(p: ParticleState): number {
  const pot = new Float64Array(p.n);
  directPotentialRange(p, p, newtonKernel(0), 0, p.n, pot);
  let w = 0;
  for (let i = 0; i < p.n; i++) w += 0.5 * p.m[i] * pot[i];
  return w;
}

function kineticEnergy(p: ParticleState): number {
  let k = 0;
  for (let i = 0; i < p.n; i++) k += 0.5 * p.m[i] * (p.vx[i] ** 2 + p.vy[i] ** 2 + p.vz[i] ** 2);
  return k;
}

const sphere = (kind: 'plummer' | 'hernquist', n: number, extra: Record<string, unknown> = {}) =>
  buildInitialConditions(specWith({ model: { kind, n, mass_Msun: M, scale_kpc: A, ...extra }, seed: 11 })).particles;

// Tolerance 5% throughout: about three times the sampling noise of these sizes
// (the Hernquist half-mass radius is the noisiest, ~1.7% at 20000 particles).
describe('Plummer sphere (radii as Aarseth, Henon & Wielen 1974; speeds from the isotropic distribution function in the softened field)', () => {
  const p = sphere('plummer', N_PAIRS);

  test('W = -(3 pi / 32) G M^2 / a (Binney & Tremaine 2008, Plummer model; from memory), within 5%', () => {
    expect(Math.abs(potentialEnergy(p) / ((-3 * Math.PI * G * M * M) / (32 * A)) - 1)).toBeLessThan(0.05);
  });

  test('half-mass radius is (2^(2/3) - 1)^(-1/2) a = 1.305 a, within 5%', () => {
    const [r50] = lagrangianRadii(sphere('plummer', N_RADII), [0.5]);
    expect(Math.abs(r50 / (1.305 * A) - 1)).toBeLessThan(0.05);
  });

  test('the sampled sphere is in virial equilibrium: 2K / |W| = 1 within 5%', () => {
    expect(Math.abs((2 * kineticEnergy(p)) / Math.abs(potentialEnergy(p)) - 1)).toBeLessThan(0.05);
  });
});

describe('Hernquist (1990) sphere (speeds from the isotropic distribution function by Eddington\'s formula)', () => {
  // A wide cut (1000 a, 99.8% of the mass) so the untruncated formulas apply.
  // Twice the particles: the cusp makes K and W of a Hernquist sample noisier than a Plummer one's.
  const p = sphere('hernquist', 2 * N_PAIRS, { truncationRadius_kpc: 1000 * A });

  test('W = -G M^2 / (6 a) (Hernquist 1990, eq. 14), within 5%', () => {
    expect(Math.abs(potentialEnergy(p) / ((-G * M * M) / (6 * A)) - 1)).toBeLessThan(0.05);
  });

  test('half-mass radius is (1 + sqrt 2) a (Hernquist 1990), within 5%', () => {
    const [r50] = lagrangianRadii(sphere('hernquist', N_RADII, { truncationRadius_kpc: 1000 * A }), [0.5]);
    expect(Math.abs(r50 / ((1 + Math.SQRT2) * A) - 1)).toBeLessThan(0.05);
  });

  test('speeds drawn from the distribution function give 2K / |W| = 1 within 5% (softening a/30 shifts it by under 0.2%)', () => {
    expect(Math.abs((2 * kineticEnergy(p)) / Math.abs(potentialEnergy(p)) - 1)).toBeLessThan(0.05);
  });
});
