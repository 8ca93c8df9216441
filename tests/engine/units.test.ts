import { G, TIME_UNIT_MYR, accelFromSI } from '../../shared/engine/units';

describe('unit system (kpc, km/s, Msun)', () => {
  test('G derived from CODATA 2018 G, the IAU 2015 nominal solar mass parameter and the IAU parsec matches the commonly quoted 4.30091e-6 kpc (km/s)^2/Msun', () => {
    // 4.30091e-6 is the value usually quoted (from memory); agreement to 1e-5 relative.
    expect(Math.abs(G / 4.30091e-6 - 1)).toBeLessThan(1e-5);
  });

  test('one time unit kpc/(km/s) is 977.79 Myr (Julian years; commonly quoted, from memory)', () => {
    expect(TIME_UNIT_MYR).toBeCloseTo(977.79, 1);
  });

  test('a0 = 1.2e-10 m/s^2 is about 3703 (km/s)^2/kpc: 1e6 / 3.0857e19 m/s^2 per unit', () => {
    expect(accelFromSI(1.2e-10)).toBeGreaterThan(3700);
    expect(accelFromSI(1.2e-10)).toBeLessThan(3706);
  });
});
