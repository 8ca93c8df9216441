// The radial acceleration relation and the baryonic Tully-Fisher relation, checked as published.
import { mondLaw } from '../../shared/engine/laws/mond';
import { pointMassModel } from '../../shared/engine/models/massModel';
import { ACCEL_UNIT_M_S2 as UNIT, accelFromSI, G } from '../../shared/engine/units';
import { fitGalaxyLaw, fittedMassToLight } from '../../shared/galaxy/fit';
import { inventedCurve, type InventedBaryons } from '../../shared/galaxy/invented';
import { accelerationPoints, btfrMass, btfrSpeed, RAR_G_DAGGER_M_S2, rarAcceleration, rarScatter } from '../../shared/galaxy/rar';

const GD = 1.2e-10; // McGaugh, Lelli & Schombert 2016, PRL 117, 201101

describe('radial acceleration relation, g_obs = g_bar / (1 - exp(-sqrt(g_bar / g_dagger)))', () => {
  test('g_dagger is 1.20e-10 m/s^2 as published', () => {
    expect(RAR_G_DAGGER_M_S2).toBe(1.2e-10);
  });

  test('at g_bar = g_dagger, g_obs = g_dagger / (1 - 1/e) = 1.58198 g_dagger (arithmetic, 1e-12 relative)', () => {
    expect(rarAcceleration(GD) / GD).toBeCloseTo(1 / (1 - Math.exp(-1)), 12);
    expect(rarAcceleration(GD) / GD).toBeCloseTo(1.58198, 5);
  });

  test('Newtonian at high acceleration, sqrt(g_bar g_dagger) at low (the published limits; tolerance from the next term)', () => {
    // g_bar = 100 g_dagger: 1/(1 - e^-10) = 1 + 4.5e-5.
    expect(rarAcceleration(100 * GD) / (100 * GD)).toBeCloseTo(1, 4);
    // g_bar = 1e-4 g_dagger: sqrt(y)/(1 - e^-sqrt(y)) = 1 + sqrt(y)/2 + ... = 1.005 at y = 1e-4.
    const gBar = 1e-4 * GD;
    const ratio = rarAcceleration(gBar) / Math.sqrt(gBar * GD);
    expect(ratio).toBeGreaterThan(1.004);
    expect(ratio).toBeLessThan(1.006);
    expect(rarAcceleration(0)).toBe(0);
    expect(rarAcceleration(-1e-11)).toBe(0);
  });

  const baryons: InventedBaryons = { disk: { mass_Msun: 3e10, scale_kpc: 2.5 }, gas: { mass_Msun: 6e9, scale_kpc: 5 } };
  const R = Array.from({ length: 30 }, (_, i) => 0.5 + 0.6 * i);
  const ml = { disk: 0.5, bulge: 0.7 };
  const vBarSq = (c: { vGas: number; vDisk: number }) => c.vGas ** 2 + ml.disk * c.vDisk ** 2;

  test('a galaxy on the relation has no scatter about it; a Newtonian galaxy without dark matter lies below it', () => {
    const onRelation = inventedCurve(baryons, R, (r, c) => {
      const gBar = (vBarSq(c) / r) * UNIT;
      return Math.sqrt((rarAcceleration(gBar) / UNIT) * r);
    }, () => 1e-9, 1);
    const on = accelerationPoints(onRelation, ml);
    expect(on).toHaveLength(30);
    expect(rarScatter(on).rms_dex).toBeLessThan(1e-9);

    const newtonian = inventedCurve(baryons, R, (_r, c) => Math.sqrt(vBarSq(c)), () => 1e-9, 1);
    const s = rarScatter(accelerationPoints(newtonian, ml));
    expect(s.mean_dex).toBeLessThan(-0.05);
    // g_obs = g_bar there: each point's offset is -log10(nu_rar(g_bar/g_dagger)).
    const pts = accelerationPoints(newtonian, ml);
    expect(pts[0].gObs).toBeCloseTo(pts[0].gBar, 20);
  });

  test('with 3% speed errors the scatter is about 2 x 0.013 dex (0.01..0.04 dex for 30 points, seeded)', () => {
    const noisy = inventedCurve(baryons, R, (r, c) => Math.sqrt((rarAcceleration((vBarSq(c) / r) * UNIT) / UNIT) * r), (_r, v) => 0.03 * v, 5);
    const s = rarScatter(accelerationPoints(noisy, ml));
    expect(s.rms_dex).toBeGreaterThan(0.01);
    expect(s.rms_dex).toBeLessThan(0.04);
  });

  test('points where the baryons pull outward are left out', () => {
    const curve = { radiusKpc: [1, 2], vObs: [10, 20], vErr: [1, 1], vGas: [-30, 10], vDisk: [5, 20], vBulge: null };
    expect(accelerationPoints(curve, ml).map((p) => p.radiusKpc)).toEqual([2]);
  });
});

describe('baryonic Tully-Fisher relation, v^4 = G M a0 (Milgrom 1983)', () => {
  test('btfrSpeed and btfrMass invert each other and follow v^4 = G M a0', () => {
    const M = 1e10;
    const v = btfrSpeed(M);
    expect(v ** 4).toBeCloseTo(G * M * accelFromSI(1.2e-10), 6);
    expect(btfrMass(v) / M).toBeCloseTo(1, 12);
    // Slope 4 in log-log: ten times the mass, 10^(1/4) times the speed.
    expect(btfrSpeed(10 * M) / v).toBeCloseTo(10 ** 0.25, 12);
  });

  // v^4 / (G M a0) = nu^2 y at y = g_N / a0; for these nu that is 1 + sqrt(y) + O(y) at most (1.01 at y = 1e-4).
  test.each(['simple', 'standard', 'rar'] as const)('the engine MOND law (%s nu) reaches v^4 = G M a0 far from a point mass (y = 1e-4, within 1 + sqrt y)', (interpolation) => {
    const M = 5e10, a0 = 1.2e-10;
    const model = pointMassModel(M, 1000);
    const R = Math.sqrt((G * M) / (1e-4 * accelFromSI(a0)));
    const v = Math.sqrt(R * mondLaw.modelAcceleration({ kind: 'mond', interpolation, a0_m_s2: a0 }, model, R));
    const ratio = (v / btfrSpeed(M, a0)) ** 4;
    expect(ratio).toBeGreaterThan(0.999);
    expect(ratio).toBeLessThan(1.011);
  });
});

describe('the acceleration relation of a fit', () => {
  test('uses the mass-to-light ratios the fit found', () => {
    const baryons: InventedBaryons = { disk: { mass_Msun: 4e10, scale_kpc: 2.5 }, gas: { mass_Msun: 6e9, scale_kpc: 5 } };
    const R = Array.from({ length: 25 }, (_, i) => 0.5 + 0.7 * i);
    // On the relation with disk mass-to-light 0.5, no noise to speak of: the MOND RAR-nu fit (a0 = g_dagger) lands on it.
    const curve = inventedCurve(baryons, R, (r, c) => Math.sqrt((rarAcceleration(((c.vGas ** 2 + 0.5 * c.vDisk ** 2) / r) * UNIT) / UNIT) * r), () => 0.5, 9);
    const fit = fitGalaxyLaw(curve, 'mond-rar');
    const ml = fittedMassToLight(fit.params);
    expect(ml.disk).toBeCloseTo(0.5, 2);
    expect(rarScatter(accelerationPoints(curve, ml)).rms_dex).toBeLessThan(0.005);
  });
});
