import { besseli, besselk } from 'bessel';
import { analyticCurves, buildInitialConditions, runSimulation } from '../../shared/engine';
import { i0e, i1e, k0e, k1e } from '../../shared/engine/special';
import { sampleDiagnostics } from '../../shared/engine/diagnostics';
import { Simulation } from '../../shared/engine/simulation';
import { G } from '../../shared/engine/units';
import { defaultRunSpec, parseRunSpec } from '../../shared/spec';
import { quantile, specWith } from './helpers';

const RD = 3, Z0 = 0.3, MD = 5e10;
const diskModel = (extra: Record<string, unknown> = {}) => ({ kind: 'disk', n: 3000, mass_Msun: MD, scaleLength_kpc: RD, scaleHeight_kpc: Z0, toomreQ: 1.5, ...extra });

/** Freeman (1970) razor-thin exponential disk: v^2 = 4 pi G Sigma0 R_d y^2 [I0 K0 - I1 K1](y), y = R / 2R_d, with the bessel package. */
function freemanV2(R: number): number {
  const y = R / (2 * RD);
  const sigma0 = MD / (2 * Math.PI * RD * RD);
  return 4 * Math.PI * G * sigma0 * RD * y * y * (besseli(y, 0) * besselk(y, 0) - besseli(y, 1) * besselk(y, 1));
}

/** Trapezoid sums of the integral representations (Abramowitz & Stegun 9.6.19, 9.6.24): spectrally accurate for these smooth integrands. */
const integralI = (x: number, n: number) => {
  const N = 2000;
  let s = 0;
  for (let k = 0; k <= N; k++) s += (k === 0 || k === N ? 0.5 : 1) * Math.exp(x * Math.cos((Math.PI * k) / N)) * Math.cos((n * Math.PI * k) / N);
  return s / N;
};
const integralK = (x: number, n: number) => {
  const N = 4000, T = 12;
  let s = 0;
  for (let k = 0; k <= N; k++) s += (k === 0 || k === N ? 0.5 : 1) * Math.exp(-x * Math.cosh((T * k) / N)) * Math.cosh((n * T * k) / N);
  return (s * T) / N;
};

describe('modified Bessel functions used for the disk', () => {
  const xs = [0.05, 0.4, 1, 1.9, 2.1, 3.7, 3.8, 6, 15];
  test('agree with the bessel package (to 1e-9 relative)', () => {
    for (const x of xs) {
      expect(Math.abs(i0e(x) / (besseli(x, 0) * Math.exp(-x)) - 1)).toBeLessThan(1e-9);
      expect(Math.abs(i1e(x) / (besseli(x, 1) * Math.exp(-x)) - 1)).toBeLessThan(1e-9);
      expect(Math.abs(k0e(x) / (besselk(x, 0) * Math.exp(x)) - 1)).toBeLessThan(1e-9);
      expect(Math.abs(k1e(x) / (besselk(x, 1) * Math.exp(x)) - 1)).toBeLessThan(1e-9);
    }
  });

  test('agree with the integral representations, an independent route (to 1e-6 relative, the stated accuracy of the polynomial fits)', () => {
    for (const x of xs) {
      expect(Math.abs(i0e(x) / (integralI(x, 0) * Math.exp(-x)) - 1)).toBeLessThan(1e-6);
      expect(Math.abs(i1e(x) / (integralI(x, 1) * Math.exp(-x)) - 1)).toBeLessThan(1e-6);
      expect(Math.abs(k0e(x) / (integralK(x, 0) * Math.exp(x)) - 1)).toBeLessThan(1e-6);
      expect(Math.abs(k1e(x) / (integralK(x, 1) * Math.exp(x)) - 1)).toBeLessThan(1e-6);
    }
  });
});

describe('exponential disk (Freeman 1970)', () => {
  test('the circular-speed curve, computed with the bessel package, peaks at R = 2.15 R_d (Freeman 1970; Binney & Tremaine 2008 sec. 2.6; within 0.01 R_d)', () => {
    let best = 0, bestV2 = -Infinity;
    for (let x = 1.5; x <= 3; x += 1e-4) {
      const v2 = freemanV2(x * RD);
      if (v2 > bestV2) [best, bestV2] = [x, v2];
    }
    expect(Math.abs(best - 2.15)).toBeLessThan(0.01);
  });

  test("the engine's disk model, made thin and unsoftened, tends to the bessel-package curve (within 1% from 0.3 to 6 R_d: quadrature, a layer of 0.001 R_d and the 10 R_d cut) and peaks at 2.15 R_d (within 0.03 R_d)", () => {
    const spec = specWith({ model: diskModel({ scaleHeight_kpc: 1e-3 * RD }), law: { kind: 'newton' }, softening_kpc: 0 });
    const radii = Array.from({ length: 58 }, (_, k) => RD * (0.3 + 0.1 * k));
    const v = analyticCurves(spec, { radii_kpc: radii }).curves[0].v_km_s;
    radii.forEach((R, k) => expect(Math.abs(v[k] ** 2 / freemanV2(R) - 1)).toBeLessThan(0.01));
    const fine = Array.from({ length: 101 }, (_, k) => RD * (1.7 + 0.01 * k));
    const vf = analyticCurves(spec, { radii_kpc: fine }).curves[0].v_km_s;
    expect(Math.abs(fine[vf.indexOf(Math.max(...vf))] / RD - 2.15)).toBeLessThan(0.03);
  });

  test('thickness and softening weaken the midplane pull most near the centre (a thick softened disk is below the thin curve inside 2 R_d and within 2% of it at 5 R_d)', () => {
    const spec = specWith({ model: diskModel(), law: { kind: 'newton' }, softening_kpc: 0.2 });
    const radii = [0.5, 1, 2, 5].map((x) => x * RD);
    const v = analyticCurves(spec, { radii_kpc: radii }).curves[0].v_km_s;
    const ratio = radii.map((R, k) => v[k] ** 2 / freemanV2(R));
    expect(ratio[0]).toBeLessThan(ratio[1]);
    expect(ratio[1]).toBeLessThan(1);
    expect(ratio[2]).toBeLessThan(1);
    expect(Math.abs(ratio[3] - 1)).toBeLessThan(0.02);
  });

  const big = buildInitialConditions(specWith({ model: diskModel({ n: 20_000 }), law: { kind: 'newton' }, softening_kpc: 0.2 })).particles;

  test('particles follow the exponential: cylindrical half-mass radius 1.678 R_d (root of 1 - (1 + x) e^-x = 1/2; within 3%)', () => {
    let lo = 0, hi = 10;
    for (let it = 0; it < 60; it++) {
      const mid = 0.5 * (lo + hi);
      if (1 - (1 + mid) * Math.exp(-mid) < 0.5) lo = mid;
      else hi = mid;
    }
    const R50 = quantile(Array.from(big.x, (x, i) => Math.hypot(x, big.y[i])), 0.5);
    expect(Math.abs(R50 / (lo * RD) - 1)).toBeLessThan(0.03);
  });

  test('and the sech^2 vertical profile: median |z| = z0 atanh(1/2) (within 3%)', () => {
    const medianZ = quantile(Array.from(big.z, Math.abs), 0.5);
    expect(Math.abs(medianZ / (Z0 * Math.atanh(0.5)) - 1)).toBeLessThan(0.03);
  });

  test('Toomre Q measured at t = 0 from the particles is near the requested 1.5 inside 2.5 R_d (Toomre 1964; median of bins within 20%, our tolerance for 3000 particles and a softened, thick disk)', () => {
    const r = runSimulation(specWith({ model: diskModel(), law: { kind: 'newton' }, softening_kpc: 0.3, timestep_Myr: 1, duration_Myr: 1, snapshotEvery: 1 }));
    const q = r.diagnostics[0].toomreQ!;
    const inner = q.q.filter((v, k): v is number => v !== null && q.radius_kpc[k] < 2.5 * RD);
    expect(inner.length).toBeGreaterThanOrEqual(3);
    expect(Math.abs(quantile(inner, 0.5) / 1.5 - 1)).toBeLessThan(0.2);
  });

  test('the circular speed sampled from particle forces follows the analytic (thick, softened) curve between 1 and 4 R_d (mean ratio within 3%, each bin within 12%: graininess of 3000 particles; our tolerances)', () => {
    const r = runSimulation(specWith({ model: diskModel(), law: { kind: 'newton' }, softening_kpc: 0.3, timestep_Myr: 1, duration_Myr: 1, snapshotEvery: 1 }));
    const { radii_kpc, circular_km_s } = r.rotationCurves.initial;
    const analytic = r.rotationCurves.analytic.curves[0].v_km_s;
    const ratios = radii_kpc.flatMap((R, k) => (R >= RD && R <= 4 * RD ? [circular_km_s[k] / analytic[k]] : []));
    expect(ratios.length).toBeGreaterThan(10);
    for (const q of ratios) expect(Math.abs(q - 1)).toBeLessThan(0.12);
    expect(Math.abs(ratios.reduce((a, b) => a + b, 0) / ratios.length - 1)).toBeLessThan(0.03);
  });

  test('velocities balance the chosen law: a MOND disk rotates faster than a Newtonian one, unless both are set up for the same equilibrium law (then particles are bit-identical)', () => {
    const meanVphi = (p: ReturnType<typeof buildInitialConditions>['particles']) => {
      let s = 0, c = 0;
      for (let i = 0; i < p.n; i++) {
        const R = Math.hypot(p.x[i], p.y[i]);
        if (R > 3 * RD && R < 5 * RD) {
          s += (p.x[i] * p.vy[i] - p.y[i] * p.vx[i]) / R;
          c++;
        }
      }
      return s / c;
    };
    const mond = { kind: 'mond', interpolation: 'simple', a0_m_s2: 1.2e-10 };
    const newtonDisk = buildInitialConditions(specWith({ model: diskModel(), law: { kind: 'newton' }, softening_kpc: 0.3 })).particles;
    const mondDisk = buildInitialConditions(specWith({ model: diskModel(), law: mond, softening_kpc: 0.3 })).particles;
    expect(meanVphi(mondDisk)).toBeGreaterThan(1.1 * meanVphi(newtonDisk));
    const shared = buildInitialConditions(specWith({ model: diskModel({ equilibriumLaw: { kind: 'newton' } }), law: mond, softening_kpc: 0.3 })).particles;
    expect(Buffer.from(shared.vx.buffer).equals(Buffer.from(newtonDisk.vx.buffer))).toBe(true);
    expect(Buffer.from(shared.x.buffer).equals(Buffer.from(newtonDisk.x.buffer))).toBe(true);
  });

  test('a bulge takes its share of particles and the masses add up exactly', () => {
    const spec = specWith({ model: diskModel({ n: 1000, bulge: { mass_Msun: 1e10, scale_kpc: 0.5 } }), law: { kind: 'newton' }, softening_kpc: 0.2 });
    const ic = buildInitialConditions(spec);
    expect(ic.components.map((c) => [c.label, c.count])).toEqual([['disk', 833], ['bulge', 167]]);
    const total = ic.particles.m.reduce((a, b) => a + b, 0);
    expect(Math.abs(total / (MD + 1e10) - 1)).toBeLessThan(1e-12);
  });
});

describe('a gas disk beside the stars', () => {
  const RG = 6, ZG = 0.15, MG = 2e10;
  const gasModel = (extra: Record<string, unknown> = {}) =>
    diskModel({ n: 20_000, bulge: { mass_Msun: 1e10, scale_kpc: 0.5 }, gas: { mass_Msun: MG, scaleLength_kpc: RG, scaleHeight_kpc: ZG }, ...extra });
  const spec = specWith({ model: gasModel(), law: { kind: 'newton' }, solver: { kind: 'tree', theta: 0.6 }, softening_kpc: 0.2 });
  const ic = buildInitialConditions(spec);
  const part = (label: string) => ic.components.find((c) => c.label === label)!;
  const indices = (label: string) => Array.from({ length: part(label).count }, (_, k) => part(label).start + k);

  test('the gas is a part of its own after the bulge, with its share of particles; the masses add up exactly', () => {
    expect(ic.components.map((c) => c.label)).toEqual(['disk', 'bulge', 'gas']);
    // Shared out in proportion to mass: 20,000 x 2e10 / 8e10 = 5,000 gas particles.
    expect(part('gas').count).toBe(5000);
    const mass = (label: string) => indices(label).reduce((s, i) => s + ic.particles.m[i], 0);
    expect(Math.abs(mass('gas') / MG - 1)).toBeLessThan(1e-12);
    expect(Math.abs(mass('disk') / MD - 1)).toBeLessThan(1e-12);
  });

  test('gas particles follow their own exponential (half-mass radius 1.678 R_gas, within 3%) and sech^2 layer (median |z| = z0 atanh(1/2), within 4%)', () => {
    const gas = indices('gas');
    const R50 = quantile(gas.map((i) => Math.hypot(ic.particles.x[i], ic.particles.y[i])), 0.5);
    // The root of 1 - (1 + x) e^-x = 1/2 is 1.6783 (as for the stellar disk above).
    expect(Math.abs(R50 / (1.6783 * RG) - 1)).toBeLessThan(0.03);
    const medianZ = quantile(gas.map((i) => Math.abs(ic.particles.z[i])), 0.5);
    expect(Math.abs(medianZ / (ZG * Math.atanh(0.5)) - 1)).toBeLessThan(0.04);
  });

  test('the thinner gas layer is vertically colder than the stars at the same radii (vertical Jeans equation: sigma_z^2 grows with the layer\'s thickness, Spitzer 1942)', () => {
    const sigmaZ = (label: string) => {
      const sel = indices(label).filter((i) => {
        const R = Math.hypot(ic.particles.x[i], ic.particles.y[i]);
        return R > RD && R < 2 * RD;
      });
      return Math.sqrt(sel.reduce((s, i) => s + ic.particles.vz[i] ** 2, 0) / sel.length);
    };
    expect(sigmaZ('gas')).toBeLessThan(0.8 * sigmaZ('disk'));
  });

  test('the whole galaxy, gas included, starts in virial balance: Clausius ratio 2K/|sum m r.a| within 3% of 1 (Binney & Tremaine 2008 sec. 4.8.3)', () => {
    const sim = new Simulation(spec);
    const ratio = sampleDiagnostics(sim.particles, sim.law, 0, 0, null, null).sample.clausiusVirialRatio;
    expect(Math.abs(ratio - 1)).toBeLessThan(0.03);
  });

  test('the analytic curve adds the gas disk: the model with gas pulls by exactly the gas layer\'s own curve more (v^2 adds, to 1e-9)', () => {
    const radii = [0.5, 1, 2, 4, 8].map((x) => x * RD);
    const curve = (model: Record<string, unknown>) => analyticCurves(specWith({ model, law: { kind: 'newton' }, softening_kpc: 0.2 }), { radii_kpc: radii }).curves[0].v_km_s;
    const withGas = curve(gasModel()), without = curve(gasModel({ gas: undefined }));
    const gasAlone = curve(diskModel({ mass_Msun: MG, scaleLength_kpc: RG, scaleHeight_kpc: ZG }));
    radii.forEach((_R, k) => expect(Math.abs(withGas[k] ** 2 / (without[k] ** 2 + gasAlone[k] ** 2) - 1)).toBeLessThan(1e-9));
  });

  test('a disk with bulge and gas needs a particle for each part', () => {
    const r = parseRunSpec({ ...defaultRunSpec(), model: gasModel({ n: 2 }) });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.issues.map((i) => i.path)).toContain('model.n');
  });
});
