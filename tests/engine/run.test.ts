import { defaultRunSpec, parseRunSpec, type RunSpec } from '../../shared/spec';
import { CancelledDuringSetup, lawInfo, precheck, runSimulation, setDirectKernel, type RunProgress } from '../../shared/engine';

function spec(overrides: Record<string, unknown>): RunSpec {
  const r = parseRunSpec({ ...defaultRunSpec(), ...overrides });
  if (!r.ok) throw new Error(JSON.stringify(r.issues));
  return r.spec;
}

const small = () => spec({ model: { kind: 'plummer', n: 200, mass_Msun: 1e10, scale_kpc: 1 }, timestep_Myr: 0.25, duration_Myr: 10, snapshotEvery: 8 });

describe('runSimulation', () => {
  test('the same spec and seed give bit-identical diagnostics and snapshots; another seed does not', () => {
    const a = runSimulation(small());
    const b = runSimulation(small());
    expect(JSON.stringify(a.diagnostics)).toBe(JSON.stringify(b.diagnostics));
    expect(a.snapshots.length).toBe(b.snapshots.length);
    a.snapshots.forEach((s, k) => expect(Buffer.from(s.positions.buffer).equals(Buffer.from(b.snapshots[k].positions.buffer))).toBe(true));
    const c = runSimulation({ ...small(), seed: 2 });
    expect(c.diagnostics[0].kineticEnergy).not.toBe(a.diagnostics[0].kineticEnergy);
  });

  test('progress is reported at least every 1% and the result is JSON apart from the snapshot arrays', () => {
    const seen: RunProgress[] = [];
    const r = runSimulation(small(), { onProgress: (p) => seen.push(p) });
    const steps = r.summary.totalSteps;
    for (let k = 1; k < seen.length; k++) expect(seen[k].step - seen[k - 1].step).toBeLessThanOrEqual(Math.max(1, Math.floor(steps / 100)));
    expect(seen[seen.length - 1].percent).toBe(100);
    const { snapshots, ...rest } = r;
    expect(JSON.parse(JSON.stringify(rest))).toEqual(rest);
    expect(snapshots[0].positions).toBeInstanceOf(Float32Array);
  });

  test('snapshots hold the same subset of at most maxSnapshotParticles particles', () => {
    const r = runSimulation(small(), { maxSnapshotParticles: 50, snapshotVelocities: true });
    expect(r.snapshotParticles).toHaveLength(50);
    for (const s of r.snapshots) {
      expect(s.positions).toHaveLength(150);
      expect(s.velocities).toHaveLength(150);
    }
    expect(r.snapshots.map((s) => s.step)).toEqual([0, 8, 16, 24, 32, 40]);
  });

  test('cancellation stops early and returns what exists', () => {
    let calls = 0;
    // Asked twice during set-up (after sampling, after the first force sum), then before each step.
    const r = runSimulation(small(), { shouldCancel: () => ++calls > 7 });
    expect(r.cancelled).toBe(true);
    expect(r.summary.stepsCompleted).toBe(5);
    expect(r.diagnostics[r.diagnostics.length - 1].step).toBe(5);
  });

  test('a cancel during set-up stops before the first force sum, or before the initial curve and diagnostics', () => {
    let evaluated = 0;
    const counting = { kind: 'direct' as const, field: () => void evaluated++, potential: () => undefined };
    expect(() => runSimulation(small(), { shouldCancel: () => true, solver: counting as never })).toThrow(CancelledDuringSetup);
    expect(evaluated).toBe(0);
    let calls = 0;
    expect(() => runSimulation(small(), { shouldCancel: () => ++calls > 1 })).toThrow('the run was cancelled while its initial conditions were being set up');
    expect(calls).toBe(2);
  });

  test('Newtonian energy drift of a Plummer sphere stays small with leapfrog (bounded error is the symplectic property; 1e-3 is our tolerance for this step size)', () => {
    const r = runSimulation(small());
    expect(r.summary.quantities.energy).toBe('conserved');
    expect(r.summary.maxAbsEnergyDrift!).toBeLessThan(1e-3);
    // The WebAssembly direct sum's float32 pair terms do not cancel pair by pair to the bit (measured
    // 6.4e-10); the float64 JS kernel's do, to rounding.
    expect(r.summary.finalMomentumDrift).toBeLessThan(1e-8);
    const previous = setDirectKernel('js');
    try {
      expect(runSimulation(small()).summary.finalMomentumDrift).toBeLessThan(1e-12);
    } finally {
      setDirectKernel(previous);
    }
  });

  test('precheck reports crossing and relaxation time N/(8 ln N) t_cross (Binney & Tremaine 2008, eq. 1.38)', () => {
    const { timescales } = precheck(small());
    expect(timescales.relaxationTime_Myr!).toBeCloseTo((200 / (8 * Math.log(200))) * timescales.crossingTime_Myr, 6);
  });

  test('law info says which laws conserve what', () => {
    expect(lawInfo({ kind: 'newton' }).conservesEnergy).toBe(true);
    const mond = lawInfo({ kind: 'mond', interpolation: 'simple', a0_m_s2: 1.2e-10 });
    expect(mond.conservesEnergy).toBe(false);
    expect(mond.conservesMomentum).toBe(false);
    expect(mond.hasPotential).toBe(false);
  });
});

describe('a run whose numbers blow up', () => {
  // Common practice: an unsoftened pair 1e-150 kpc apart overflows the 1/r^2 force to
  // infinity in double precision; the engine must stop and say why, not store NaNs.
  test('stops with an error naming the particle, the step and the remedy', () => {
    const at = (x: number) => ({ x_kpc: x, y_kpc: 0, z_kpc: 0, vx_km_s: 0, vy_km_s: 0, vz_km_s: 0, mass_Msun: 1e9 });
    const parsed = parseRunSpec({
      ...defaultRunSpec(),
      model: { kind: 'table', recentre: false, particles: [at(0), at(1e-150)] },
      softening_kpc: 0,
      timestep_Myr: 1,
      duration_Myr: 5,
      snapshotEvery: 1,
    });
    if (!parsed.ok) throw new Error(JSON.stringify(parsed.issues));
    expect(() => runSimulation(parsed.spec)).toThrow(/particle \d left finite numbers at step \d+.*softening_kpc/);
  });
});
