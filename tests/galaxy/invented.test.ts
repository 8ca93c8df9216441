// Invented galaxies are built from published profiles; check the profiles before trusting fits to them.
import { besseli, besselk } from 'bessel';
import { G } from '../../shared/engine/units';
import { exponentialDiskSpeed, hernquistSpeed, inventedCurve } from '../../shared/galaxy/invented';

describe('invented galaxy components', () => {
  const M = 3e10, Rd = 2.5;

  test('the exponential disk matches Freeman (1970) computed with the bessel package (1e-8 relative)', () => {
    const sigma0 = M / (2 * Math.PI * Rd * Rd);
    for (const R of [0.3, 1, 2.5, 5.4, 12, 25]) {
      const y = R / (2 * Rd);
      const v2 = 4 * Math.PI * G * sigma0 * Rd * y * y * (besseli(y, 0) * besselk(y, 0) - besseli(y, 1) * besselk(y, 1));
      expect(Math.abs(exponentialDiskSpeed(M, Rd, R) / Math.sqrt(v2) - 1)).toBeLessThan(1e-8);
    }
  });

  test('the disk curve peaks at R = 2.15 R_d (Freeman 1970; Binney & Tremaine 2008 sec. 2.6; within 0.01 R_d)', () => {
    let best = 0, vmax = 0;
    for (let x = 1.5; x <= 3; x += 0.001) {
      const v = exponentialDiskSpeed(M, Rd, x * Rd);
      if (v > vmax) [vmax, best] = [v, x];
    }
    expect(Math.abs(best - 2.15)).toBeLessThan(0.01);
  });

  test('the Hernquist (1990) bulge peaks at r = a with v^2 = G M / (4 a) (1e-12 relative)', () => {
    const a = 0.8;
    expect(hernquistSpeed(M, a, a) ** 2 / ((G * M) / (4 * a))).toBeCloseTo(1, 12);
    expect(hernquistSpeed(M, a, 0.99 * a)).toBeLessThan(hernquistSpeed(M, a, a));
    expect(hernquistSpeed(M, a, 1.01 * a)).toBeLessThan(hernquistSpeed(M, a, a));
  });

  test('the same seed gives the same observed curve; noise has the stated error (seeded; 400 points, rms within 10%)', () => {
    const R = Array.from({ length: 400 }, (_, i) => 0.1 + 0.05 * i);
    const make = (seed: number) => inventedCurve({ disk: { mass_Msun: M, scale_kpc: Rd } }, R, () => 100, () => 5, seed);
    expect(make(4).vObs).toEqual(make(4).vObs);
    expect(make(4).vObs).not.toEqual(make(5).vObs);
    const rms = Math.sqrt(make(4).vObs.reduce((s, v) => s + (v - 100) ** 2, 0) / R.length);
    expect(rms).toBeGreaterThan(4.5);
    expect(rms).toBeLessThan(5.5);
  });
});
