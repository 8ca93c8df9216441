import { Simulation } from '../../shared/engine';
import { directFieldRange } from '../../shared/engine/solvers/direct';
import { newtonKernel } from '../../shared/engine/laws/newton';
import { allocateAccelerations, cloneParticles } from '../../shared/engine/state';
import { specWith } from './helpers';

const same = (a: Float64Array, b: Float64Array) => Buffer.from(a.buffer, a.byteOffset, a.byteLength).equals(Buffer.from(b.buffer, b.byteOffset, b.byteLength));

describe('bit-identical reproducibility', () => {
  const spec = specWith({
    model: { kind: 'disk', n: 300, mass_Msun: 2e10, scaleLength_kpc: 2, scaleHeight_kpc: 0.2, bulge: { mass_Msun: 5e9, scale_kpc: 0.4 } },
    law: { kind: 'mond', interpolation: 'rar', a0_m_s2: 1.2e-10 },
    solver: { kind: 'tree', theta: 0.7 },
    integrator: 'yoshida4',
    softening_kpc: 0.1,
    timestep_Myr: 0.5,
    duration_Myr: 10,
    snapshotEvery: 5,
    seed: 42,
  });

  test('two runs of the same spec agree bit for bit after 20 steps (every model, law and solver path is deterministic)', () => {
    const a = new Simulation(spec), b = new Simulation(spec);
    for (let k = 0; k < 20; k++) { a.advance(); b.advance(); }
    for (const key of ['x', 'y', 'z', 'vx', 'vy', 'vz'] as const) expect(same(a.particles[key], b.particles[key])).toBe(true);
  });

  test('a run resumed from a copy of its state (typed arrays, step, RNG words) continues bit-identically', () => {
    const full = new Simulation(spec);
    for (let k = 0; k < 10; k++) full.advance();
    const checkpoint = { particles: cloneParticles(full.particles), step: full.state.step, rng: full.state.rng.slice() };
    for (let k = 0; k < 10; k++) full.advance();
    const resumed = new Simulation(spec, checkpoint);
    expect(resumed.time_Myr).toBe(5);
    for (let k = 0; k < 10; k++) resumed.advance();
    expect(resumed.time_Myr).toBe(full.time_Myr);
    for (const key of ['x', 'vx', 'vz'] as const) expect(same(resumed.particles[key], full.particles[key])).toBe(true);
  });

  test('the direct sum split into index ranges (as threads would) equals one call bit for bit', () => {
    const p = new Simulation(spec).particles;
    const kernel = newtonKernel(0.1);
    const whole = allocateAccelerations(p.n), parts = allocateAccelerations(p.n);
    directFieldRange(p, p, kernel, 0, p.n, whole);
    for (const [s, e] of [[0, 97], [97, 211], [211, p.n]]) directFieldRange(p, p, kernel, s, e, parts);
    expect(same(whole.ax, parts.ax) && same(whole.ay, parts.ay) && same(whole.az, parts.az)).toBe(true);
  });

  test('a different seed gives different particles', () => {
    const a = new Simulation(spec), b = new Simulation({ ...spec, seed: 43 });
    expect(same(a.particles.x, b.particles.x)).toBe(false);
  });
});
