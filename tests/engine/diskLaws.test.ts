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
// and after one rotation period at 5 R_d. Tolerance 5% (the requirement) where it holds.
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

/** Ratios of the force-measured curve to the analytic one at t = 0 and after one outer period, and the simulation at its end. */
function overOnePeriod(probe: RunSpec) {
  const model = buildInitialConditions(probe).massModel;
  const radii = RADII.map((x) => x * RD);
  const analytic = radii.map((R) => Math.sqrt(R * modelAcceleration(probe.law, model, R)));
  const period = (2 * Math.PI * radii[radii.length - 1]) / analytic[analytic.length - 1] / myrToInternal(1);
  const sim = new Simulation({ ...probe, duration_Myr: period, snapshotEvery: 1000 });
  const start = forceCurve(sim, radii).map((v, k) => v / analytic[k]);
  while (!sim.done) sim.advance();
  const end = forceCurve(sim, radii).map((v, k) => v / analytic[k]);
  return { start, end, sim };
}

test('a disk with bulge and a gas disk of its own (a fifth of the baryons, twice the scale length) under Newton + NFW halo keeps its curve within 5% over one outer period', () => {
  // Measured worst 3.3% (0.5 R_d, after the period); the same disk under plain Newton 4.9% (3 R_d).
  const { start, end } = overOnePeriod(diskSpec({ kind: 'halo', profile: 'nfw', scale_kpc: 10, density_Msun_kpc3: 1e7 }, { gas: { mass_Msun: 1e10, scaleLength_kpc: 2 * RD, scaleHeight_kpc: 0.25 } }));
  for (const q of [...start, ...end]) expect(Math.abs(q - 1)).toBeLessThan(0.05);
}, 300_000);

test('emergent gravity: balanced for the particles\' own spherically averaged profile, the disk keeps its curve within 5% from 1 to 5 R_d over one outer period', () => {
  // Measured worst 2.3% (R_d) from 1 to 5 R_d. Inside R_d it does not hold: 5.2% at 0.75 R_d,
  // 11% at 0.5 R_d, where the Hernquist bulge's core expands under this law (a lone Hernquist
  // sphere does too: README "Not covered"). Balanced for the analytic profile instead, the
  // same disk fell 26% at 0.5 R_d and 4.3% at R_d.
  const { start, end } = overOnePeriod(diskSpec({ kind: 'emergent' }));
  for (const q of start) expect(Math.abs(q - 1)).toBeLessThan(0.05);
  end.forEach((q, k) => RADII[k] >= 1 && expect(Math.abs(q - 1)).toBeLessThan(0.05));
}, 300_000);

test('algebraic MOND: the disk starts balanced, and what moves it is the form itself, which pushes the disk as a whole (no momentum conservation; the field form qumond is the one for disks)', () => {
  // nu is applied particle by particle, so the pulls between particles are not equal and
  // opposite: the disk's centre of mass runs off (measured 2.0 kpc within the period), and its
  // curve leaves the 5% band (8.9% at 3 R_d). The same disk under qumond keeps its centre within
  // 0.01 kpc and its curve within 6% (tests/engine/diskFieldForm.test.ts).
  const { start, sim } = overOnePeriod(diskSpec({ kind: 'mond' }));
  for (const q of start) expect(Math.abs(q - 1)).toBeLessThan(0.05);
  const c = centreOfMass(sim.particles);
  expect(Math.hypot(c.x, c.y, c.z)).toBeGreaterThan(0.5);
}, 300_000);
