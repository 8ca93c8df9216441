// No self-acceleration: an isolated system keeps its total momentum under every
// law offered for N-body work; a rigid halo changes it only by its own pull.
import { runSimulation, Simulation } from '../../shared/engine';
import { densityCentre } from '../../shared/engine/centre';
import { apparentDarkAcceleration, emergentScale } from '../../shared/engine/laws/emergent';
import { haloAcceleration } from '../../shared/engine/laws/halo';
import { radialProfile } from '../../shared/engine/radialProfile';
import type { ParticleState } from '../../shared/engine/state';
import { myrToInternal } from '../../shared/engine/units';
import type { LawSpec } from '../../shared/spec';
import { specWith } from './helpers';

// A lopsided start: a Plummer sphere and a smaller one falling onto it, so no symmetry hides a net force.
const encounter = {
  kind: 'encounter',
  primary: { kind: 'plummer', n: 300, mass_Msun: 2e10, scale_kpc: 1 },
  secondary: { kind: 'plummer', n: 100, mass_Msun: 5e9, scale_kpc: 0.5 },
  pericentre_kpc: 3,
  initialSeparation_kpc: 15,
};
const common = { model: encounter, solver: { kind: 'direct' }, softening_kpc: 0.1, timestep_Myr: 0.5, duration_Myr: 100, snapshotEvery: 50 };

function momentumAndScale(p: ParticleState) {
  let px = 0, py = 0, pz = 0, scale = 0;
  for (let i = 0; i < p.n; i++) {
    px += p.m[i] * p.vx[i]; py += p.m[i] * p.vy[i]; pz += p.m[i] * p.vz[i];
    scale += p.m[i] * Math.hypot(p.vx[i], p.vy[i], p.vz[i]);
  }
  return { px, py, pz, scale };
}

describe('total momentum of an isolated system (to 1e-6 of the sum of m|v|, our tolerance: rounding alone gives ~1e-13)', () => {
  const laws: LawSpec[] = [
    { kind: 'newton' },
    { kind: 'yukawa', alpha: 0.5, lambda_kpc: 3 },
    { kind: 'emergent', H0_km_s_Mpc: 70 },
  ];
  test.each(laws)('$kind: 200 steps of a lopsided encounter', (law) => {
    const r = runSimulation(specWith({ ...common, law }));
    const worst = Math.max(...r.diagnostics.map((d) => d.momentumDrift));
    expect(worst).toBeLessThan(1e-6);
    expect(r.summary.quantities.momentum).toBe('conserved');
    // The centre-of-mass series shows the same: its velocity stays at its start value (zero).
    const last = r.diagnostics[r.diagnostics.length - 1];
    expect(Math.hypot(last.centreOfMassVelocity.x, last.centreOfMassVelocity.y, last.centreOfMassVelocity.z)).toBeLessThan(1e-6);
  });

  test('emergent: the balance is not idle. Unbalanced, the apparent dark mass would pull this start by more than 0.1% of the sum of its |m a_D|', () => {
    const sim = new Simulation(specWith({ ...common, law: { kind: 'emergent', H0_km_s_Mpc: 70 } }));
    const p = sim.particles;
    const c = densityCentre(p);
    const profile = radialProfile(p, c.x, c.y, c.z);
    const aM = emergentScale({ kind: 'emergent', H0_km_s_Mpc: 70 });
    let fx = 0, fy = 0, fz = 0, total = 0;
    for (let i = 0; i < p.n; i++) {
      const dx = p.x[i] - c.x, dy = p.y[i] - c.y, dz = p.z[i] - c.z;
      const r = Math.hypot(dx, dy, dz);
      const g = apparentDarkAcceleration(aM, profile.enclosedMass(r), profile.enclosedMassSlope(r), r);
      fx -= (p.m[i] * g * dx) / r; fy -= (p.m[i] * g * dy) / r; fz -= (p.m[i] * g * dz) / r;
      total += p.m[i] * g;
    }
    expect(Math.hypot(fx, fy, fz) / total).toBeGreaterThan(1e-3);
    // With the balance, the law's accelerations (held in the state) sum to zero to rounding: float32's
    // in the Newtonian part's WebAssembly pair terms (measured 1.1e-9), five decades below the 1e-3 unbalanced.
    let sx = 0, sy = 0, sz = 0, all = 0;
    for (let i = 0; i < p.n; i++) {
      sx += p.m[i] * p.ax[i]; sy += p.m[i] * p.ay[i]; sz += p.m[i] * p.az[i];
      all += p.m[i] * Math.hypot(p.ax[i], p.ay[i], p.az[i]);
    }
    expect(Math.hypot(sx, sy, sz) / all).toBeLessThan(1e-8);
  });
});

describe('a rigid halo is an external field', () => {
  test('momentum changes by exactly the impulse of the halo pull, trapezoid over each kick-drift-kick step (to 1e-6 of the sum of m|v|)', () => {
    const halo = { kind: 'halo' as const, profile: 'nfw' as const, scale_kpc: 10, density_Msun_kpc3: 1e7 };
    const spec = specWith({ ...common, law: halo, duration_Myr: 50 });
    const sim = new Simulation(spec);
    const dt = myrToInternal(spec.timestep_Myr);
    const pull = (p: ParticleState) => {
      let fx = 0, fy = 0, fz = 0;
      for (let i = 0; i < p.n; i++) {
        const r = Math.hypot(p.x[i], p.y[i], p.z[i]);
        const g = haloAcceleration(halo, r) / r;
        fx -= p.m[i] * g * p.x[i]; fy -= p.m[i] * g * p.y[i]; fz -= p.m[i] * g * p.z[i];
      }
      return [fx, fy, fz];
    };
    const start = momentumAndScale(sim.particles);
    const impulse = [0, 0, 0];
    let before = pull(sim.particles);
    while (!sim.done) {
      sim.advance();
      const after = pull(sim.particles);
      for (let k = 0; k < 3; k++) impulse[k] += 0.5 * dt * (before[k] + after[k]);
      before = after;
    }
    const end = momentumAndScale(sim.particles);
    const change = [end.px - start.px, end.py - start.py, end.pz - start.pz];
    // The halo really does move the system's momentum (else this test would prove nothing)...
    expect(Math.hypot(...change) / start.scale).toBeGreaterThan(1e-4);
    // ...and by its own pull only: the particles' forces on each other still cancel.
    expect(Math.hypot(change[0] - impulse[0], change[1] - impulse[1], change[2] - impulse[2]) / start.scale).toBeLessThan(1e-6);
  });
});
