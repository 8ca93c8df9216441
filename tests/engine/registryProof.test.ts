// The registries' promise, checked end to end: a new force law and a new model are one module
// each (tests/fixtures/registry/) plus one line in each list, and the run spec's schema, the
// command line, the analytic preview, the solvers (direct and tree) and a short run all take
// them. The launch form's half is tests/app/registryProof.test.tsx.
jest.mock('../../shared/engine/laws/list', () => ({
  LAW_MODULES: [...jest.requireActual('../../shared/engine/laws/list').LAW_MODULES, require('../fixtures/registry/boostedGLaw').boostedGLaw],
}));
jest.mock('../../shared/engine/models/list', () => ({
  MODEL_MODULES: [...jest.requireActual('../../shared/engine/models/list').MODEL_MODULES, require('../fixtures/registry/coldSphereModel').coldSphereModule],
}));

import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { z } from 'zod';
import { main } from '../../shared/engine/cli';
import { analyticCurves, lawShortLabel, makeSolver, modelLabel, runSimulation, units } from '../../shared/engine';
import { createLaw } from '../../shared/engine/laws/registry';
import { pairKernels } from '../../shared/engine/laws/kernels';
import { allocateParticles } from '../../shared/engine/state';
import { defaultRunSpec, parseRunSpec, runSpecSchema, type RunSpec } from '../../shared/spec';

const input = {
  ...defaultRunSpec(),
  name: 'registry proof',
  model: { kind: 'coldSphere', n: 200, mass_Msun: 1e10, radius_kpc: 2 },
  law: { kind: 'boostedG', boost: 0.25 },
  // About a quarter of the sphere's free-fall time (15 Myr), in 40 steps.
  timestep_Myr: 0.1,
  duration_Myr: 4,
  snapshotEvery: 10,
};

function parsed(over: object = {}): RunSpec {
  const r = parseRunSpec({ ...input, ...over });
  if (!r.ok) throw new Error(JSON.stringify(r.issues));
  return r.spec;
}

/** Runs the command line in-process, returning its exit code and what it printed. */
function cli(args: string[]): { code: number; out: string; err: string } {
  let out = '', err = '';
  const o = jest.spyOn(process.stdout, 'write').mockImplementation((s) => ((out += String(s)), true));
  const e = jest.spyOn(process.stderr, 'write').mockImplementation((s) => ((err += String(s)), true));
  try {
    return { code: main(args), out, err };
  } finally {
    o.mockRestore();
    e.mockRestore();
  }
}

test('the run spec schema takes the new law and model, checks their fields, and carries their titles', () => {
  const spec = parsed();
  expect(spec.law).toEqual({ kind: 'boostedG', boost: 0.25 });
  expect(spec.model).toMatchObject({ kind: 'coldSphere', n: 200 });
  const bad = parseRunSpec({ ...input, law: { kind: 'boostedG', boost: 3 }, model: { ...input.model, radius_kpc: -1 } });
  expect(bad.ok).toBe(false);
  if (!bad.ok) expect(bad.issues.map((i) => i.path).sort()).toEqual(['law.boost', 'model.radius_kpc']);
  const json = JSON.stringify(z.toJSONSchema(runSpecSchema, { io: 'input', unrepresentable: 'any' }));
  expect(json).toContain('"G raised by"');
  expect(json).toContain('"Sphere radius"');
  expect(lawShortLabel('boostedG')).toBe('Boosted G');
  expect(modelLabel('coldSphere')).toBe('Cold sphere');
});

test('the command line checks, describes and runs a spec under them', () => {
  const file = join(mkdtempSync(join(tmpdir(), 'infall-registry-')), 'spec.json');
  writeFileSync(file, JSON.stringify(input));
  expect(cli(['check', file]).code).toBe(0);
  expect(cli(['schema']).out).toContain('boostedG');
  const run = cli(['run', file]);
  expect(run.code).toBe(0);
  const printed = JSON.parse(run.out);
  expect(printed.law.label).toBe('Boosted G');
  expect(printed.cancelled).toBe(false);
  writeFileSync(file, JSON.stringify({ ...input, law: { kind: 'boostedG', boost: 3 } }));
  const refused = cli(['check', file]);
  expect(refused.code).toBe(2);
  expect(refused.err).toMatch(/law\.boost/);
});

test('the analytic preview draws the new law beside the reference: v grows by sqrt(1 + boost) at every radius', () => {
  const curves = analyticCurves(parsed());
  const [own, reference] = curves.curves;
  expect(own.law).toBe('boostedG');
  expect(reference.law).not.toBe('boostedG');
  own.v_km_s.forEach((v, k) => expect(v).toBeCloseTo(Math.sqrt(1.25) * reference.v_km_s[k], 9));
  // The new model's mass model: a uniform sphere, v^2 = G M R^2 / a^3 inside (shell theorem).
  const inside = curves.radii_kpc.map((R, k) => [R, reference.v_km_s[k]]).filter(([R]) => R < 2);
  expect(inside.length).toBeGreaterThan(3);
  for (const [R, v] of inside) expect(v).toBeCloseTo(Math.sqrt((units.G * 1e10 * R * R) / 8), 6);
});

test('the solvers sum its pair kernel, found by name: (1 + boost) times the Newtonian field, direct and tree', () => {
  expect(pairKernels().map((k) => k.name)).toContain('boostedG');
  const spec = parsed();
  const p = allocateParticles(50);
  for (let i = 0; i < 50; i++) { p.x[i] = Math.cos(i) * (1 + i / 10); p.y[i] = Math.sin(2 * i); p.z[i] = (i % 7) / 7 - 0.5; p.m[i] = 1e8; }
  for (const solver of [{ kind: 'direct' }, { kind: 'tree', theta: 0.5 }] as const) {
    const field = (law: RunSpec['law']) => {
      const out = { ax: new Float64Array(50), ay: new Float64Array(50), az: new Float64Array(50) };
      createLaw(law, { solver: makeSolver(solver), softening_kpc: spec.softening_kpc }).accelerations(p, p, out);
      return out;
    };
    const boosted = field(spec.law), newton = field({ kind: 'newton' } as RunSpec['law']);
    // Within 2e-6 of |a|: the Newtonian tree's own walk sums float32 terms (its bound in tree.test.ts).
    for (let i = 0; i < 50; i++) {
      const d = Math.hypot(boosted.ax[i] - 1.25 * newton.ax[i], boosted.ay[i] - 1.25 * newton.ay[i], boosted.az[i] - 1.25 * newton.az[i]);
      expect(d).toBeLessThan(2e-6 * 1.25 * Math.hypot(newton.ax[i], newton.ay[i], newton.az[i]));
    }
  }
});

test('a short run takes both: the cold sphere falls in under the boosted pull and keeps its energy', () => {
  const result = runSimulation(parsed());
  expect(result.cancelled).toBe(false);
  expect(result.components).toEqual([{ label: 'sphere', start: 0, count: 200 }]);
  const first = result.diagnostics[0], last = result.diagnostics[result.diagnostics.length - 1];
  expect(first.kineticEnergy).toBe(0); // at rest
  expect(last.kineticEnergy).toBeGreaterThan(0);
  expect(last.lagrangianRadii_kpc.r50).toBeLessThan(first.lagrangianRadii_kpc.r50);
  // Leapfrog, 40 steps well inside the free-fall time: energy kept to 1e-3 (common practice as a bound).
  expect(Math.abs(last.energyDrift ?? Infinity)).toBeLessThan(1e-3);
});
