// Diagnostics that mean what they say under every law.
import { buildInitialConditions, Simulation } from '../../shared/engine';
import { sampleDiagnostics, type DriftReference } from '../../shared/engine/diagnostics';
import { createLaw } from '../../shared/engine/laws/registry';
import type { ForceLaw } from '../../shared/engine/laws/types';
import { directSolver } from '../../shared/engine/solvers/direct';
import { totalMass } from '../../shared/engine/state';
import type { LawSpec } from '../../shared/spec';
import { specWith } from './helpers';

const cored: LawSpec = { kind: 'halo', profile: 'cored-isothermal', scale_kpc: 3, density_Msun_kpc3: 5e7 };

/** The same law with its external potential moved by `shift` (km/s)^2 everywhere: the same forces, another zero point. */
function shifted(law: ForceLaw, shift: number): ForceLaw {
  return {
    info: law.info,
    accelerations: (s, t, out) => law.accelerations(s, t, out),
    potentialEnergy: (s) => law.potentialEnergy!(s) + shift * totalMass(s.m),
    externalPotentialEnergy: (s) => law.externalPotentialEnergy!(s) + shift * totalMass(s.m),
  };
}

describe('energy drift', () => {
  test("a rigid halo's potential zero point changes nothing: shifting it by 1e6 (km/s)^2 leaves every drift equal (to 1e-9 absolute)", () => {
    const spec = specWith({ model: { kind: 'plummer', n: 200, mass_Msun: 1e10, scale_kpc: 1 }, law: cored, timestep_Myr: 1, duration_Myr: 40, softening_kpc: 0.1 });
    const sim = new Simulation(spec);
    const moved = shifted(sim.law, 1e6);
    let refA: DriftReference | null = null, refB: DriftReference | null = null;
    let checked = 0;
    while (true) {
      const a = sampleDiagnostics(sim.particles, sim.law, sim.state.step, sim.time_Myr, refA, null);
      const b = sampleDiagnostics(sim.particles, moved, sim.state.step, sim.time_Myr, refB, null);
      refA = a.reference; refB = b.reference;
      expect(Math.abs(a.sample.energyDrift! - b.sample.energyDrift!)).toBeLessThan(1e-9);
      checked++;
      if (sim.done) break;
      for (let k = 0; k < 10 && !sim.done; k++) sim.advance();
    }
    expect(checked).toBeGreaterThan(3);
    // |E0| moves with the zero point (so a drift scaled by it would too); K0 + |W_self| does not.
    expect(Math.abs(refB!.energy! - refA!.energy! - 1e6 * 1e10) / 1e16).toBeLessThan(1e-9);
    expect(Math.abs(refA!.energyScale! / refB!.energyScale! - 1)).toBeLessThan(1e-12);
  });

  test('the scale is K0 + |W_self| at t = 0, the particles\' own energy without the halo term', () => {
    const spec = specWith({ model: { kind: 'plummer', n: 200, mass_Msun: 1e10, scale_kpc: 1 }, law: cored, softening_kpc: 0.1 });
    const p = buildInitialConditions(spec).particles;
    const newton = createLaw({ kind: 'newton' }, { solver: directSolver, softening_kpc: 0.1 });
    const halo = createLaw(cored, { solver: directSolver, softening_kpc: 0.1 });
    let K = 0;
    for (let i = 0; i < p.n; i++) K += 0.5 * p.m[i] * (p.vx[i] ** 2 + p.vy[i] ** 2 + p.vz[i] ** 2);
    const { reference } = sampleDiagnostics(p, halo, 0, 0, null, null);
    expect(reference.energyScale! / (K + Math.abs(newton.potentialEnergy!(p))) - 1).toBeCloseTo(0, 12);
  });
});

describe('virial ratios', () => {
  const sphere = (law: LawSpec) => new Simulation(specWith({ model: { kind: 'plummer', n: 2000, mass_Msun: 1e10, scale_kpc: 1 }, law, softening_kpc: 0.02, seed: 4 }));

  test('2K/|W| is reported only under softened Newton, where it is 1 in equilibrium (virial theorem; within 5%, sampling noise ~2%)', () => {
    const sim = sphere({ kind: 'newton' });
    const { sample } = sampleDiagnostics(sim.particles, sim.law, 0, 0, null, null);
    expect(Math.abs(sample.virialRatio! - 1)).toBeLessThan(0.05);
    for (const law of [cored, { kind: 'yukawa', alpha: 0.5, lambda_kpc: 2 }, { kind: 'mond' }, { kind: 'emergent' }] as LawSpec[]) {
      const s = sphere(law);
      expect(sampleDiagnostics(s.particles, s.law, 0, 0, null, null).sample.virialRatio).toBeNull();
    }
  });

  test('the Clausius ratio 2K/|sum m r.a| of a Newtonian equilibrium sphere is 1 (Clausius virial theorem; within 5%) and ignores a bulk motion', () => {
    const sim = sphere({ kind: 'newton' });
    const p = sim.particles;
    const at = sampleDiagnostics(p, sim.law, 0, 0, null, null).sample.clausiusVirialRatio;
    expect(Math.abs(at - 1)).toBeLessThan(0.05);
    for (let i = 0; i < p.n; i++) p.vx[i] += 300; // the whole sphere moving: its internal state is the same
    const moving = sampleDiagnostics(p, sim.law, 0, 0, null, null).sample;
    expect(moving.clausiusVirialRatio).toBeCloseTo(at, 9);
    expect(moving.centreOfMassVelocity.x).toBeCloseTo(300, 9);
  });
});
