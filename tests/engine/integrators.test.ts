import { Simulation } from '../../shared/engine';
import { keplerOrbitSpec } from './helpers';

const M1 = 2e10, M2 = 1e10, A = 1, E = 0.5;

function energy(sim: Simulation): number {
  const p = sim.particles;
  let k = 0;
  for (let i = 0; i < p.n; i++) k += 0.5 * p.m[i] * (p.vx[i] ** 2 + p.vy[i] ** 2 + p.vz[i] ** 2);
  return k + sim.law.potentialEnergy!(p);
}

/** |dE/E| after each step of a Kepler orbit (softening 0, so the exact energy is conserved). */
function energyErrors(integrator: string, stepsPerPeriod: number, periods: number): number[] {
  const sim = new Simulation(keplerOrbitSpec({ m1: M1, m2: M2, a: A, e: E, integrator, stepsPerPeriod, periods }).spec);
  const e0 = energy(sim);
  const errors: number[] = [];
  while (!sim.done) {
    sim.advance();
    errors.push(Math.abs(energy(sim) / e0 - 1));
  }
  return errors;
}

const maxOf = (xs: number[]) => xs.reduce((a, b) => Math.max(a, b), 0);

describe('integrators on a Kepler orbit (e = 0.5)', () => {
  test('leapfrog is second order: halving dt divides the largest energy error over a period by 4 (Hairer, Lubich & Wanner 2006; accepted 3.5-4.5)', () => {
    const ratio = maxOf(energyErrors('leapfrog', 1000, 1)) / maxOf(energyErrors('leapfrog', 2000, 1));
    expect(ratio).toBeGreaterThan(3.5);
    expect(ratio).toBeLessThan(4.5);
  });

  test("Yoshida's composition is fourth order: halving dt divides the error by 16 (Yoshida 1990; accepted 12-20)", () => {
    const ratio = maxOf(energyErrors('yoshida4', 400, 1)) / maxOf(energyErrors('yoshida4', 800, 1));
    expect(ratio).toBeGreaterThan(12);
    expect(ratio).toBeLessThan(20);
  });

  test('RK4 is fourth order too (accepted 12-20), but not symplectic', () => {
    const ratio = maxOf(energyErrors('rk4', 400, 1)) / maxOf(energyErrors('rk4', 800, 1));
    expect(ratio).toBeGreaterThan(12);
    expect(ratio).toBeLessThan(20);
  });

  test("leapfrog's energy error stays bounded over 30 orbits while RK4's grows steadily (symplectic vs not; our thresholds 1.5x and 5x)", () => {
    const steps = 200;
    const lf = energyErrors('leapfrog', steps, 30);
    const rk = energyErrors('rk4', steps, 30);
    const early = (xs: number[]) => maxOf(xs.slice(0, 3 * steps));
    const late = (xs: number[]) => maxOf(xs.slice(27 * steps));
    expect(late(lf) / early(lf)).toBeLessThan(1.5);
    expect(late(rk) / early(rk)).toBeGreaterThan(5);
  });
});
