import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { NAME_MAX_LENGTH } from '../../shared/spec';

const root = join(__dirname, '..', '..');
const simWith = (env: Record<string, string>, ...args: string[]) =>
  spawnSync(process.execPath, [require.resolve('tsx/cli'), join(root, 'shared/engine/cli.ts'), ...args], { cwd: root, encoding: 'utf8', env: { ...process.env, ...env } });
const sim = (...args: string[]) => simWith({}, ...args);

const dir = mkdtempSync(join(tmpdir(), 'infall-cli-'));
const write = (name: string, value: unknown) => {
  const path = join(dir, name);
  writeFileSync(path, JSON.stringify(value));
  return path;
};
const good = write('good.json', {
  version: 1,
  model: { kind: 'plummer', n: 60, mass_Msun: 1e10, scale_kpc: 1 },
  law: { kind: 'mond' },
  timestep_Myr: 0.5,
  duration_Myr: 5,
  softening_kpc: 0.1,
  snapshotEvery: 2,
});

describe('sim command line', () => {
  test('run: progress on stderr, summary JSON on stdout, full result in --out', () => {
    const out = join(dir, 'result.json');
    const r = sim('run', good, '--out', out);
    expect(r.status).toBe(0);
    expect(r.stderr).toMatch(/step 10\/10 \(100%\)/);
    const summary = JSON.parse(r.stdout);
    expect(summary.summary.stepsCompleted).toBe(10);
    expect(summary.law.kind).toBe('mond');
    const full = JSON.parse(readFileSync(out, 'utf8'));
    expect(full.snapshots[0].positions).toHaveLength(3 * 60);
    expect(full.diagnostics.length).toBeGreaterThan(2);
  });

  test('curve: analytic curves under the law and Newton', () => {
    const r = sim('curve', good);
    expect(r.status).toBe(0);
    expect(JSON.parse(r.stdout).curves.map((c: { law: string }) => c.law)).toEqual(['mond', 'newton']);
  });

  test('schema: the JSON Schema of the spec', () => {
    const r = sim('schema');
    expect(r.status).toBe(0);
    const schema = JSON.parse(r.stdout);
    expect(schema.properties.version.anyOf.map((v: { const: number }) => v.const)).toEqual([1, 2, 3]);
    expect(schema.required).toEqual(expect.arrayContaining(['model', 'law', 'timestep_Myr']));
  });

  test('INFALL_DIRECT_KERNEL=js runs the float64 JS direct sum instead of the mixed-precision WebAssembly one, each reproducible to the bit; a bad value is named', () => {
    const newton = write('newton.json', { ...JSON.parse(readFileSync(good, 'utf8')), law: { kind: 'newton' } });
    const results = ['wasm', 'js', 'wasm'].map((kernel, i) => {
      const out = join(dir, `result-${kernel}-${i}.json`);
      const r = simWith({ INFALL_DIRECT_KERNEL: kernel }, 'run', newton, '--out', out);
      expect(r.status).toBe(0);
      return readFileSync(out, 'utf8');
    });
    expect(results[2]).toBe(results[0]);
    expect(results[1]).not.toBe(results[0]);
    // The same physics: leapfrog's energy drift agrees within the 10 % the issue allows mixed precision.
    const [wasm, js] = results.map((r) => JSON.parse(r).summary.maxAbsEnergyDrift as number);
    expect(Math.abs(wasm / js - 1)).toBeLessThan(0.1);
    const bad = simWith({ INFALL_DIRECT_KERNEL: 'fast' }, 'run', newton);
    expect(bad.status).toBe(1);
    expect(bad.stderr).toContain('INFALL_DIRECT_KERNEL must be "wasm" or "js", got "fast"');
  });

  test('a bad spec exits 2 naming the field', () => {
    const bad = write('bad.json', { ...JSON.parse(readFileSync(good, 'utf8')), model: { kind: 'plummer', n: 1, mass_Msun: 1e10, scale_kpc: 1 } });
    const r = sim('run', bad);
    expect(r.status).toBe(2);
    expect(r.stderr).toMatch(/^model\.n: /m);
  });

  test('a name over the one limit for names exits 2 naming it', () => {
    const long = write('long-name.json', { ...JSON.parse(readFileSync(good, 'utf8')), name: 'x'.repeat(NAME_MAX_LENGTH + 1) });
    const r = sim('check', long);
    expect(r.status).toBe(2);
    expect(r.stderr).toContain(`name: name is at most ${NAME_MAX_LENGTH} characters`);
  });
});
