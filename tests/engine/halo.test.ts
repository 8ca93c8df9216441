import { buildInitialConditions } from '../../shared/engine';
import { densityCentre } from '../../shared/engine/centre';
import { sampleDiagnostics } from '../../shared/engine/diagnostics';
import { nfwProfile } from '../../shared/engine/models/halo';
import { Simulation } from '../../shared/engine/simulation';
import { myrToInternal } from '../../shared/engine/units';
import { LIMITS, parseRunSpec, particleCount } from '../../shared/spec';
import { specWith } from './helpers';

const RS = 20; // halo scale radius, kpc
const nfw = { profile: 'nfw', n: 20_000, mass_Msun: 1e12, scale_kpc: RS } as const;

describe('the NFW halo profile with its exponential cut-off', () => {
  const p = nfwProfile({ mass_Msun: 1e12, scale_kpc: RS });
  const rc = 10 * RS; // the default cut-off radius, concentration 10
  const rho = (r: number) => p.enclosedMassSlope(r) / (4 * Math.PI * r * r);

  test('inside the cut-off it is NFW, rho ~ 1/(x (1 + x)^2) (Navarro, Frenk & White 1996; to rounding)', () => {
    const nfwShape = (x: number) => 1 / (x * (1 + x) ** 2);
    for (const x of [0.1, 1, 3, 9]) expect(rho(x * RS) / rho(RS) / (nfwShape(x) / nfwShape(1))).toBeCloseTo(1, 10);
  });

  test('density and its logarithmic slope are continuous at the cut-off (slope within 1e-3 across it), and the mass adds up to mass_Msun', () => {
    const h = 1e-6 * rc;
    expect(rho(rc + h) / rho(rc - h)).toBeCloseTo(1, 4);
    const slope = (r: number) => (Math.log(rho(r * (1 + 1e-7))) - Math.log(rho(r * (1 - 1e-7)))) / 2e-7;
    // Across 2e-5 in ln r the tail's own slope, e - r/r_d, changes by only 2e-4.
    expect(Math.abs(slope(rc * (1 + 1e-5)) - slope(rc * (1 - 1e-5)))).toBeLessThan(1e-3);
    // NFW log slope at x = c is -(1 + 3c)/(1 + c) = -31/11 for c = 10.
    expect(slope(rc * (1 - 1e-3))).toBeCloseTo(-31 / 11, 2);
    expect(p.enclosedMass(p.outerRadius_kpc)).toBe(1e12);
    expect(rho(0.999 * p.outerRadius_kpc) / rho(rc)).toBeLessThan(1e-4);
  });
});

describe('a live dark halo', () => {
  test('its particles come after the system\'s own, labelled "halo", each of mass mass_Msun / n; the run counts them', () => {
    const spec = specWith({ model: { kind: 'hernquist', n: 300, mass_Msun: 1e10, scale_kpc: 2, halo: { ...nfw, n: 700 } }, softening_kpc: 0.5 });
    const ic = buildInitialConditions(spec);
    expect(particleCount(spec)).toBe(1000);
    expect(ic.particles.n).toBe(1000);
    expect(ic.components).toEqual([
      { label: 'Hernquist sphere', start: 0, count: 300 },
      { label: 'halo', start: 300, count: 700 },
    ]);
    expect(ic.particles.m[300]).toBeCloseTo(1e12 / 700, 0);
    expect(ic.massModel.totalMass_Msun).toBeCloseTo(1e10 + 1e12, -3);
  });

  test('the baryons sit at the same places with or without the halo (same seed): the halo is drawn after them', () => {
    const disk = { kind: 'disk', n: 1000, mass_Msun: 3e10, scaleLength_kpc: 3, scaleHeight_kpc: 0.5, bulge: { mass_Msun: 1e10, scale_kpc: 0.6 } };
    const bare = buildInitialConditions(specWith({ model: disk, softening_kpc: 0.4, seed: 9 })).particles;
    const withHalo = buildInitialConditions(specWith({ model: { ...disk, halo: { ...nfw, n: 2000 } }, softening_kpc: 0.4, seed: 9 })).particles;
    // Each system is moved to its own centre-of-mass frame, so compare positions relative to particle 0.
    for (const i of [1, 500, 999]) {
      expect(withHalo.x[i] - withHalo.x[0]).toBeCloseTo(bare.x[i] - bare.x[0], 9);
      expect(withHalo.z[i] - withHalo.z[0]).toBeCloseTo(bare.z[i] - bare.z[0], 9);
    }
  });

  test('too many particles, or a cut-off inside the model, are refused naming the halo field', () => {
    const base = { ...specWith({}), model: { kind: 'plummer', n: 1000, mass_Msun: 1e10, scale_kpc: 1, halo: { ...nfw, n: LIMITS.maxParticles } } };
    const many = parseRunSpec(base);
    expect(many.ok).toBe(false);
    if (!many.ok) expect(many.issues.map((i) => i.path)).toContain('model.halo.n');
    const cut = parseRunSpec({ ...base, model: { ...base.model, halo: { ...nfw, truncationRadius_kpc: 0.001 } } });
    expect(cut.ok).toBe(false);
    if (!cut.ok) expect(cut.issues.map((i) => i.path)).toContain('model.halo.truncationRadius_kpc');
  });

  // Virial theorem 2K + sum m r . a = 0 for a steady state (Binney & Tremaine 2008, sec. 4.8.3).
  // Tolerance 3% (the requirement). Without the halo the same disk measures 1.04: its own
  // asymmetric-drift set-up runs a few per cent hot (measured), the halo dominates the sum here.
  test('disk + bulge + live NFW halo under Newton: Clausius ratio within 3% of 1 at t = 0', () => {
    const spec = specWith({
      model: { kind: 'disk', n: 4000, mass_Msun: 3e10, scaleLength_kpc: 3, scaleHeight_kpc: 0.5, toomreQ: 2, bulge: { mass_Msun: 1e10, scale_kpc: 0.6 }, halo: { profile: 'nfw', n: 20_000, mass_Msun: 3e11, scale_kpc: 15 } },
      law: { kind: 'newton' },
      solver: { kind: 'tree', theta: 0.6 },
      softening_kpc: 0.4,
      seed: 5,
    });
    const sim = new Simulation(spec);
    expect(Math.abs(sampleDiagnostics(sim.particles, sim.law, 0, 0, null, null).sample.clausiusVirialRatio - 1)).toBeLessThan(0.03);
  }, 120_000);

  // The halo's mass in three radial bins, 0.2-0.7, 0.7-2 and 2-5 r_s, about the density centre,
  // stays within 5% (the requirement) over 10 crossing times at the scale radius, r_s / v_c(r_s).
  // Bins are as wide as the noise asks: the innermost holds about 1,160 of the 20,000 particles
  // (3% Poisson noise), the others 3,500 and 5,800; each count is averaged over the first and
  // the last 5 samples (about one crossing time each). Measured: -0.1%, +1.0%, +1.3%. The halo surrounds a small Hernquist
  // sphere (1% of the mass). Softening r_s/40; 10 Myr steps give about 25 per orbit at 0.2 r_s;
  // opening angle 0.8 (forces within about 1%, common practice).
  test('an NFW halo of 20,000 particles keeps its density within 5% from 0.2 to 5 scale radii over 10 crossing times (tree solver)', () => {
    const probe = specWith({
      model: { kind: 'hernquist', n: 500, mass_Msun: 1e10, scale_kpc: 2, halo: nfw },
      law: { kind: 'newton' },
      solver: { kind: 'tree', theta: 0.8 },
      softening_kpc: RS / 40,
      timestep_Myr: 10,
      seed: 5,
    });
    const model = buildInitialConditions(probe).massModel;
    const tCross = RS / Math.sqrt(RS * model.newtonAccel(RS)) / myrToInternal(1);
    const spec = { ...probe, duration_Myr: 10 * tCross, snapshotEvery: 1000, diagnosticsEvery: 1000 };
    const sim = new Simulation(spec);
    const edges = [0.2, 0.7, 2, 5].map((x) => x * RS);
    const start = 500;
    const counts = (): number[] => {
      const p = sim.particles;
      const c = densityCentre(p);
      const out = [0, 0, 0];
      for (let i = start; i < p.n; i++) {
        const r = Math.hypot(p.x[i] - c.x, p.y[i] - c.y, p.z[i] - c.z);
        for (let b = 0; b < 3; b++) if (r >= edges[b] && r < edges[b + 1]) out[b]++;
      }
      return out;
    };
    const every = Math.max(1, Math.round(tCross / 5 / spec.timestep_Myr));
    const samples = [counts()];
    while (!sim.done) {
      sim.advance();
      if (sim.state.step % every === 0) samples.push(counts());
    }
    const mean = (rows: number[][]) => [0, 1, 2].map((b) => rows.reduce((s, r) => s + r[b], 0) / rows.length);
    const before = mean(samples.slice(0, 5)), after = mean(samples.slice(-5));
    expect(before[0]).toBeGreaterThan(1000); // the noise estimate above holds
    after.forEach((n, b) => expect(Math.abs(n / before[b] - 1)).toBeLessThan(0.05));
  }, 600_000);
});
