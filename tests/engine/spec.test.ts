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
    const missing = parseRunSpec(unversioned);
    expect(missing.ok).toBe(false);
    if (!missing.ok) expect(missing.issues[0]).toEqual({ path: 'version', message: `version must be ${RUN_SPEC_VERSION}, the current spec format (1 and 2 are still read)` });
  });

  // These show under their field in the launch form and in API refusals: in words, with units and
  // grouped digits, never a field's key (the API's `field` names the key).
  test.each([
    ['duration', { timestep_Myr: 0.001, duration_Myr: 1000 }, 'duration_Myr', 'Duration 1000 Myr at a timestep of 0.001 Myr takes 1\u2009000\u2009000 steps; at most 200\u2009000 are allowed: shorten the duration or lengthen the timestep'],
    ['snapshots', { timestep_Myr: 0.1, duration_Myr: 1000, snapshotEvery: 1 }, 'snapshotEvery', 'A snapshot every 1 steps gives more than 1\u2009000 snapshots over 10\u2009000 steps: take one every 11 steps or more'],
    ['diagnostics', { timestep_Myr: 0.1, duration_Myr: 1000, diagnosticsEvery: 2 }, 'diagnosticsEvery', 'Diagnostics every 2 steps gives more than 2\u2009000 samples over 10\u2009000 steps: take one every 6 steps or more'],
    ['truncation', { model: { kind: 'plummer', n: 100, mass_Msun: 1e10, scale_kpc: 1, truncationRadius_kpc: 1.2e-10 } }, 'model.truncationRadius_kpc', 'Truncation radius 1.2e-10 kpc is below 1% of the scale radius (1 kpc): the model would hold almost none of its mass'],
    ['halo truncation', { model: { kind: 'plummer', n: 100, mass_Msun: 1e10, scale_kpc: 1, halo: { profile: 'nfw', n: 100, mass_Msun: 1e11, scale_kpc: 15, truncationRadius_kpc: 0.1 } } }, 'model.halo.truncationRadius_kpc', "Truncation radius 0.1 kpc is below 1% of the halo's scale radius (15 kpc): the model would hold almost none of its mass"],
    ['halo particles', { model: { kind: 'plummer', n: 60_000, mass_Msun: 1e10, scale_kpc: 1, halo: { profile: 'nfw', n: 50_000, mass_Msun: 1e11, scale_kpc: 15 } } }, 'model.halo.n', 'Particles N and halo particles together must be at most 100\u2009000'],
    ['separation', { model: { kind: 'encounter', primary: { kind: 'plummer', n: 10, mass_Msun: 1e10, scale_kpc: 1 }, secondary: { kind: 'plummer', n: 10, mass_Msun: 1e10, scale_kpc: 1 }, pericentre_kpc: 5, initialSeparation_kpc: 0.5 } }, 'model.initialSeparation_kpc', 'Initial separation 0.5 kpc must be at least the pericentre (5 kpc)'],
    ['encounter particles', { model: { kind: 'encounter', primary: { kind: 'plummer', n: 60_000, mass_Msun: 1e10, scale_kpc: 1 }, secondary: { kind: 'plummer', n: 50_000, mass_Msun: 1e10, scale_kpc: 1 }, pericentre_kpc: 5, initialSeparation_kpc: 20 } }, 'model.secondary.n', 'The two systems hold 110\u2009000 particles with their haloes; at most 100\u2009000 are allowed'],
    ['disk parts', { model: { kind: 'disk', n: 2, mass_Msun: 1e10, scaleLength_kpc: 3, scaleHeight_kpc: 0.3, bulge: { mass_Msun: 1e9, scale_kpc: 0.5 }, gas: { mass_Msun: 1e9, scaleLength_kpc: 5, scaleHeight_kpc: 0.1 } } }, 'model.n', 'Particles N must be at least 3: one for each part (disk, bulge, gas)'],
  ])('a cross-field refusal (%s) says it in words at its field', (_what, change, path, message) => {
    const r = parseRunSpec({ ...base(), ...change });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.issues).toContainEqual({ path, message });
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
