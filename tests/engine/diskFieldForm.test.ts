import { Simulation } from '../../shared/engine/simulation';
import { centreOfMass } from '../../shared/engine/state';
import { modelAcceleration } from '../../shared/engine/laws/registry';
import { buildInitialConditions } from '../../shared/engine';
import { myrToInternal } from '../../shared/engine/units';
import { forceCurve, specWith } from './helpers';

// The disk of tests/engine/equilibrium.test.ts (5,000 particles, bulge, Q = 2), under field-form MOND.
const RD = 3;
const spec = specWith({
  model: { kind: 'disk', n: 5000, mass_Msun: 3e10, scaleLength_kpc: RD, scaleHeight_kpc: 0.5, toomreQ: 2, bulge: { mass_Msun: 1e10, scale_kpc: 0.6 } },
  law: { kind: 'qumond', grid: 64 },
  solver: { kind: 'tree', theta: 0.6 },
  softening_kpc: 0.4,
  timestep_Myr: 4,
  seed: 1,
});


// The field form's pull in a disk's plane is not the algebraic curve (they agree in spherical
// symmetry only): resolved (grid 128 in a 40 kpc box) it is 2-3% below it from 0.5 to 2 R_d and
// 1% above at 5 R_d; at grid 64 in the default box, 1.2 kpc a cell, within 2% of it (measured).
// Balanced in its own field, velocities drawn from the disk's distribution function
// (models/diskDF.ts), the disk keeps its force-measured curve within 5% over a period: measured
// worst 1.7% (3 R_d; 3.0% from the analytic curve). The Gaussian moment set-up of spec version 2
// missed it (5.2% at 3 R_d, 5.3% resolved as above: the set-up, not the grid). Its Lagrangian
// radii move less than they did (over 800 Myr: 10% radius +4%, 90% radius +12%; version 2: -9% and
// +16%). The field having a potential and its net force removed, the system does not push itself:
// its centre of mass stays put (measured 0.013 kpc), where the algebraic form's runs 2.3 kpc
// (tests/engine/diskLaws.test.ts). One rotation period at 5 R_d.
test('a disk under field-form MOND, balanced in the law\'s own field, keeps its force-measured curve within 5% over one outer period and its centre of mass in place', () => {
  const radii = [0.5, 0.75, 1, 1.5, 2, 2.5, 3, 4, 5].map((x) => x * RD);
  const model = buildInitialConditions(spec).massModel;
  const vOuter = Math.sqrt(radii[8] * modelAcceleration(spec.law, model, radii[8]));
  const period = (2 * Math.PI * radii[8]) / vOuter / myrToInternal(1);
  const sim = new Simulation({ ...spec, duration_Myr: period, snapshotEvery: 1000 });
  const before = forceCurve(sim, radii), centre = centreOfMass(sim.particles);
  while (!sim.done) sim.advance();
  forceCurve(sim, radii).forEach((v, k) => expect(Math.abs(v / before[k] - 1)).toBeLessThan(0.05));
  const after = centreOfMass(sim.particles);
  expect(Math.hypot(after.x - centre.x, after.y - centre.y, after.z - centre.z)).toBeLessThan(0.05);
}, 600_000);
