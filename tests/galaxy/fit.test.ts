// Fits recover the parameters of invented galaxies made under each law with
// seeded noise. Each truth curve below is written from the published formula,
// not through the fitting code, so a wrong law call or unit would show.
// Tolerance: every fitted parameter within 3 of its own sigma of the truth
// (a seeded draw, so the outcome is fixed; for Gaussian errors a 3-sigma miss
// has a 0.3% chance per parameter), and reduced chi^2 inside the central 99%
// of the chi^2 distribution for the degrees of freedom (about 0.4..1.9 here).
import { emergentLaw } from '../../shared/engine/laws/emergent';
import { hernquistModel } from '../../shared/engine/models/hernquist';
import { accelFromSI, C_KM_S, G } from '../../shared/engine/units';
import { tabulatedBaryonModel } from '../../shared/galaxy/baryons';
import { fitGalaxy, fitGalaxyLaw, fitSample, FitError, concentrationFor, type FittedParam, type LawFit } from '../../shared/galaxy/fit';
import { inventedCurve, hernquistSpeed, type InventedBaryons } from '../../shared/galaxy/invented';

const radii = (n: number, step: number, first = step) => Array.from({ length: n }, (_, i) => first + i * step);
const R30 = radii(30, 0.7, 0.4);
const DWARF: InventedBaryons = { disk: { mass_Msun: 1e9 / 0.5, scale_kpc: 1.5 }, gas: { mass_Msun: 2e9, scale_kpc: 3 } };
const SPIRAL: InventedBaryons = { disk: { mass_Msun: 5e10 / 0.5, scale_kpc: 3 }, gas: { mass_Msun: 8e9, scale_kpc: 7 }, bulge: { mass_Msun: 1e10 / 0.7, scale_kpc: 0.6 } };
const UPS = { disk: 0.5, bulge: 0.7 }; // on the priors' centres, so the priors do not pull the truth away
const vBarSq = (c: { vGas: number; vDisk: number; vBulge: number }) => c.vGas ** 2 + UPS.disk * c.vDisk ** 2 + UPS.bulge * c.vBulge ** 2;
const errorOf = (frac: number, floor: number) => (_R: number, v: number) => Math.max(floor, frac * v);

function expectRecovered(p: FittedParam | undefined, truth: number) {
  expect(p).toBeDefined();
  expect(p!.atBound).toBe(false);
  expect(p!.error).not.toBeNull();
  expect(p!.error!).toBeGreaterThan(0);
  expect(Math.abs(p!.value - truth)).toBeLessThan(3 * p!.error!);
}
const param = (fit: LawFit, name: string) => fit.params.find((p) => p.name === name);
function expectGoodChi2(fit: LawFit) {
  expect(fit.dof).toBe(fit.points - fit.freeParams);
  expect(fit.reducedChi2).toBeGreaterThan(0.4);
  expect(fit.reducedChi2).toBeLessThan(1.9);
  // AIC = chi^2 + 2k, BIC = chi^2 + k ln N.
  expect(fit.aic).toBeCloseTo(fit.chi2 + 2 * fit.freeParams, 9);
  expect(fit.bic).toBeCloseTo(fit.chi2 + fit.freeParams * Math.log(fit.points), 9);
}

/** MOND interpolating functions as published: simple (Famaey & Binney 2005), standard (Milgrom 1983), RAR (McGaugh, Lelli & Schombert 2016). */
const NU = {
  simple: (y: number) => 0.5 + Math.sqrt(0.25 + 1 / y),
  standard: (y: number) => Math.sqrt(0.5 + 0.5 * Math.sqrt(1 + 4 / (y * y))),
  rar: (y: number) => 1 / (1 - Math.exp(-Math.sqrt(y))),
};
const mondTruth = (nu: (y: number) => number, a0_m_s2: number) => (R: number, c: Parameters<typeof vBarSq>[0]) => {
  const gN = vBarSq(c) / R, a0 = accelFromSI(a0_m_s2);
  return Math.sqrt(nu(gN / a0) * gN * R);
};

/** NFW circular speed (Navarro, Frenk & White 1997): V200^2 [ln(1+cx) - cx/(1+cx)] / (x [ln(1+c) - c/(1+c)]), x = R / r200, r200 = V200 / (10 H0). */
const nfwTruth = (V200: number, c: number) => (R: number, k: Parameters<typeof vBarSq>[0]) => {
  const x = R / (V200 / (10 * 0.07));
  const m = (t: number) => Math.log1p(t) - t / (1 + t);
  return Math.sqrt(vBarSq(k) + (V200 ** 2 * m(c * x)) / (x * m(c)));
};

/** Pseudo-isothermal sphere: v^2 = 4 pi G rho0 rc^2 (1 - (rc/R) atan(R/rc)) (Begeman, Broeils & Sanders 1991 form). */
const isoTruth = (rho0: number, rc: number) => (R: number, k: Parameters<typeof vBarSq>[0]) =>
  Math.sqrt(vBarSq(k) + 4 * Math.PI * G * rho0 * rc * rc * (1 - (rc / R) * Math.atan(R / rc)));

describe('fits of one invented galaxy recover its parameters', () => {
  test.each([
    ['simple', 'mond-simple', 1.2e-10],
    ['standard', 'mond-standard', 1.0e-10],
    ['rar', 'mond-rar', 1.4e-10],
  ] as const)('MOND, %s nu, a0 free', (nu, law, a0) => {
    const curve = inventedCurve(SPIRAL, R30, mondTruth(NU[nu], a0), errorOf(0.03, 3), 11);
    const fit = fitGalaxyLaw(curve, law, { a0: 'free' });
    expectRecovered(param(fit, 'a0'), a0);
    expectRecovered(param(fit, 'ML_disk'), UPS.disk);
    expectRecovered(param(fit, 'ML_bulge'), UPS.bulge);
    expectGoodChi2(fit);
    expect(fit.freeParams).toBe(3);
  });

  test('MOND with a0 fixed fits the mass-to-light ratio alone', () => {
    const curve = inventedCurve(DWARF, R30, mondTruth(NU.simple, 1.2e-10), errorOf(0.04, 2), 12);
    const fit = fitGalaxyLaw(curve, 'mond-simple');
    expect(fit.params.map((p) => p.name)).toEqual(['ML_disk']);
    expectRecovered(param(fit, 'ML_disk'), UPS.disk);
    expectGoodChi2(fit);
  });

  test('Newton + NFW halo: V200, c200 and the mass-to-light ratios', () => {
    const curve = inventedCurve(SPIRAL, radii(40, 0.8, 0.5), nfwTruth(160, 9), errorOf(0.02, 2), 13);
    const fit = fitGalaxyLaw(curve, 'nfw');
    expectRecovered(param(fit, 'V200'), 160);
    expectRecovered(param(fit, 'c200'), 9);
    expectRecovered(param(fit, 'ML_disk'), UPS.disk);
    expectGoodChi2(fit);
    // Derived halo quantities agree with each other: r_s = r200 / c200.
    expect(fit.derived.r_s_kpc).toBeCloseTo(fit.derived.r200_kpc / fit.derived.c200, 9);
  });

  test('Newton + cored isothermal halo: rho0 and r_core', () => {
    const curve = inventedCurve(DWARF, R30, isoTruth(10 ** 7.8, 2.5), errorOf(0.03, 2), 14);
    const fit = fitGalaxyLaw(curve, 'isothermal');
    expectRecovered(param(fit, 'log10_rho0'), 7.8);
    expectRecovered(param(fit, 'r_core'), 2.5);
    expectRecovered(param(fit, 'ML_disk'), UPS.disk);
    expectGoodChi2(fit);
  });

  test('emergent gravity, H0 free (apparent dark mass from the spherical formula, Verlinde 2016)', () => {
    // Truth: g = v_bar^2/R + sqrt(G a_M d(M r)/dr) / r with M = r v_bar^2 / G and a_M = c H0 / 6,
    // the derivative taken by a fine central difference of the analytic components.
    const H0 = 70;
    const aM = (C_KM_S * (H0 / 1000)) / 6;
    const Mr = (r: number) => (r * r * vBarSq(components(r))) / G;
    const components = (r: number) => {
      const c = inventedCurve(DWARF, [r], () => 0, () => 1, 0);
      return { vGas: c.vGas![0], vDisk: c.vDisk![0], vBulge: 0 };
    };
    const truth = (R: number) => {
      const h = 1e-4 * R;
      const slope = (Mr(R + h) - Mr(R - h)) / (2 * h);
      return Math.sqrt(vBarSq(components(R)) + R * (Math.sqrt(G * aM * slope) / R));
    };
    const curve = inventedCurve(DWARF, radii(40, 0.4, 0.3), truth, errorOf(0.03, 2), 15);
    const fit = fitGalaxyLaw(curve, 'emergent', { H0: 'free' });
    expectRecovered(param(fit, 'H0'), H0);
    expectRecovered(param(fit, 'ML_disk'), UPS.disk);
    expectGoodChi2(fit);
  });

  test('the verdict is by BIC and prefers the law the galaxy was made under over one that cannot fit it', () => {
    const curve = inventedCurve(SPIRAL, R30, mondTruth(NU.simple, 1.2e-10), errorOf(0.03, 3), 16);
    const report = fitGalaxy(curve, { laws: ['mond-simple', 'emergent'] });
    expect(report.verdict.criterion).toBe('BIC');
    expect(report.verdict.preferred).toBe('mond-simple');
    expect(report.verdict.deltaBic['mond-simple']).toBe(0);
    expect(report.verdict.deltaBic.emergent).toBeGreaterThan(10); // "very strong" on the Kass & Raftery (1995) scale
  });

  test('with nothing free (gas only, MOND with a0 fixed) the curve is the law prediction, chi^2 over all points', () => {
    const gasOnly: InventedBaryons = { disk: { mass_Msun: 0, scale_kpc: 1 }, gas: { mass_Msun: 3e9, scale_kpc: 2 } };
    const curve = { ...inventedCurve(gasOnly, R30, mondTruth(NU.simple, 1.2e-10), errorOf(0.03, 2), 17), vDisk: null };
    const fit = fitGalaxyLaw(curve, 'mond-simple');
    expect(fit.params).toEqual([]);
    expect(fit.freeParams).toBe(0);
    expect(fit.dof).toBe(30);
    expectGoodChi2(fit);
  });

  describe('distance and inclination as nuisance parameters (Gaussian priors from the metadata)', () => {
    // A gas-only galaxy under MOND with a0 fixed: the curve's shape is fixed, so the data set the
    // speed scale, hence the inclination (v_obs ~ 1/sin i) or the distance (v ~ sqrt D) alone.
    // Speed errors of 0.05 km/s make the data outweigh the prior: the truth must come back to 0.2%.
    const gasOnly: InventedBaryons = { disk: { mass_Msun: 0, scale_kpc: 1 }, gas: { mass_Msun: 5e9, scale_kpc: 2.5 } };
    const truth = inventedCurve(gasOnly, R30, mondTruth(NU.simple, 1.2e-10), () => 0.05, 18);
    const sinDeg = (d: number) => Math.sin((d * Math.PI) / 180);

    test('the inclination: speeds deprojected with 52 degrees when the truth is 60', () => {
      const s = sinDeg(60) / sinDeg(52);
      const table = { ...truth, vDisk: null, vObs: truth.vObs.map((v) => v * s), vErr: truth.vErr.map((e) => e * s), inclinationDeg: { value: 52, error: 4 } };
      const fit = fitGalaxyLaw(table, 'mond-simple', { nuisance: ['inclination'] });
      expect(param(fit, 'inclination')!.value).toBeCloseTo(60, 1);
      expect(fit.curve.vObs[0]).toBeCloseTo(truth.vObs[0], 2);
      expect(fit.priorPenalty).toBeCloseTo(4, 1); // ((60 - 52) / 4)^2
    });

    test('the distance: a table made at 9 Mpc when the galaxy is at 10', () => {
      const d = 0.9;
      const table = { ...truth, vDisk: null, radiusKpc: truth.radiusKpc.map((R) => R * d), vGas: truth.vGas!.map((v) => v * Math.sqrt(d)), distanceMpc: { value: 9, error: 1 } };
      const fit = fitGalaxyLaw(table, 'mond-simple', { nuisance: ['distance'] });
      expect(param(fit, 'distance')!.value / 10).toBeCloseTo(1, 2);
      expect(fit.curve.radiusKpc[3]).toBeCloseTo(truth.radiusKpc[3], 2);
    });

    test('refused without the value and its error, or too close to face-on', () => {
      expect(() => fitGalaxyLaw({ ...truth, distanceMpc: { value: 9 } }, 'mond-simple', { nuisance: ['distance'] })).toThrow(/fitting the distance needs its value and error/);
      expect(() => fitGalaxyLaw({ ...truth, inclinationDeg: { value: 6, error: 1 } }, 'mond-simple', { nuisance: ['inclination'] })).toThrow(/too close to face-on/);
    });
  });

  test('too few points or no baryons are refused', () => {
    const curve = inventedCurve(DWARF, [1, 2], mondTruth(NU.simple, 1.2e-10), () => 3, 1);
    expect(() => fitGalaxyLaw(curve, 'nfw')).toThrow(new FitError('2 points cannot constrain 3 free parameters under Newtonian + NFW halo'));
    expect(() => fitGalaxyLaw({ ...curve, vGas: null, vDisk: null }, 'mond-simple')).toThrow(/no baryonic components/);
    expect(() => fitGalaxy(curve, { laws: ['nope' as never] })).toThrow(/unknown law "nope"/);
    // A law that cannot be fitted is reported beside those that can; if none can, the fit is refused.
    const report = fitGalaxy(curve, { laws: ['mond-simple', 'nfw'] });
    expect(report.laws.map((l) => l.law)).toEqual(['mond-simple']);
    expect(report.refused).toEqual([{ law: 'nfw', reason: '2 points cannot constrain 3 free parameters under Newtonian + NFW halo' }]);
    expect(() => fitGalaxy(curve, { laws: ['nfw', 'isothermal'] })).toThrow(/^nfw: 2 points .*; isothermal: 2 points/);
  });
});

describe('the tabulated-baryon mass model serves the law code', () => {
  test('Newton from the table is v_bar^2 / R exactly at the tabulated radii', () => {
    const curve = inventedCurve(SPIRAL, R30, () => 100, () => 5, 2);
    const model = tabulatedBaryonModel(curve, UPS);
    curve.radiusKpc.forEach((R, i) => {
      const v2 = curve.vGas![i] ** 2 + UPS.disk * curve.vDisk![i] ** 2 + UPS.bulge * curve.vBulge![i] ** 2;
      expect(R * model.newtonAccel(R)).toBeCloseTo(v2, 8);
    });
  });

  test('for a spherical mass the tabulated model gives the same emergent-gravity curve as the analytic model (1%)', () => {
    // Spherical proxy is exact for a sphere, so the only difference is the tabulation (0.2 kpc steps).
    const sphere = { mass_Msun: 2e10, scale_kpc: 1.5 };
    const R = radii(60, 0.2);
    const curve = { radiusKpc: R, vObs: R.map(() => 1), vErr: R.map(() => 1), vGas: null, vDisk: null, vBulge: R.map((r) => hernquistSpeed(sphere.mass_Msun, sphere.scale_kpc, r)) };
    const tabulated = tabulatedBaryonModel(curve, { disk: 0, bulge: 1 });
    const analytic = hernquistModel({ ...sphere, truncationRadius_kpc: 1e6 });
    const law = { kind: 'emergent' as const, H0_km_s_Mpc: 70 };
    for (const r of [1, 3, 6, 10]) {
      expect(emergentLaw.modelAcceleration(law, tabulated, r) / emergentLaw.modelAcceleration(law, analytic, r)).toBeCloseTo(1, 2);
    }
  });
});

describe('a sample shares one parameter', () => {
  const galaxies = [
    { name: 'invented A', baryons: DWARF, R: R30 },
    { name: 'invented B', baryons: SPIRAL, R: R30 },
    { name: 'invented C', baryons: { disk: { mass_Msun: 2e10 / 0.5, scale_kpc: 2.2 }, gas: { mass_Msun: 5e9, scale_kpc: 5 } }, R: radii(25, 0.8, 0.5) },
    { name: 'invented D', baryons: { disk: { mass_Msun: 4e9 / 0.5, scale_kpc: 1.2 }, gas: { mass_Msun: 3e9, scale_kpc: 4 } }, R: radii(20, 0.6, 0.4) },
  ];

  test('a shared a0 over a MOND sample recovers a0, tighter than any single galaxy', () => {
    const a0 = 1.2e-10;
    const sample = galaxies.map((g, k) => ({ name: g.name, curve: inventedCurve(g.baryons, g.R, mondTruth(NU.simple, a0), errorOf(0.04, 3), 100 + k) }));
    const report = fitSample(sample, { laws: ['mond-simple', 'emergent'], a0: 'free' });
    const mond = report.laws.find((l) => l.law === 'mond-simple')!;
    expect(mond.shared.map((p) => p.name)).toEqual(['a0']);
    expectRecovered(mond.shared[0], a0);
    for (const g of mond.galaxies) expectRecovered(g.params.find((p) => p.name === 'ML_disk'), UPS.disk);
    const single = fitGalaxyLaw(sample[0].curve, 'mond-simple', { a0: 'free' });
    expect(mond.shared[0].error!).toBeLessThan(param(single, 'a0')!.error!);
    expect(mond.points).toBe(30 + 30 + 25 + 20);
    expect(mond.freeParams).toBe(1 + 4 + 1); // a0, four disks, one bulge
    expect(mond.chi2).toBeCloseTo(mond.galaxies.reduce((s, g) => s + g.chi2, 0), 9);
    expect(report.verdict.preferred).toBe('mond-simple');
  });

  test('a shared concentration-mass normalisation over an NFW sample recovers it', () => {
    const a = 1.025;
    const V200s = [70, 180, 130, 90];
    const sample = galaxies.map((g, k) => ({
      name: g.name,
      curve: inventedCurve(g.baryons, g.R, nfwTruth(V200s[k], concentrationFor(V200s[k], a)), errorOf(0.02, 2), 200 + k),
    }));
    const report = fitSample(sample, { laws: ['nfw'] });
    const nfw = report.laws[0];
    expect(nfw.shared.map((p) => p.name)).toEqual(['cmNormalisation']);
    expectRecovered(nfw.shared[0], a);
    nfw.galaxies.forEach((g, k) => {
      expectRecovered(g.params.find((p) => p.name === 'V200'), V200s[k]);
      expect(g.derived.c200).toBeCloseTo(concentrationFor(g.params[0].value, nfw.shared[0].value), 9);
    });
  });

  test('a sample of one is refused', () => {
    expect(() => fitSample([{ name: 'x', curve: inventedCurve(DWARF, R30, () => 50, () => 3, 1) }])).toThrow(/at least two galaxies/);
  });
});
