import { Simulation } from '../../shared/engine/simulation';
import { lagrangianRadii } from '../../shared/engine/diagnostics';
import { modelAcceleration } from '../../shared/engine/laws/registry';
import { buildInitialConditions } from '../../shared/engine';
import { myrToInternal } from '../../shared/engine/units';
import { diskParticleSplit } from '../../shared/engine/models/disk';
import type { DiskSpec } from '../../shared/spec';
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
// symmetry only): here it starts 8.6% below it at 0.5 R_d (measured). Balanced for the algebraic
// curve, the disk's curve fell by a further 7% at 1-1.5 R_d within the period; balanced in its
// own field it stays within 5% (the requirement for disks; measured worst 4.5% at 0.5 R_d, where
// the grid's cell is 1.2 kpc) and so do the 10/50/90% radii of the disk particles (their
// cylindrical ones measured within 4%). One rotation period at 5 R_d.
test('a disk under field-form MOND, balanced in the law\'s own field, keeps its force-measured curve and its radii within 5% over one outer period', () => {
  const radii = [0.5, 0.75, 1, 1.5, 2, 2.5, 3, 4, 5].map((x) => x * RD);
  const model = buildInitialConditions(spec).massModel;
  const vOuter = Math.sqrt(radii[8] * modelAcceleration(spec.law, model, radii[8]));
  const period = (2 * Math.PI * radii[8]) / vOuter / myrToInternal(1);
  const sim = new Simulation({ ...spec, duration_Myr: period, snapshotEvery: 1000 });
  const diskOnly = () => {
    const p = sim.particles, n = diskParticleSplit(spec.model as DiskSpec).disk; // the disk comes first, the bulge after
    const v = (a: Float64Array) => a.subarray(0, n);
    return lagrangianRadii({ ...p, n, x: v(p.x), y: v(p.y), z: v(p.z), vx: v(p.vx), vy: v(p.vy), vz: v(p.vz), m: v(p.m), ax: v(p.ax), ay: v(p.ay), az: v(p.az) }, [0.1, 0.5, 0.9]);
  };
  const before = forceCurve(sim, radii), radiiBefore = diskOnly();
  while (!sim.done) sim.advance();
  forceCurve(sim, radii).forEach((v, k) => expect(Math.abs(v / before[k] - 1)).toBeLessThan(0.05));
  diskOnly().forEach((r, k) => expect(Math.abs(r / radiiBefore[k] - 1)).toBeLessThan(0.05));
}, 600_000);
