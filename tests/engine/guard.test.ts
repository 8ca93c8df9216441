// Degenerate specs are refused at validation naming the field; a run whose energy
// runs away fails with the likely cause instead of finishing with a drift of 1e29.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { defaultRunSpec, parseRunSpec } from '../../shared/spec';
import { runSimulation } from '../../shared/engine';
import { samplePlummerPositions } from '../../shared/engine/models/plummer';
import { seedRng } from '../../shared/engine/rng';
import { allocateParticles } from '../../shared/engine/state';

const base = () => ({ ...defaultRunSpec() }) as Record<string, unknown>;

describe('degenerate specs are refused at validation, naming the field', () => {
  test('a truncation radius far below the scale radius', () => {
    const r = parseRunSpec({ ...base(), model: { kind: 'plummer', n: 10, mass_Msun: 1e10, scale_kpc: 1, truncationRadius_kpc: 1e-200 } });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.issues[0]).toMatchObject({ path: 'model.truncationRadius_kpc', message: expect.stringMatching(/below 1% of the scale radius \(1 kpc\)/) });
  });

  test('the same inside an encounter, and for a disk against its scale length', () => {
    const tiny = { kind: 'hernquist', n: 10, mass_Msun: 1e10, scale_kpc: 2, truncationRadius_kpc: 0.001 };
    const enc = parseRunSpec({
      ...base(),
      model: { kind: 'encounter', primary: { kind: 'plummer', n: 10, mass_Msun: 1e10, scale_kpc: 1 }, secondary: tiny, pericentre_kpc: 5, initialSeparation_kpc: 20 },
    });
    expect(enc.ok).toBe(false);
    if (!enc.ok) expect(enc.issues.map((i) => i.path)).toContain('model.secondary.truncationRadius_kpc');
    const disk = parseRunSpec({ ...base(), model: { kind: 'disk', n: 10, mass_Msun: 1e10, scaleLength_kpc: 3, scaleHeight_kpc: 0.3, truncationRadius_kpc: 0.01 } });
    expect(disk.ok).toBe(false);
    if (!disk.ok) expect(disk.issues[0].message).toBe('Truncation radius 0.01 kpc is below 1% of the scale length (3 kpc): the model would hold almost none of its mass');
  });

  test('a subnormal timestep is refused as too many steps, naming timestep_Myr', () => {
    const r = parseRunSpec({ ...base(), timestep_Myr: 5e-324 });
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.issues[0]).toMatchObject({ path: 'timestep_Myr', message: expect.stringMatching(/more than 200\u2009000 steps/) });
  });

  test('unknown fields anywhere in the spec are refused by name', () => {
    const top = parseRunSpec({ ...base(), colour: 'red' });
    expect(top.ok).toBe(false);
    if (!top.ok) expect(top.issues[0]).toMatchObject({ path: 'colour', message: expect.stringMatching(/colour/) });
    const nested = parseRunSpec({ ...base(), model: { kind: 'plummer', n: 10, mass_Msun: 1e10, scale_kpc: 1, spin: 2 } });
    expect(nested.ok).toBe(false);
    if (!nested.ok) expect(nested.issues[0]).toMatchObject({ path: 'model.spin', message: expect.stringMatching(/spin/) });
    const law = parseRunSpec({ ...base(), law: { kind: 'newton', G: 2 } });
    expect(law.ok).toBe(false);
    if (!law.ok) expect(law.issues[0]).toMatchObject({ path: 'law.G', message: expect.stringMatching(/"G"/) });
  });
});

test('a sampler handed an empty profile gives up with a named reason instead of spinning', () => {
  // Past validation (the engine's own entry points): the truncated mass fraction underflows to 0.
  const out = allocateParticles(4);
  expect(() => samplePlummerPositions({ mass_Msun: 1e10, scale_kpc: 1, truncationRadius_kpc: 1e-200 }, seedRng(1), out, 0, 4)).toThrow(
    /initial conditions: no acceptable Plummer radius in 1000000 draws.*truncation radius/,
  );
});

describe('numerical blow-up fails the run naming the likely cause', () => {
  // A Kepler pair at eccentricity 0.99 with a step of a fifth of the period: leapfrog kicks the
  // bodies apart at pericentre and the energy changes by many times its scale (common practice:
  // ~100 steps per period at least, more at high eccentricity).
  const kepler = (timestep_Myr: number) => {
    const r = parseRunSpec({
      ...base(),
      model: { kind: 'kepler', mass1_Msun: 1e10, mass2_Msun: 1e10, semiMajorAxis_kpc: 1, eccentricity: 0.99 },
      softening_kpc: 0,
      timestep_Myr,
      duration_Myr: 200 * timestep_Myr,
      snapshotEvery: 10,
      diagnosticsEvery: 1,
    });
    if (!r.ok) throw new Error(JSON.stringify(r.issues));
    return r.spec;
  };

  test('a coarse timestep on an eccentric orbit: refused as blown up, with softening named', () => {
    expect(() => runSimulation(kepler(1))).toThrow(/the run blew up: the energy changed by .* of its scale by step \d+.*softening_kpc/);
  });

  test('the same orbit with a fine timestep finishes and stays within the bound', () => {
    const res = runSimulation({ ...kepler(0.01), duration_Myr: 2 });
    expect(res.cancelled).toBe(false);
    expect(Math.abs(res.summary.maxAbsEnergyDrift!)).toBeLessThan(1);
  });
});

test('the command line refuses unknown fields too, naming them', () => {
  const root = join(__dirname, '..', '..');
  const file = join(mkdtempSync(join(tmpdir(), 'infall-guard-cli-')), 'extra.json');
  writeFileSync(file, JSON.stringify({ ...base(), solver: { kind: 'direct', theta: 0.5 } }));
  const r = spawnSync(process.execPath, [require.resolve('tsx/cli'), join(root, 'shared/engine/cli.ts'), 'run', file], { cwd: root, encoding: 'utf8' });
  expect(r.status).toBe(2);
  expect(r.stderr).toMatch(/^solver\.theta: .*"theta"/m);
});
