// The density centre (shrinking spheres, Power et al. 2003) and what is measured about it.
import { buildInitialConditions } from '../../shared/engine';
import { densityCentre, densityCentreCount } from '../../shared/engine/centre';
import { lagrangianRadii } from '../../shared/engine/diagnostics';
import { createLaw } from '../../shared/engine/laws/registry';
import { measureRotationCurve } from '../../shared/engine/rotationCurves';
import { directSolver } from '../../shared/engine/solvers/direct';
import { allocateParticles, centreOfMass, type ParticleState } from '../../shared/engine/state';
import { specWith } from './helpers';

const A = 1; // Hernquist scale radius, kpc

/**
 * A 4,000-particle Hernquist sphere made point-symmetric (2,000 particles and their mirror images, so
 * its cusp is exactly at the origin) plus 40 particles of the same mass parked 50 a away on one side.
 */
function cuspWithStragglers(): ParticleState {
  const half = buildInitialConditions(specWith({ model: { kind: 'hernquist', n: 2000, mass_Msun: 5e9, scale_kpc: A }, seed: 5 })).particles;
  const hx = half.x.slice(), hy = half.y.slice(), hz = half.z.slice();
  const core = allocateParticles(4000);
  for (let i = 0; i < 2000; i++) {
    core.x[i] = hx[i]; core.y[i] = hy[i]; core.z[i] = hz[i];
    core.x[i + 2000] = -hx[i]; core.y[i + 2000] = -hy[i]; core.z[i + 2000] = -hz[i];
    core.m[i] = core.m[i + 2000] = half.m[i];
  }
  const far = 40;
  const p = allocateParticles(core.n + far);
  for (const key of ['x', 'y', 'z', 'vx', 'vy', 'vz', 'm'] as const) p[key].set(core[key]);
  for (let k = 0; k < far; k++) {
    const i = core.n + k;
    p.x[i] = 50 * A + 0.1 * k;
    p.y[i] = 0.05 * k;
    p.m[i] = core.m[0];
  }
  return p;
}

describe('density centre by shrinking spheres (Power et al. 2003, from memory)', () => {
  test('a Hernquist sphere with 1% of its mass far away keeps its centre at the cusp (within 0.05 a, our tolerance) while the centre of mass moves about 0.5 a', () => {
    const p = cuspWithStragglers();
    const cm = centreOfMass(p);
    expect(cm.x).toBeGreaterThan(0.4 * A); // 40/4040 of the mass at 50 a: 0.5 a
    const c = densityCentre(p, p);
    expect(Math.hypot(c.x, c.y, c.z)).toBeLessThan(0.05 * A);
    // It ends on the stated number of particles: min(1000, 1% of N), but at least 100.
    expect(c.count).toBeGreaterThanOrEqual(densityCentreCount(p.n));
    expect(c.count).toBeLessThan(densityCentreCount(p.n) / 0.975 ** 3 + 5);
    // The centre's velocity is that of the core (the sampled sphere is at rest; the stragglers too).
    expect(Math.hypot(c.vx, c.vy, c.vz)).toBeLessThan(30);
  });

  test('Lagrangian radii about the density centre are those about the cusp (within 1%), not those about the centre of mass', () => {
    const p = cuspWithStragglers();
    const origin = { x: 0, y: 0, z: 0 };
    const fractions = [0.1, 0.5];
    const aboutCusp = lagrangianRadii(p, fractions, origin);
    const aboutDensityCentre = lagrangianRadii(p, fractions, densityCentre(p, p));
    const aboutMassCentre = lagrangianRadii(p, fractions);
    fractions.forEach((_, k) => expect(Math.abs(aboutDensityCentre[k] / aboutCusp[k] - 1)).toBeLessThan(0.01));
    expect(aboutMassCentre[0] / aboutCusp[0]).toBeGreaterThan(1.1); // 0.5 a off a cusp inflates the inner radius
  });

  test('finds the centre of a point-symmetric set to rounding, away from the origin', () => {
    const p = allocateParticles(2000);
    for (let i = 0; i < 1000; i++) {
      const r = 0.01 * (i + 1), phi = 2.399963 * i, z = ((i * 7) % 1000) / 500 - 1;
      const s = Math.sqrt(1 - z * z);
      p.x[i] = r * s * Math.cos(phi) + 3; p.y[i] = r * s * Math.sin(phi) - 2; p.z[i] = r * z + 1;
      p.x[i + 1000] = 6 - p.x[i]; p.y[i + 1000] = -4 - p.y[i]; p.z[i + 1000] = 2 - p.z[i];
      p.m[i] = p.m[i + 1000] = 1;
    }
    const c = densityCentre(p);
    expect(Math.abs(c.x - 3) + Math.abs(c.y + 2) + Math.abs(c.z - 1)).toBeLessThan(1e-12);
  });
});

/** The search written plainly, one pass over the kept indices per sphere: the engine's faster passes must give its very bits. */
function plainDensityCentre(p: ParticleState): { x: number; y: number; z: number; vx: number; vy: number; vz: number; radius_kpc: number; count: number } {
  const centre = (keep: number[]) => {
    let M = 0, x = 0, y = 0, z = 0;
    for (const i of keep) {
      M += p.m[i]; x += p.m[i] * p.x[i]; y += p.m[i] * p.y[i]; z += p.m[i] * p.z[i];
    }
    return M > 0 ? { x: x / M, y: y / M, z: z / M } : { x: 0, y: 0, z: 0 };
  };
  const d2 = (i: number, c: { x: number; y: number; z: number }) => {
    const dx = p.x[i] - c.x, dy = p.y[i] - c.y, dz = p.z[i] - c.z;
    return dx * dx + dy * dy + dz * dz;
  };
  const stop = densityCentreCount(p.n);
  let keep = Array.from({ length: p.n }, (_, i) => i);
  let c = centre(keep);
  let radius = Math.sqrt(keep.reduce((r2, i) => Math.max(r2, d2(i, c)), 0));
  while (keep.length > stop && radius > 0) {
    const shrunk = radius * 0.975;
    if (!(shrunk < radius)) break;
    const next = keep.filter((i) => d2(i, c) <= shrunk * shrunk);
    if (next.length < stop) break;
    [keep, radius, c] = [next, shrunk, centre(next)];
  }
  let M = 0, vx = 0, vy = 0, vz = 0;
  for (const i of keep) {
    M += p.m[i]; vx += p.m[i] * p.vx[i]; vy += p.m[i] * p.vy[i]; vz += p.m[i] * p.vz[i];
  }
  return { ...c, vx: vx / M, vy: vy / M, vz: vz / M, radius_kpc: radius, count: keep.length };
}

describe('density centre cost', () => {
  test('gives the bits of the plain search, pass for pass, on a cusp with stragglers, a sampled disk with bulge and a cold clump', () => {
    const disk = buildInitialConditions(specWith({
      model: { kind: 'disk', n: 3000, mass_Msun: 5e10, scaleLength_kpc: 3, scaleHeight_kpc: 0.3, toomreQ: 1.5, bulge: { mass_Msun: 1e10, scale_kpc: 0.5 } }, seed: 3,
    })).particles;
    // Every particle at one point but one far away: passes that drop nobody are skipped, down to the
    // smallest double, where the sphere shrinks no more and the search ends (it once went on for ever).
    const clump = allocateParticles(120);
    clump.m.fill(1);
    clump.x.fill(2);
    clump.x[119] = 40;
    for (const p of [cuspWithStragglers(), disk, clump]) expect(densityCentre(p, p)).toEqual(plainDensityCentre(p));
  });
});

describe('measured rotation curves about the density centre', () => {
  // A thin ring rotating at 200 km/s at R = 5 kpc, plus non-rotating particles far above the plane at the same R.
  function ringAndCloud(): ParticleState {
    const ring = 64, cloud = 64;
    const p = allocateParticles(ring + cloud);
    for (let k = 0; k < ring + cloud; k++) {
      const phi = (2 * Math.PI * k) / ring, R = k < ring ? 5 + 0.2 * ((k % 4) - 1.5) : 5;
      p.x[k] = R * Math.cos(phi); p.y[k] = R * Math.sin(phi); p.z[k] = k < ring ? 0 : k % 2 ? 10 : -10;
      p.vx[k] = k < ring ? -200 * Math.sin(phi) : 0; p.vy[k] = k < ring ? 200 * Math.cos(phi) : 0;
      p.m[k] = 1e8;
    }
    return p;
  }

  test('only particles within one bin width of the plane count, each bin sits at its mass-weighted radius, and each component gets its own curve', () => {
    const p = ringAndCloud();
    const law = createLaw({ kind: 'newton' }, { solver: directSolver, softening_kpc: 0.1 });
    const components = [{ label: 'ring', start: 0, count: 64 }, { label: 'cloud', start: 64, count: 64 }];
    const curve = measureRotationCurve(p, law, 10, 10, 0, 0, components);
    expect(curve.planeCut_kpc).toBe(1);
    const k = 5; // the bin [5, 6) kpc holds ring particles at 5.1 and 5.3 kpc
    expect(curve.meanAzimuthal_km_s[k]).toBeCloseTo(200, 9);
    expect(curve.meanRadius_kpc[k]).toBeCloseTo(5.2, 9);
    expect(curve.meanRadius_kpc[4]).toBeCloseTo(4.8, 9);
    expect(curve.particleCounts[k] + curve.particleCounts[4]).toBe(64); // the cloud at z = 10 is left out
    expect(curve.byComponent.map((c) => c.label)).toEqual(['ring', 'cloud']);
    expect(curve.byComponent[1].particleCounts.reduce((a, b) => a + b, 0)).toBe(0);
  });

  test('a disk galaxy with a bulge: the bulge barely rotates, so only the disk-alone curve follows the circular speed (within 25% at 2 scale lengths: a warm disk lags by its asymmetric drift)', () => {
    const spec = specWith({
      model: { kind: 'disk', n: 3000, mass_Msun: 5e10, scaleLength_kpc: 3, scaleHeight_kpc: 0.3, bulge: { mass_Msun: 1e10, scale_kpc: 0.6 } },
      softening_kpc: 0.2,
      seed: 3,
    });
    const ic = buildInitialConditions(spec);
    const law = createLaw(spec.law, { solver: directSolver, softening_kpc: spec.softening_kpc });
    const curve = measureRotationCurve(ic.particles, law, 15, 15, 0, 0, ic.components);
    const disk = curve.byComponent.find((c) => c.label === 'disk')!;
    const bulge = curve.byComponent.find((c) => c.label === 'bulge')!;
    const k = 6; // bin [6, 7) kpc, about 2 scale lengths
    // Asymmetric drift (Binney & Tremaine 2008, eq. 4.227) of an exponential disk at Q = 1.5 and
    // R = 2 R_d: v_c^2 - mean v_phi^2 = 3.5 sigma_R^2, a lag of 15-20% in the softened thick
    // disk's field; measured 18-22% over four seeds.
    expect(Math.abs(disk.meanAzimuthal_km_s[k]! / curve.circular_km_s[k] - 1)).toBeLessThan(0.25);
    expect(Math.abs(bulge.meanAzimuthal_km_s[0]!)).toBeLessThan(0.25 * disk.meanAzimuthal_km_s[k]!);
    // Near the centre the bulge dilutes the all-particle curve; the disk's own curve is not diluted.
    expect(curve.meanAzimuthal_km_s[1]!).toBeLessThan(0.9 * disk.meanAzimuthal_km_s[1]!);
  });
});
