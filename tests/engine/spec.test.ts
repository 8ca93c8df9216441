import {
  defaultRunSpec,
  estimateInteractions,
  LIMITS,
  parseRunSpec,
  particleCount,
  RUN_SPEC_VERSION,
  runSpecSchema,
  stepCount,
} from '../../shared/spec';

const base = () => ({ ...defaultRunSpec() });

describe('run spec schema', () => {
  test('the default spec is valid, versioned and small', () => {
    const spec = defaultRunSpec();
    expect(spec.version).toBe(RUN_SPEC_VERSION);
    expect(runSpecSchema.safeParse(spec).success).toBe(true);
    expect(particleCount(spec)).toBeLessThanOrEqual(1000);
  });

  test('bad input is refused with the offending field named', () => {
    const r = parseRunSpec({ ...base(), model: { kind: 'plummer', n: 1, mass_Msun: 1e10, scale_kpc: 1 }, law: { kind: 'mond', a0_m_s2: -1 } });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    const paths = r.issues.map((i) => i.path);
    expect(paths).toContain('model.n');
    expect(paths).toContain('law.a0_m_s2');
  });

  test('particle and step limits are enforced', () => {
    const tooMany = parseRunSpec({ ...base(), model: { kind: 'plummer', n: LIMITS.maxParticles + 1, mass_Msun: 1, scale_kpc: 1 } });
    expect(tooMany.ok).toBe(false);
    const tooLong = parseRunSpec({ ...base(), timestep_Myr: 0.001, duration_Myr: 1000, snapshotEvery: 10_000 });
    expect(tooLong.ok).toBe(false);
    if (!tooLong.ok) expect(tooLong.issues[0].path).toBe('duration_Myr');
  });

  test('non-finite numbers, unknown kinds and a missing version are refused', () => {
    expect(parseRunSpec({ ...base(), timestep_Myr: Infinity }).ok).toBe(false);
    const unknown = parseRunSpec({ ...base(), law: { kind: 'aether' } });
    expect(unknown.ok).toBe(false);
    if (!unknown.ok) expect(unknown.issues[0].path).toBe('law.kind');
    const { version: _v, ...unversioned } = base();
    expect(parseRunSpec(unversioned).ok).toBe(false);
  });

  test('too many snapshots are refused at snapshotEvery', () => {
    const r = parseRunSpec({ ...base(), timestep_Myr: 0.1, duration_Myr: 1000, snapshotEvery: 1 });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.issues.map((i) => i.path)).toContain('snapshotEvery');
  });

  test('steps round up, and 100 / 0.1 is 1000 steps despite floating point', () => {
    expect(stepCount({ ...defaultRunSpec(), duration_Myr: 100, timestep_Myr: 0.1 })).toBe(1000);
    expect(stepCount({ ...defaultRunSpec(), duration_Myr: 10.05, timestep_Myr: 0.1 })).toBe(101);
  });

  test('interaction estimate: N^2 per force evaluation for direct sum, less for the tree at large N', () => {
    const spec = defaultRunSpec();
    const n = particleCount(spec);
    expect(estimateInteractions(spec)).toBe(n * n * stepCount(spec));
    expect(estimateInteractions({ ...spec, integrator: 'rk4' })).toBe(4 * n * n * stepCount(spec));
    const big = { ...spec, model: { kind: 'plummer' as const, n: 50_000, mass_Msun: 1e10, scale_kpc: 1 } };
    expect(estimateInteractions({ ...big, solver: { kind: 'tree', theta: 0.6 } })).toBeLessThan(estimateInteractions(big) / 10);
  });
});
