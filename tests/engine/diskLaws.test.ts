import { buildInitialConditions } from '../../shared/engine';
import { modelAcceleration } from '../../shared/engine/laws/registry';
import { Simulation } from '../../shared/engine/simulation';
import { centreOfMass } from '../../shared/engine/state';
import { myrToInternal } from '../../shared/engine/units';
import type { RunSpec } from '../../shared/spec';
import { forceCurve, specWith } from './helpers';

// Disks with a bulge balanced for a law other than plain Newton, measured as in
// tests/engine/equilibrium.test.ts: the same thick Q = 2 disk of 5,000 particles, tree solver,
// the law's force-measured midplane curve against the analytic curve of the model, at t = 0
// and after one rotation period at 5 R_d. Tolerance 5% (the requirement); the algebraic MOND
// form alone does not hold it (it pushes itself, below).
const RD = 3;
const RADII = [0.5, 0.75, 1, 1.5, 2, 2.5, 3, 4, 5];

const diskSpec = (law: Record<string, unknown>, extra: Record<string, unknown> = {}) =>
  specWith({
    model: { kind: 'disk', n: 5000, mass_Msun: 3e10, scaleLength_kpc: RD, scaleHeight_kpc: 0.5, toomreQ: 2, bulge: { mass_Msun: 1e10, scale_kpc: 0.6 }, ...extra },
    law,
    solver: { kind: 'tree', theta: 0.6 },
    softening_kpc: 0.4,
    timestep_Myr: 4,
    seed: 1,
  });

/** Ratios of the force-measured curve to the analytic one at t = 0 and, unless `startOnly`, after one outer period; and the simulation at its end. */
function overOnePeriod(probe: RunSpec, startOnly = false) {
  const model = buildInitialConditions(probe).massModel;
  const radii = RADII.map((x) => x * RD);
  const analytic = radii.map((R) => Math.sqrt(R * modelAcceleration(probe.law, model, R)));
  const period = (2 * Math.PI * radii[radii.length - 1]) / analytic[analytic.length - 1] / myrToInternal(1);
  const sim = new Simulation({ ...probe, duration_Myr: period, snapshotEvery: 1000 });
  const start = forceCurve(sim, radii).map((v, k) => v / analytic[k]);
  if (startOnly) return { start, end: [], sim };
  while (!sim.done) sim.advance();
  const end = forceCurve(sim, radii).map((v, k) => v / analytic[k]);
  return { start, end, sim };
}

test('a disk with bulge and a gas disk of its own (a fifth of the baryons, twice the scale length) under Newton + NFW halo keeps its curve within 5% over one outer period', () => {
  // Measured worst 3.4% (0.5 R_d, after the period; 3.3% with the version-2 moment set-up).
  const { start, end } = overOnePeriod(diskSpec({ kind: 'halo', profile: 'nfw', scale_kpc: 10, density_Msun_kpc3: 1e7 }, { gas: { mass_Msun: 1e10, scaleLength_kpc: 2 * RD, scaleHeight_kpc: 0.25 } }));
  for (const q of [...start, ...end]) expect(Math.abs(q - 1)).toBeLessThan(0.05);
}, 300_000);

test('emergent gravity: balanced for the particles\' own spherically averaged profile, with a step that resolves the core\'s orbits, the disk keeps its curve within 5% from 0.5 to 5 R_d over one outer period', () => {
  // The apparent dark mass pulls towards a cusp's centre with a strength that does not fall to
  // zero there (d(M r)/dr grows as r^2 for rho ~ 1/r, so g_D = sqrt(G a_M d(M r)/dr) / r stays
  // finite; Verlinde 2016 as in the law), unlike the softened Newtonian pull: in this model's
  // field a bulge orbit at 0.1 kpc takes 10 Myr against 24 Myr under Newton (computed from the
  // model). At the 4 Myr step of the other disks each step across the centre is a kick of about
  // 150 km/s, which heated the bulge (its 10% radius about the density centre 0.27 -> 0.55 kpc,
  // 0.31 under Newton) and dropped the curve 11% at 0.5 R_d; a lone 1,250-particle bulge does
  // the same at 4 Myr and holds at 1 Myr (measured). 1 Myr gives the core's orbits the steps per
  // period the Newtonian core gets at 4 Myr. Measured worst 1.8% (at 0.75 R_d after the period;
  // 1.9% with the version-2 moment set-up).
  const { start, end } = overOnePeriod({ ...diskSpec({ kind: 'emergent' }), timestep_Myr: 1 });
  for (const q of [...start, ...end]) expect(Math.abs(q - 1)).toBeLessThan(0.05);
}, 300_000);

test('algebraic MOND: the disk starts balanced, and what moves it is the form itself, which pushes the disk as a whole (no momentum conservation; the field form qumond is the one for disks)', () => {
  // nu is applied particle by particle, so the pulls between particles are not equal and
  // opposite: the disk's centre of mass runs off (measured 2.3 kpc within the period). Its curve,
  // measured about that moving centre, kept within 5% from the distribution-function set-up
  // (worst 4.7% at 3 R_d), as it did not from version 2's moments (8.9%), but its Lagrangian radii
  // do not hold (10% radius +41%, 90% radius +31% over 800 Myr), so only the start is checked. The
  // same disk under qumond keeps its centre within 0.02 kpc and its curve within 5%
  // (tests/engine/diskFieldForm.test.ts).
  const { start, sim } = overOnePeriod(diskSpec({ kind: 'mond' }));
  for (const q of start) expect(Math.abs(q - 1)).toBeLessThan(0.05);
  const c = centreOfMass(sim.particles);
  expect(Math.hypot(c.x, c.y, c.z)).toBeGreaterThan(0.5);
}, 300_000);

test('Yukawa: with Toomre\'s Q taken with the short-range coupling G (1 + alpha), a 20,000-particle disk at a 2 Myr step keeps its curve within 5% from 0.5 to 5 R_d over one outer period', () => {
  // alpha = 0.3 strengthens the pull at separations below lambda by 1.3, so Q = 2 with Newton's G
  // was the margin of a Newtonian disk of Q = 1.54: the disk barred (m = 2 amplitude 0.39 between
  // 1 and 3 R_d) and its curve fell 12.5% at 4 R_d within the period (version-2 moment set-up,
  // measured). With the coupling the disk is 1.3 times hotter in sigma_R and is drawn from its
  // distribution function (models/diskDF.ts).
  // Why 20,000 particles and 2 Myr, not the 5,000 and 4 Myr of the other disks (all measured, JS tree):
  // - The step. The bulge's central orbits (about 19 Myr under Newton inside the softening, from
  //   its profile) are 1.14 times faster under the coupling. The bulge alone (1,250 particles, 800 Myr)
  //   grows its half-mass radius 19% at 4 Myr under Yukawa, 8% under Newton, 3.6% at 2 Myr.
  // - The particle number. At 5,000 particles the disk spreads and thickens by particle noise under
  //   every law: Newton at a 1 Myr step gives 3.3-5.6% over seeds 1-4 (10% disk radius 1.6 -> 1.4
  //   kpc, 90% radius 11.7 -> 13.4 kpc), and 1.3-1.4% at 20,000 (seeds 1, 4). Under Yukawa's
  //   stronger coupling the same noise gave 4.5-8.1% over seeds 1-6 at 5,000 particles and 4 Myr.
  // At 20,000 particles and 2 Myr seeds 1-4 give 2.1%, 1.8%, 3.0% and 1.8%, with the JS and the WebAssembly tree alike.
  const { start, end } = overOnePeriod({ ...diskSpec({ kind: 'yukawa', alpha: 0.3, lambda_kpc: RD }, { n: 20000 }), timestep_Myr: 2 });
  for (const q of [...start, ...end]) expect(Math.abs(q - 1)).toBeLessThan(0.05);
}, 300_000);
