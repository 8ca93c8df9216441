import { analyticCurves, buildInitialConditions, runSimulation } from '../../shared/engine';
import { centreOfMass } from '../../shared/engine/state';
import { G } from '../../shared/engine/units';
import { specWith } from './helpers';

describe('encounter of two systems on a parabolic orbit', () => {
  const model = {
    kind: 'encounter',
    primary: { kind: 'disk', n: 400, mass_Msun: 4e10, scaleLength_kpc: 2.5, scaleHeight_kpc: 0.25, bulge: { mass_Msun: 1e10, scale_kpc: 0.5 } },
    secondary: { kind: 'plummer', n: 200, mass_Msun: 1e10, scale_kpc: 1 },
    pericentre_kpc: 10,
    initialSeparation_kpc: 60,
    primaryTilt_deg: 30,
  };
  const ic = buildInitialConditions(specWith({ model, softening_kpc: 0.2 }));
  const part = (start: number, count: number) => {
    const p = ic.particles;
    const view = (a: Float64Array) => a.subarray(start, start + count);
    return centreOfMass({ ...p, n: count, x: view(p.x), y: view(p.y), z: view(p.z), vx: view(p.vx), vy: view(p.vy), vz: view(p.vz), m: view(p.m) });
  };

  test('the centres start the given distance apart with the parabolic relative speed sqrt(2 G M / d) (energy zero for point masses; to 1e-9)', () => {
    const a = part(0, 400), b = part(400, 200);
    const d = Math.hypot(b.x - a.x, b.y - a.y, b.z - a.z);
    const v = Math.hypot(b.vx - a.vx, b.vy - a.vy, b.vz - a.vz);
    expect(d / 60 - 1).toBeCloseTo(0, 9);
    expect(v / Math.sqrt((2 * G * 6e10) / 60) - 1).toBeCloseTo(0, 9);
  });

  test('the secondary is approaching, with the angular momentum of a parabola of pericentre q: |r x v| = sqrt(2 G M q)', () => {
    const a = part(0, 400), b = part(400, 200);
    const [rx, ry, vx, vy] = [b.x - a.x, b.y - a.y, b.vx - a.vx, b.vy - a.vy];
    expect(rx * vx + ry * vy).toBeLessThan(0);
    expect(Math.abs(rx * vy - ry * vx) / Math.sqrt(2 * G * 6e10 * 10) - 1).toBeLessThan(1e-9);
  });

  test('the whole system sits in its centre-of-mass frame and names its parts', () => {
    const c = centreOfMass(ic.particles);
    expect(Math.hypot(c.x, c.y, c.z)).toBeLessThan(1e-9);
    expect(ic.components.map((k) => k.label)).toEqual(['primary disk', 'primary bulge', 'secondary Plummer sphere']);
  });

  test('runs, and its analytic curves describe the primary', () => {
    const spec = specWith({ model, softening_kpc: 0.2, timestep_Myr: 1, duration_Myr: 3, snapshotEvery: 1 });
    const r = runSimulation(spec, { maxSnapshotParticles: 100 });
    expect(r.summary.stepsCompleted).toBe(3);
    expect(r.snapshotParticles.some((i) => i >= 400)).toBe(true); // both systems are in the animation subset
    const primaryOnly = analyticCurves(specWith({ model: model.primary, softening_kpc: 0.2 })).curves[0].v_km_s;
    expect(analyticCurves(spec).curves[0].v_km_s).toEqual(primaryOnly);
  });
});

describe('uploaded particle table', () => {
  const rows = Array.from({ length: 50 }, (_, i) => ({
    x_kpc: Math.cos(i) * (1 + i / 10) + 5, y_kpc: Math.sin(i) * (1 + i / 10), z_kpc: 0.1 * Math.sin(3 * i),
    vx_km_s: 100, vy_km_s: 0, vz_km_s: 0, mass_Msun: 1e8 * (1 + (i % 3)),
  }));

  test('is moved to its centre-of-mass frame unless told not to', () => {
    const moved = buildInitialConditions(specWith({ model: { kind: 'table', particles: rows } })).particles;
    const kept = buildInitialConditions(specWith({ model: { kind: 'table', particles: rows, recentre: false } })).particles;
    const c = centreOfMass(moved);
    expect(Math.hypot(c.x, c.y, c.z, c.vx, c.vy, c.vz)).toBeLessThan(1e-9);
    expect(kept.x[0]).toBe(rows[0].x_kpc);
  });

  test('its analytic curve is that of its own mass profile, Keplerian beyond the outermost particle (to 1e-9)', () => {
    const M = rows.reduce((s, r) => s + r.mass_Msun, 0);
    const v = analyticCurves(specWith({ model: { kind: 'table', particles: rows } }), { radii_kpc: [50, 100] }).curves[0].v_km_s;
    [50, 100].forEach((R, k) => expect(v[k] / Math.sqrt((G * M) / R) - 1).toBeCloseTo(0, 9));
  });

  test('rows beyond the limit are refused', () => {
    const r = specWith.bind(null, { model: { kind: 'table', particles: Array.from({ length: 20_001 }, () => rows[0]) } });
    expect(r).toThrow(/model\.particles/);
  });
});
