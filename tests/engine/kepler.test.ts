import { Simulation } from '../../shared/engine';
import { G, myrToInternal } from '../../shared/engine/units';
import { keplerOrbitSpec } from './helpers';

// odex ships TypeScript sources that fail strict checking, so it is loaded untyped behind the little we use.
interface OdexSolver {
  absoluteTolerance: number;
  relativeTolerance: number;
  solve(f: (x: number, y: number[]) => number[], x0: number, y0: number[], x1: number): { y: number[] };
}
const { Solver } = require('odex') as { Solver: new (dimension: number) => OdexSolver };

const M1 = 3e10, M2 = 1e10, A = 2, E = 0.5;

const keplerSpec = (a: number, stepsPerPeriod: number, periods: number, integrator = 'yoshida4') =>
  keplerOrbitSpec({ m1: M1, m2: M2, a, e: E, integrator, stepsPerPeriod, periods });

const relative = (s: Simulation) => {
  const p = s.particles;
  return { x: p.x[1] - p.x[0], y: p.y[1] - p.y[0], vx: p.vx[1] - p.vx[0], vy: p.vy[1] - p.vy[0] };
};

/** Time of the first return to pericentre: the step where the radial velocity turns from negative to positive. */
function measuredPeriodMyr(a: number): number {
  const { spec } = keplerSpec(a, 4000, 1.2);
  const sim = new Simulation(spec);
  let prev = 0;
  while (!sim.done) {
    sim.advance();
    const r = relative(sim);
    const vr = r.x * r.vx + r.y * r.vy;
    if (prev < 0 && vr >= 0) {
      // Linear interpolation of v_r's zero within the last step.
      return sim.time_Myr - spec.timestep_Myr * (vr / (vr - prev));
    }
    prev = vr;
  }
  throw new Error('no return to pericentre');
}

describe('Kepler pair', () => {
  test("Kepler's third law: the measured period scales as a^(3/2) and equals 2 pi sqrt(a^3 / G M) (tolerance 1e-4 relative)", () => {
    const P1 = measuredPeriodMyr(A);
    const P2 = measuredPeriodMyr(4 * A);
    expect(Math.abs(P2 / P1 / 8 - 1)).toBeLessThan(1e-4);
    expect(Math.abs(P1 / keplerSpec(A, 1, 1).P_Myr - 1)).toBeLessThan(1e-4);
  });

  test('the orbit returns to its starting point after one period (|dr| / a below 1e-6 with the fourth-order scheme, 2000 steps)', () => {
    const { spec } = keplerSpec(A, 2000, 1);
    const sim = new Simulation(spec);
    const start = relative(sim);
    while (!sim.done) sim.advance();
    const end = relative(sim);
    expect(Math.hypot(end.x - start.x, end.y - start.y) / A).toBeLessThan(1e-6);
  });

  test('the orbit agrees with an independent ODE solver (odex, Gragg-Bulirsch-Stoer) at ten times over two periods (|dr| / a below 1e-5)', () => {
    const { spec, P_Myr } = keplerSpec(A, 4000, 2);
    const sim = new Simulation(spec);
    const r0 = relative(sim);
    const GM = G * (M1 + M2);
    const solver = new Solver(4);
    solver.absoluteTolerance = solver.relativeTolerance = 1e-12;
    const rhs = (_t: number, y: number[]) => {
      const r3 = Math.hypot(y[0], y[1]) ** 3;
      return [y[2], y[3], (-GM * y[0]) / r3, (-GM * y[1]) / r3];
    };
    const checkEvery = 800;
    let worst = 0;
    while (!sim.done) {
      sim.advance();
      if (sim.state.step % checkEvery !== 0) continue;
      const t = myrToInternal(sim.time_Myr);
      const ref = solver.solve(rhs, 0, [r0.x, r0.y, r0.vx, r0.vy], t).y;
      const now = relative(sim);
      worst = Math.max(worst, Math.hypot(now.x - ref[0], now.y - ref[1]) / A);
    }
    expect(sim.time_Myr).toBeCloseTo(2 * P_Myr, 6);
    expect(worst).toBeLessThan(1e-5);
  });

  test('a pair starts at pericentre r_p = a (1 - e) in the centre-of-mass frame', () => {
    const sim = new Simulation(keplerSpec(A, 100, 1).spec);
    const p = sim.particles;
    expect(Math.abs(relative(sim).x) / (A * (1 - E)) - 1).toBeCloseTo(0, 12);
    expect(Math.abs(p.m[0] * p.x[0] + p.m[1] * p.x[1])).toBeLessThan(1e-9);
  });
});
