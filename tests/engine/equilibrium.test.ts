import { buildInitialConditions, precheck, runSimulation } from '../../shared/engine';
import { lagrangianRadii, sampleDiagnostics } from '../../shared/engine/diagnostics';
import { modelAcceleration } from '../../shared/engine/laws/registry';
import { plummerProfile } from '../../shared/engine/models/plummer';
import { softenedSphericalModel } from '../../shared/engine/models/isotropic';
import { isotropicDirection, seedRng, uniform } from '../../shared/engine/rng';
import { Simulation } from '../../shared/engine/simulation';
import { makeSolver } from '../../shared/engine/solvers';
import { newtonKernel } from '../../shared/engine/laws/newton';
import { timescalesFor } from '../../shared/engine/timescales';
import { allocateAccelerations } from '../../shared/engine/state';
import { G, myrToInternal } from '../../shared/engine/units';
import { parseRunSpec, type RunSpec } from '../../shared/spec';
import { forceCurve, specWith } from './helpers';

// Spheres balanced for each law. The sphere is chosen so every law matters:
// at its scale radius the Newtonian pull is about a0 (MOND) and a_M (emergent),
// the halo holds a few tenths of its mass, and the Yukawa range equals the scale.
const M = 1e10, A = 2;
const LAWS = [
  { kind: 'newton' },
  { kind: 'halo', profile: 'nfw', scale_kpc: 10, density_Msun_kpc3: 3e7 },
  { kind: 'mond' },
  { kind: 'qumond' }, // on its default grid (64 nodes over 2.5 times the farthest particle's distance)
  { kind: 'emergent' },
  { kind: 'yukawa', alpha: 1, lambda_kpc: A },
] as const;

const sphereSpec = (law: (typeof LAWS)[number], n: number, model: 'plummer' | 'hernquist' = 'plummer', extra: Record<string, unknown> = {}): RunSpec =>
  specWith({ model: { kind: model, n, mass_Msun: M, scale_kpc: A }, law, solver: { kind: 'tree', theta: 0.6 }, softening_kpc: 0.1, seed: 3, ...extra });

/** 2K / |sum m r . a| at t = 0, with the law's own forces on the particles. */
function initialClausius(spec: RunSpec): number {
  const sim = new Simulation(spec);
  return sampleDiagnostics(sim.particles, sim.law, 0, 0, null, null).sample.clausiusVirialRatio;
}

describe('spheres balanced for their law', () => {
  // Virial theorem 2K + sum m r . a = 0 for a steady state (Binney & Tremaine 2008, sec. 4.8.3), whatever the field.
  // Tolerance 3% (the requirement); sampling noise of K at 20,000 particles is about 0.6%.
  test.each(LAWS.map((l) => [l.kind, l] as const))('%s: a Plummer sphere of 20,000 particles has Clausius ratio 1 within 3% at t = 0', (_k, law) => {
    expect(Math.abs(initialClausius(sphereSpec(law, 20_000)) - 1)).toBeLessThan(0.03);
  });

  test.each(LAWS.map((l) => [l.kind, l] as const))('%s: so does a Hernquist sphere of 20,000 particles (cusp included; within 3%)', (_k, law) => {
    expect(Math.abs(initialClausius(sphereSpec(law, 20_000, 'hernquist')) - 1)).toBeLessThan(0.03);
  });

  // 10/50/90% radii about the centre of mass after 10 crossing times, tolerance 5% (the requirement).
  // The radius holding 400 particles wobbles by 2-3% from one sample to the next (measured), so
  // each radius is averaged over the first and over the last crossing time (5 samples each).
  // 40 steps per crossing time keep the integration error well below 5% (common practice).
  // Two-body relaxation at N = 4,000 takes about 60 crossing times (N / (8 ln N), Binney &
  // Tremaine 2008 eq. 1.38), yet it still moves the 10% and 90% radii by a few per cent
  // (measured, with a sampler whose <v^2> matches the exact Plummer distribution function to
  // 0.1%); softening a/10 slows it (common practice).
  test.each(LAWS.map((l) => [l.kind, l] as const))('%s: the 10/50/90%% radii of a 4,000-particle Plummer sphere change by less than 5%% over 10 crossing times', (_k, law) => {
    const probe = sphereSpec(law, 4000, 'plummer', { softening_kpc: A / 10 });
    const tCross = timescalesFor(probe, buildInitialConditions(probe)).timescales.crossingTime_Myr;
    const spec = { ...probe, timestep_Myr: tCross / 40, duration_Myr: 10 * tCross, snapshotEvery: 400, diagnosticsEvery: 400 };
    const sim = new Simulation(spec);
    const samples: number[][] = [lagrangianRadii(sim.particles, [0.1, 0.5, 0.9])];
    while (!sim.done) {
      sim.advance();
      if (sim.state.step % 10 === 0) samples.push(lagrangianRadii(sim.particles, [0.1, 0.5, 0.9]));
    }
    const mean = (rows: number[][]) => [0, 1, 2].map((k) => rows.reduce((s, r) => s + r[k], 0) / rows.length);
    const before = mean(samples.slice(0, 5)), after = mean(samples.slice(-5));
    after.forEach((r, k) => expect(Math.abs(r / before[k] - 1)).toBeLessThan(0.05));
  }, 600_000);
});

// A disk with a bulge, thick and with Q = 2 so it neither forms a bar nor heats much within the test
// (a bare Q = 1.5 Newtonian disk bars within one outer period; at 5,000 particles a thinner one
// thickens by a third, lowering the midplane pull by about 4%: measured). Softening 0.4 kpc and
// 128 probes per ring keep the force graininess near 1%.
const DISK_RD = 3;
const diskSpec = (law: Record<string, unknown>) =>
  specWith({
    model: { kind: 'disk', n: 5000, mass_Msun: 3e10, scaleLength_kpc: DISK_RD, scaleHeight_kpc: 0.5, toomreQ: 2, bulge: { mass_Msun: 1e10, scale_kpc: 0.6 } },
    law,
    solver: { kind: 'tree', theta: 0.6 },
    softening_kpc: 0.4,
    timestep_Myr: 4, // about 25 steps per orbit at 0.5 R_d, the shortest period in the range
    seed: 1,
  });


describe('disks balanced for their law', () => {
  // Tolerance 5% (the requirement), from 0.5 to 5 scale lengths, at t = 0 and after one rotation period at 5 R_d.
  // Measured worst, velocities from the disk's distribution function (spec version 3): Newton 3.4%
  // (0.5 R_d), NFW halo 2.2% (0.5 R_d), both after the period (version 2's Gaussian moments: 4.6-4.9%
  // and 3.7%, at 3-5 R_d). Over seeds 1-4 Newton's worst is 3.2-4.8% (moments 3.2-4.8% too): at Q = 2
  // this heavy disk is near the edge of barring, and in one seed of four an m = 2 mode grows to 0.2.
  // Emergent gravity, Yukawa, field-form MOND and a gas disk are in diskLaws.test.ts and
  // diskFieldForm.test.ts; algebraic MOND pushes itself (diskLaws.test.ts).
  test.each([
    ['newton', { kind: 'newton' }],
    ['halo', { kind: 'halo', profile: 'nfw', scale_kpc: 10, density_Msun_kpc3: 1e7 }],
  ] as const)('%s: the force-measured curve stays within 5%% of the analytic one over one outer rotation period', (_k, law) => {
    const probe = diskSpec(law);
    const model = buildInitialConditions(probe).massModel;
    const radii = [0.5, 0.75, 1, 1.5, 2, 2.5, 3, 4, 5].map((x) => x * DISK_RD);
    const analytic = radii.map((R) => Math.sqrt(R * modelAcceleration(probe.law, model, R)));
    const period = (2 * Math.PI * radii[radii.length - 1]) / analytic[analytic.length - 1] / myrToInternal(1);
    const sim = new Simulation({ ...probe, duration_Myr: period, snapshotEvery: 1000 });
    forceCurve(sim, radii).forEach((v, k) => expect(Math.abs(v / analytic[k] - 1)).toBeLessThan(0.05));
    while (!sim.done) sim.advance();
    forceCurve(sim, radii).forEach((v, k) => expect(Math.abs(v / analytic[k] - 1)).toBeLessThan(0.05));
  }, 300_000);
});

describe('the field the velocities are balanced in', () => {
  test("the softened field of a Plummer sphere equals the engine's softened pair sum over 400,000 particles drawn from it (within 1.5%, the sampling noise), and not a Plummer field of scale sqrt(a^2 + eps^2), which pulls up to a third harder inside a (measured)", () => {
    const eps = 0.5, N = 400_000;
    const field = softenedSphericalModel(plummerProfile({ mass_Msun: M, scale_kpc: A }), eps);
    const rng = seedRng(9);
    const src = { x: new Float64Array(N), y: new Float64Array(N), z: new Float64Array(N), m: new Float64Array(N).fill(M / N) };
    for (let i = 0; i < N; i++) {
      const X = uniform(rng) * 0.999; // the model's 99.9% cut
      const r = A / Math.sqrt(X ** (-2 / 3) - 1);
      const [u, v, w] = isotropicDirection(rng);
      src.x[i] = r * u; src.y[i] = r * v; src.z[i] = r * w;
    }
    const radii = [0.5, 1, 2, 4];
    const dirs = [[1, 0, 0], [0, 1, 0], [0, 0, 1], [-1, 0, 0], [0, -1, 0], [0, 0, -1]];
    const probes = { x: new Float64Array(radii.length * 6), y: new Float64Array(radii.length * 6), z: new Float64Array(radii.length * 6) };
    radii.forEach((R, k) => dirs.forEach(([a, b, c], j) => { probes.x[6 * k + j] = R * a; probes.y[6 * k + j] = R * b; probes.z[6 * k + j] = R * c; }));
    const acc = allocateAccelerations(probes.x.length);
    makeSolver({ kind: 'direct' }).field(src, probes, newtonKernel(eps), acc);
    radii.forEach((R, k) => {
      let inward = 0;
      for (let j = 6 * k; j < 6 * k + 6; j++) inward -= (acc.ax[j] * probes.x[j] + acc.ay[j] * probes.y[j] + acc.az[j] * probes.z[j]) / R / 6;
      expect(Math.abs(field.newtonAccel(R) / inward - 1)).toBeLessThan(0.015);
    });
    const naive = (R: number) => (G * M * R) / (R * R + A * A + eps * eps) ** 1.5;
    expect(field.newtonAccel(0.5) / naive(0.5)).toBeLessThan(0.8);
  });

  test('positions do not depend on the law the velocities are balanced for; velocities do (spheres, disks with bulge, encounters)', () => {
    const models = [
      { kind: 'plummer', n: 500, mass_Msun: M, scale_kpc: A },
      { kind: 'hernquist', n: 500, mass_Msun: M, scale_kpc: A },
      { kind: 'disk', n: 600, mass_Msun: 3e10, scaleLength_kpc: 3, scaleHeight_kpc: 0.3, bulge: { mass_Msun: 5e9, scale_kpc: 0.6 } },
      { kind: 'encounter', primary: { kind: 'plummer', n: 300, mass_Msun: M, scale_kpc: A }, secondary: { kind: 'hernquist', n: 200, mass_Msun: M / 2, scale_kpc: 1 }, pericentre_kpc: 10, initialSeparation_kpc: 40 },
    ];
    for (const model of models) {
      const under = (law: Record<string, unknown>) => buildInitialConditions(specWith({ model, law, softening_kpc: 0.1 })).particles;
      const newton = under({ kind: 'newton' }), mond = under({ kind: 'mond' });
      for (const axis of ['x', 'y', 'z'] as const) expect(Buffer.from(mond[axis].buffer).equals(Buffer.from(newton[axis].buffer))).toBe(true);
      expect(Buffer.from(mond.vx.buffer).equals(Buffer.from(newton.vx.buffer))).toBe(false);
    }
  });

  test('under MOND a sphere balanced for MOND is hotter than one balanced for Newton, and the Newton-balanced one starts out of equilibrium under MOND', () => {
    const mond = sphereSpec(LAWS[2], 4000);
    const forNewton = { ...mond, model: { ...mond.model, equilibriumLaw: { kind: 'newton' as const } } } as RunSpec;
    const k = (s: RunSpec) => {
      const p = buildInitialConditions(s).particles;
      let sum = 0;
      for (let i = 0; i < p.n; i++) sum += p.m[i] * (p.vx[i] ** 2 + p.vy[i] ** 2 + p.vz[i] ** 2);
      return sum;
    };
    expect(k(mond)).toBeGreaterThan(1.2 * k(forNewton));
    expect(initialClausius(forNewton)).toBeLessThan(0.9);
  });
});

describe('spec versions and the run record', () => {
  const v1 = {
    version: 1,
    model: { kind: 'plummer', n: 300, mass_Msun: M, scale_kpc: A },
    law: { kind: 'mond' },
    timestep_Myr: 1,
    duration_Myr: 2,
    softening_kpc: 0.1,
    snapshotEvery: 1,
  };

  test('a version-1 spec still parses and runs; its sphere is balanced for Newton, as version 1 meant, and the run says so', () => {
    const parsed = parseRunSpec(v1);
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.issues));
    const r = runSimulation(parsed.spec);
    expect(r.summary.equilibrium.balancedFor).toEqual([{ system: 'plummer', law: 'newton', label: 'Newtonian', ownLaw: false }]);
    expect(r.summary.equilibrium.ownLaw).toBe(false);
    expect(r.summary.equilibrium.initialClausiusRatio).toBe(r.diagnostics[0].clausiusVirialRatio);
  });

  test('version 2: a sphere is balanced for the run\'s own law unless equilibriumLaw says otherwise; an encounter is recorded per system', () => {
    const own = runSimulation(specWith({ ...v1, version: 2 }));
    expect(own.summary.equilibrium.ownLaw).toBe(true);
    expect(own.summary.equilibrium.balancedFor[0].law).toBe('mond');
    const enc = runSimulation(
      specWith({
        ...v1,
        version: 2,
        model: { kind: 'encounter', primary: { kind: 'plummer', n: 150, mass_Msun: M, scale_kpc: A }, secondary: { kind: 'plummer', n: 150, mass_Msun: M, scale_kpc: A, equilibriumLaw: { kind: 'newton' } }, pericentre_kpc: 10, initialSeparation_kpc: 40 },
      }),
    );
    expect(enc.summary.equilibrium.balancedFor.map((s) => [s.system, s.law, s.ownLaw])).toEqual([['primary', 'mond', true], ['secondary', 'newton', false]]);
    expect(enc.summary.equilibrium.ownLaw).toBe(false);
  });

  test('precheck says when a system is balanced for another law than the run\'s', () => {
    const parsed = parseRunSpec(v1);
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.issues));
    const note = precheck(parsed.spec).warnings.find((w) => w.code === 'set-up-for-another-law');
    expect(note?.message).toContain('plummer velocities balance Newtonian');
    expect(precheck(specWith({ ...v1, version: 2 })).warnings.map((w) => w.code)).not.toContain('set-up-for-another-law');
  });

  test('a version outside 1 to 3 is refused, naming the field', () => {
    const r = parseRunSpec({ ...v1, version: 4 });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.issues[0].path).toBe('version');
  });
});
