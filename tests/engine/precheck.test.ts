import { analyticCurves, buildInitialConditions, precheck } from '../../shared/engine';
import { lagrangianRadii } from '../../shared/engine/diagnostics';
import { specWith } from './helpers';

const plummer = (n: number) => ({ kind: 'plummer', n, mass_Msun: 1e10, scale_kpc: 1 });
const codes = (overrides: Record<string, unknown>) => precheck(specWith(overrides)).warnings.map((w) => w.code);

describe('precheck: timescales and warnings before running', () => {
  test('crossing time is r_half / v_rms of the initial particles and relaxation N / (8 ln N) of it (Binney & Tremaine 2008, eq. 1.38)', () => {
    const spec = specWith({ model: plummer(800) });
    const p = buildInitialConditions(spec).particles;
    let mv2 = 0, M = 0;
    for (let i = 0; i < p.n; i++) { mv2 += p.m[i] * (p.vx[i] ** 2 + p.vy[i] ** 2 + p.vz[i] ** 2); M += p.m[i]; }
    const [rHalf] = lagrangianRadii(p, [0.5]);
    const { timescales } = precheck(spec);
    expect(timescales.crossingTime_Myr / ((rHalf / Math.sqrt(mv2 / M)) * 977.79)).toBeCloseTo(1, 4); // 977.79 Myr per kpc/(km/s)
    expect(timescales.relaxationTime_Myr! / timescales.crossingTime_Myr).toBeCloseTo(800 / (8 * Math.log(800)), 9);
  });

  test('a run longer than the relaxation time is warned about, citing its source', () => {
    const { warnings, timescales } = precheck(specWith({ model: plummer(60), duration_Myr: 400, snapshotEvery: 100 }));
    expect(timescales.relaxationTime_Myr!).toBeLessThan(400);
    const w = warnings.find((x) => x.code === 'outlasts-relaxation');
    expect(w?.source).toMatch(/Binney & Tremaine 2008/);
  });

  test('a step longer than 0.2 sqrt(eps / a_max) is flagged (Power et al. 2003); the suggested step clears every timestep rule', () => {
    expect(codes({ model: plummer(500), timestep_Myr: 2, duration_Myr: 50, snapshotEvery: 5 })).toContain('timestep-coarse-for-softening');
    const suggested = precheck(specWith({ model: plummer(500) })).timescales.suggestedTimestep_Myr;
    const after = codes({ model: plummer(500), timestep_Myr: 0.99 * suggested });
    expect(after.filter((c) => c.startsWith('timestep'))).toEqual([]);
  });

  test('zero softening with more than two particles is warned about; a Kepler pair is not', () => {
    expect(codes({ model: plummer(50), softening_kpc: 0 })).toContain('no-softening');
    const kepler = { kind: 'kepler', mass1_Msun: 1e10, mass2_Msun: 1e10, semiMajorAxis_kpc: 1, eccentricity: 0.3 };
    const k = precheck(specWith({ model: kepler, softening_kpc: 0, timestep_Myr: 0.05, duration_Myr: 20, snapshotEvery: 10 }));
    expect(k.warnings.map((w) => w.code)).not.toContain('no-softening');
    expect(k.timescales.orbitalPeriod_Myr).toBeGreaterThan(0);
  });

  test('laws outside their domain and pointless method choices get notes', () => {
    const disk = { kind: 'disk', n: 300, mass_Msun: 3e10, scaleLength_kpc: 2, scaleHeight_kpc: 0.2 };
    expect(codes({ model: disk, law: { kind: 'emergent' }, softening_kpc: 0.1 })).toContain('outside-validity');
    expect(codes({ model: disk, law: { kind: 'mond' }, softening_kpc: 0.1 })).toEqual(expect.arrayContaining(['algebraic-mond-approximate', 'law-without-potential']));
    expect(codes({ model: plummer(100), solver: { kind: 'tree', theta: 0.6 } })).toContain('tree-not-needed');
    expect(codes({ model: plummer(100), integrator: 'rk4' })).toContain('rk4-secular-drift');
  });

  test('cost: steps, force evaluations and interactions', () => {
    const { timescales } = precheck(specWith({ model: plummer(100), integrator: 'yoshida4', timestep_Myr: 0.5, duration_Myr: 10, snapshotEvery: 5 }));
    expect([timescales.steps, timescales.forceEvaluations, timescales.interactions]).toEqual([20, 60, 100 * 100 * 60]);
  });
});

describe('analytic curves for previews', () => {
  test("give the spec's law and Newton by default, on the measured curves' bins", () => {
    const c = analyticCurves(specWith({ model: plummer(100), law: { kind: 'mond' } }));
    expect(c.curves.map((k) => k.law)).toEqual(['mond', 'newton']);
    expect(c.radii_kpc).toHaveLength(24);
    expect(analyticCurves(specWith({ model: plummer(100) })).curves).toHaveLength(1);
  });

  test('take any list of laws, radii or point count', () => {
    const spec = specWith({ model: plummer(100) });
    const c = analyticCurves(spec, {
      laws: [{ kind: 'newton' }, { kind: 'halo', profile: 'nfw', scale_kpc: 10, density_Msun_kpc3: 1e7 }, { kind: 'emergent', H0_km_s_Mpc: 70 }],
      points: 10,
      maxRadius_kpc: 20,
    });
    expect(c.radii_kpc).toHaveLength(10);
    expect(c.radii_kpc[9]).toBeCloseTo(19, 9);
    // Both extra laws add pull to the same baryons, so they lie above Newton everywhere.
    c.curves.slice(1).forEach((k) => k.v_km_s.forEach((v, i) => expect(v).toBeGreaterThan(c.curves[0].v_km_s[i])));
  });
});
