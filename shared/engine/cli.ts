// Command line for the engine (the one file here allowed Node APIs).
//   sim run SPEC.json [--out RESULT.json] [--max-snapshot-particles N] [--velocities]
//   sim curve SPEC.json [--points N] [--max-radius KPC]
//   sim check SPEC.json
//   sim schema
//   sim fit CURVE.csv [--law KIND ...] [--a0 free|fixed] [--H0 free|fixed] [--arcsec] [--distance MPC [--distance-error MPC]]
//       [--inclination DEG [--inclination-error DEG]] [--nuisance distance,inclination]
// A spec that does not parse exits 2 with one "field: message" line per problem;
// so does a rotation-curve table that does not parse (naming line and column).
// INFALL_DIRECT_KERNEL=js forces the typed-array direct sum instead of WebAssembly.
import { readFileSync, writeFileSync } from 'node:fs';
import { z } from 'zod';
import { parseRunSpec, runSpecSchema, type RunSpec } from '../spec';
import { FIT_LAWS, FitError, fitGalaxy, NUISANCE, type FitLaw, type Nuisance } from '../galaxy/fit';
import { parseRotationCurve, TableError } from '../galaxy/table';
import { analyticCurves, applyDirectKernelSetting, precheck, runSimulation } from './index';

const USAGE = `usage:
  sim run SPEC.json [--out RESULT.json] [--max-snapshot-particles N] [--velocities]
  sim curve SPEC.json [--points N] [--max-radius KPC]
  sim check SPEC.json
  sim schema
  sim fit CURVE.csv [--law KIND ...] [--a0 free|fixed] [--H0 free|fixed] [--arcsec] [--distance MPC [--distance-error MPC]]
      [--inclination DEG [--inclination-error DEG]] [--nuisance distance,inclination]
      KIND: ${FIT_LAWS.join(', ')} (default all)`;

class SpecError extends Error {}

function option(args: string[], name: string): string | undefined {
  const k = args.indexOf(name);
  return k >= 0 ? args[k + 1] : undefined;
}

function numberOption(args: string[], name: string): number | undefined {
  const raw = option(args, name);
  if (raw === undefined) return undefined;
  const v = Number(raw);
  if (!Number.isFinite(v) || v <= 0) throw new Error(`${name} needs a positive number, got "${raw}"`);
  return v;
}

function loadSpec(path: string | undefined): RunSpec {
  if (!path) throw new Error('missing SPEC.json');
  let input: unknown;
  try {
    input = JSON.parse(readFileSync(path, 'utf8'));
  } catch (e) {
    throw new SpecError(`${path}: ${(e as Error).message}`);
  }
  const parsed = parseRunSpec(input);
  if (!parsed.ok) throw new SpecError(parsed.issues.map((i) => `${i.path}: ${i.message}`).join('\n'));
  return parsed.spec;
}

const print = (value: unknown) => process.stdout.write(`${JSON.stringify(value, null, 2)}\n`);

function run(args: string[]): void {
  const spec = loadSpec(args[0]);
  const out = option(args, '--out');
  let lastReported = -Infinity;
  const result = runSimulation(spec, {
    maxSnapshotParticles: numberOption(args, '--max-snapshot-particles'),
    snapshotVelocities: args.includes('--velocities'),
    onProgress(p) {
      // A line per 5% keeps a terminal readable; the hook itself fires at least every 1%.
      if (p.percent - lastReported < 5 && p.step !== p.totalSteps) return;
      lastReported = p.percent;
      const drift = p.energyDrift === null ? 'n/a' : p.energyDrift.toExponential(2);
      process.stderr.write(`step ${p.step}/${p.totalSteps} (${p.percent.toFixed(0)}%) t=${p.time_Myr.toFixed(2)} Myr dE/(K0+|W0|)=${drift}\n`);
    },
  });
  if (out) {
    const plain = {
      ...result,
      snapshots: result.snapshots.map((s) => ({
        ...s,
        positions: Array.from(s.positions),
        ...(s.velocities ? { velocities: Array.from(s.velocities) } : {}),
      })),
    };
    writeFileSync(out, JSON.stringify(plain));
  }
  print({ cancelled: result.cancelled, law: result.law, summary: result.summary, timescales: result.timescales, warnings: result.warnings, ...(out ? { result: out } : {}) });
}

/** Local files may be large; the server applies the person's quota instead. */
const CLI_TABLE_LIMITS = { maxBytes: 16 * 1024 * 1024, maxRows: 100_000 };

function choice(args: string[], name: string): 'free' | 'fixed' | undefined {
  const raw = option(args, name);
  if (raw === undefined || raw === 'free' || raw === 'fixed') return raw;
  throw new Error(`${name} takes free or fixed, got "${raw}"`);
}

function fit(args: string[]): void {
  const path = args[0];
  if (!path || path.startsWith('--')) throw new Error('missing CURVE.csv');
  const laws = args.flatMap((a, k) => (a === '--law' ? (args[k + 1] ?? '').split(',') : [])) as FitLaw[];
  const unknown = laws.find((l) => !FIT_LAWS.includes(l));
  if (unknown !== undefined) throw new Error(`--law "${unknown}" is not one of ${FIT_LAWS.join(', ')}`);
  const nuisance = (option(args, '--nuisance')?.split(',') ?? []) as Nuisance[];
  const wrong = nuisance.find((n) => !NUISANCE.includes(n));
  if (wrong !== undefined) throw new Error(`--nuisance "${wrong}" is not one of ${NUISANCE.join(', ')}`);
  const measured = (name: string) => {
    const value = numberOption(args, `--${name}`);
    const error = numberOption(args, `--${name}-error`);
    if (value === undefined && error !== undefined) throw new Error(`--${name}-error needs --${name}`);
    return value === undefined ? undefined : { value, ...(error === undefined ? {} : { error }) };
  };
  const distanceMpc = measured('distance'), inclinationDeg = measured('inclination');
  let curve;
  try {
    curve = parseRotationCurve(readFileSync(path), {
      ...CLI_TABLE_LIMITS,
      radiusUnit: args.includes('--arcsec') ? 'arcsec' : 'kpc',
      ...(distanceMpc ? { distanceMpc } : {}),
      ...(inclinationDeg ? { inclinationDeg } : {}),
    });
  } catch (e) {
    throw e instanceof TableError ? new SpecError(`${path}: ${e.message}`) : e;
  }
  try {
    print(fitGalaxy(curve, { laws, a0: choice(args, '--a0'), H0: choice(args, '--H0'), nuisance }));
  } catch (e) {
    throw e instanceof FitError ? new SpecError(`${path}: ${e.message}`) : e;
  }
}

/** The command line's work: exported so a test can run it in-process (with its own registries). */
export function main(argv: string[]): number {
  const [command, ...args] = argv;
  try {
    applyDirectKernelSetting(process.env.INFALL_DIRECT_KERNEL);
    switch (command) {
      case 'run':
        run(args);
        return 0;
      case 'curve':
        print(analyticCurves(loadSpec(args[0]), { points: numberOption(args, '--points'), maxRadius_kpc: numberOption(args, '--max-radius') }));
        return 0;
      case 'check':
        print(precheck(loadSpec(args[0])));
        return 0;
      case 'fit':
        fit(args);
        return 0;
      case 'schema':
        print(z.toJSONSchema(runSpecSchema, { io: 'input', unrepresentable: 'any' }));
        return 0;
      default:
        process.stderr.write(`${USAGE}\n`);
        return 1;
    }
  } catch (e) {
    process.stderr.write(`${(e as Error).message}\n`);
    return e instanceof SpecError ? 2 : 1;
  }
}

if (require.main === module) process.exitCode = main(process.argv.slice(2));
