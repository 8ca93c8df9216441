// Initial conditions from a galaxy's Newtonian fit: the disk, bulge and halo built from the fit
// reproduce the fitted curves, and the engine's analytic curve of the built model (thick and
// softened, as the particles are) follows the fitted baryonic curve within stated tolerances.
import { fitGalaxyLaw } from '../../shared/galaxy/fit';
import { exponentialDiskSpeed, inventedCurve, type InventedBaryons } from '../../shared/galaxy/invented';
import { galaxyRunSpec, haloLawFromFit } from '../../shared/galaxy/toRun';
import { parseRunSpec, type RunSpec } from '../../shared/spec';
import { analyticCurves } from '../../shared/engine/analytic';
import { buildInitialConditions } from '../../shared/engine';
import { haloEnclosedMass } from '../../shared/engine/laws/halo';
import { G } from '../../shared/engine/units';

const R = Array.from({ length: 20 }, (_, i) => 0.75 * (i + 1));
const choices = { name: 'Invented', n: 1000, duration_Myr: 100, timestep_Myr: 0.5, softening_kpc: 0.1, snapshotEvery: 10, seed: 1 };

/** An invented galaxy: given baryons (disk at Upsilon 0.5, bulge at 0.7) plus a smooth halo term, 3% + 2 km/s errors. */
function galaxy(baryons: InventedBaryons) {
  return inventedCurve(baryons, R, (r, c) => Math.sqrt(c.vGas ** 2 + 0.5 * c.vDisk ** 2 + 0.7 * c.vBulge ** 2 + (120 ** 2 * r) / (r + 3)), (_r, v) => 0.03 * v + 2, 5);
}

const built = (baryons: InventedBaryons, law: 'nfw' | 'isothermal' = 'nfw') => {
  const fit = fitGalaxyLaw(galaxy(baryons), law, {});
  const run = galaxyRunSpec(fit, choices);
  const parsed = parseRunSpec(run.spec);
  if (!parsed.ok) throw new Error(JSON.stringify(parsed.issues));
  return { fit, run, spec: parsed.spec };
};

test('a stellar disk alone: the exponential recovers the fitted disk exactly (mass = Upsilon x M, same scale length)', () => {
  const { fit, run } = built({ disk: { mass_Msun: 4e10, scale_kpc: 2.5 } });
  const ml = fit.params.find((p) => p.name === 'ML_disk')!.value;
  // The fitted disk curve is an exponential disk's curve scaled by sqrt(Upsilon): recovered to rounding (tolerance 1e-6).
  expect(run.disk.scale_kpc).toBeCloseTo(2.5, 5);
  expect(run.disk.mass_Msun / (ml * 4e10)).toBeCloseTo(1, 6);
  expect(run.bulge).toBeNull();
  for (let i = 0; i < R.length; i++) expect(exponentialDiskSpeed(run.disk.mass_Msun, run.disk.scale_kpc, R[i]) / fit.curve.vBaryons[i]).toBeCloseTo(1, 6);
});

test('the engine\'s curve of the built disk, thick and softened, follows the fitted baryons', () => {
  const { fit, spec } = built({ disk: { mass_Msun: 4e10, scale_kpc: 2.5 } });
  const v = analyticCurves(spec, { laws: [{ kind: 'newton' }], radii_kpc: R }).curves[0].v_km_s;
  R.forEach((r, i) => {
    const ratio = v[i] / fit.curve.vBaryons[i];
    // Thickness (z0 = 0.15 R_d) and softening only lower the thin-disk curve: measured 15% low at
    // 0.3 R_d, 6% at R_d, 3.8% at 2.1 R_d, under 3% from 2.7 R_d. Tolerances ours: 17% inside R_d,
    // 7% to 2 R_d, 4% to 3 R_d, 3% beyond.
    expect(ratio).toBeLessThan(1.001);
    expect(ratio).toBeGreaterThan(r < 2.5 ? 0.83 : r < 5 ? 0.93 : r < 7.5 ? 0.96 : 0.97);
  });
});

test('a gas disk of its own and a Hernquist bulge: each recovers its invented profile', () => {
  const { fit, run, spec } = built({ disk: { mass_Msun: 4e10, scale_kpc: 2.5 }, gas: { mass_Msun: 1e10, scale_kpc: 5 }, bulge: { mass_Msun: 1e10, scale_kpc: 0.5 } });
  const mlBulge = fit.params.find((p) => p.name === 'ML_bulge')!.value;
  const mlDisk = fit.params.find((p) => p.name === 'ML_disk')!.value;
  // Each fitted curve is an exact exponential (Freeman 1970) or Hernquist curve, the stars' and
  // bulge's scaled by sqrt(Upsilon), the gas at unit mass-to-light ratio: recovered to rounding (1e-6).
  expect(run.bulge!.scale_kpc).toBeCloseTo(0.5, 5);
  expect(run.bulge!.mass_Msun / (mlBulge * 1e10)).toBeCloseTo(1, 6);
  expect(run.disk.scale_kpc).toBeCloseTo(2.5, 5);
  expect(run.disk.mass_Msun / (mlDisk * 4e10)).toBeCloseTo(1, 6);
  expect(run.gas!.scale_kpc).toBeCloseTo(5, 5);
  expect(run.gas!.mass_Msun / 1e10).toBeCloseTo(1, 6);
  expect(spec.model).toMatchObject({
    kind: 'disk',
    bulge: { scale_kpc: run.bulge!.scale_kpc },
    gas: { mass_Msun: run.gas!.mass_Msun, scaleLength_kpc: run.gas!.scale_kpc },
  });
  // The particles carry the gas as a part of its own, holding its mass (to rounding).
  const ic = buildInitialConditions({ ...spec, model: { ...spec.model, n: 600 } } as RunSpec);
  const gas = ic.components.find((c) => c.label === 'gas')!;
  let gasMass = 0;
  for (let i = gas.start; i < gas.start + gas.count; i++) gasMass += ic.particles.m[i];
  expect(gasMass / run.gas!.mass_Msun).toBeCloseTo(1, 9);
});

// Invented galaxies: the test's own, and the shapes of the demo's (a bulged spiral, a gas-rich
// dwarf whose gas outweighs its stars, a bulgeless disk).
const GALAXIES: [string, InventedBaryons][] = [
  ['spiral with bulge and gas', { disk: { mass_Msun: 4e10, scale_kpc: 2.5 }, gas: { mass_Msun: 1e10, scale_kpc: 5 }, bulge: { mass_Msun: 1e10, scale_kpc: 0.5 } }],
  ['spiral with a wide gas disk', { disk: { mass_Msun: 4e10, scale_kpc: 2.5 }, bulge: { mass_Msun: 6e9, scale_kpc: 0.5 }, gas: { mass_Msun: 8e9, scale_kpc: 6 } }],
  ['gas-rich dwarf', { disk: { mass_Msun: 6e8, scale_kpc: 1.2 }, gas: { mass_Msun: 1.5e9, scale_kpc: 2.5 } }],
  ['bulgeless disk', { disk: { mass_Msun: 1.5e10, scale_kpc: 2 }, gas: { mass_Msun: 4e9, scale_kpc: 4.5 } }],
];

test.each(GALAXIES)("%s: the built model's baryonic curve (engine, thick and softened) follows the fitted baryonic curve from 1 to 5 R_d", (_name, baryons) => {
  const { fit, run, spec } = built(baryons);
  expect(run.gas).not.toBeNull();
  const v = analyticCurves(spec, { laws: [{ kind: 'newton' }], radii_kpc: R }).curves[0].v_km_s;
  const Rd = run.disk.scale_kpc;
  let checked = 0;
  R.forEach((r, i) => {
    if (r < Rd || r > 5 * Rd) return;
    checked++;
    const ratio = v[i] / fit.curve.vBaryons[i];
    // Gas and stars each get their own exponential, so what is left is the thickness of the
    // layers (z0 = 0.15 R_d; the fitted curves are razor-thin) and the softening, which only
    // lower the curve: measured at most 7.5% low at 1 R_d (bulgeless disk), 5.2% at 1.5 R_d,
    // 3.8% at 2 R_d, 1.5% at 4 R_d. Tolerances ours: 8% from 1 R_d, 5% from 2 R_d.
    expect(ratio).toBeLessThan(1.005);
    expect(ratio).toBeGreaterThan(r < 2 * Rd ? 0.92 : 0.95);
  });
  expect(checked).toBeGreaterThanOrEqual(3);
});

test('a galaxy with gas but no stellar disk: the gas is the disk', () => {
  const curve = galaxy({ disk: { mass_Msun: 4e10, scale_kpc: 2.5 }, gas: { mass_Msun: 1e10, scale_kpc: 5 } });
  const fit = fitGalaxyLaw({ ...curve, vDisk: null }, 'nfw', {});
  const run = galaxyRunSpec(fit, choices);
  expect(run.gas).toBeNull();
  expect(run.disk.scale_kpc).toBeCloseTo(5, 5);
  expect(run.disk.mass_Msun / 1e10).toBeCloseTo(1, 6);
  expect(run.spec.model).not.toHaveProperty('gas');
});

test('the fitted halo becomes the halo law: its speed matches the fit\'s halo term', () => {
  for (const law of ['nfw', 'isothermal'] as const) {
    const { fit, spec } = built({ disk: { mass_Msun: 4e10, scale_kpc: 2.5 } }, law);
    expect(spec.law).toEqual(haloLawFromFit(fit));
    if (spec.law.kind !== 'halo') throw new Error('not a halo law');
    const halo = spec.law;
    // v_halo^2 = G M_halo(<R) / R is the fit's extra term (Newton + halo): to 1e-6 relative.
    R.forEach((r, i) => expect(Math.sqrt((G * haloEnclosedMass(halo, r)) / r) / fit.curve.vExtra[i]).toBeCloseTo(1, 6));
  }
});

test('a fit without a halo is refused by name', () => {
  const fit = fitGalaxyLaw(galaxy({ disk: { mass_Msun: 4e10, scale_kpc: 2.5 } }), 'mond-simple', {});
  expect(() => galaxyRunSpec(fit, choices)).toThrow(/Newtonian halo fit \(nfw or isothermal\), not mond-simple/);
});
