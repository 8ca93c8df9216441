import { defaultRunSpec, parseRunSpec, type RunSpec } from '../../shared/spec';
import { G, myrToInternal } from '../../shared/engine/units';
import type { Simulation } from '../../shared/engine/simulation';
import { allocateAccelerations, centreOfMass } from '../../shared/engine/state';
import { pairKernels } from '../../shared/engine/laws/kernels';
import { pairKernel, type PairKernel } from '../../shared/engine/solvers/types';

/** A valid spec: the default with the given fields replaced (defaults of nested objects filled in by the schema). */
export function specWith(overrides: Record<string, unknown>): RunSpec {
  const r = parseRunSpec({ ...defaultRunSpec(), ...overrides });
  if (!r.ok) throw new Error(`test spec invalid: ${JSON.stringify(r.issues)}`);
  return r.spec;
}

/** Quantile of a list of numbers (sorted copy). */
export function quantile(values: ArrayLike<number>, q: number): number {
  const s = Array.from(values).sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(q * s.length))];
}

/** Metres per kpc from the IAU definitions, written out independently of the engine's units module. */
export const M_PER_KPC = 1000 * (648_000 / Math.PI) * 149_597_870_700;

/** An unsoftened Kepler pair run for whole periods; the period comes from Kepler's third law. */
export function keplerOrbitSpec(o: { m1: number; m2: number; a: number; e: number; integrator: string; stepsPerPeriod: number; periods: number }): { spec: RunSpec; P_Myr: number } {
  const P_Myr = (2 * Math.PI * Math.sqrt(o.a ** 3 / (G * (o.m1 + o.m2)))) / myrToInternal(1);
  const spec = specWith({
    model: { kind: 'kepler', mass1_Msun: o.m1, mass2_Msun: o.m2, semiMajorAxis_kpc: o.a, eccentricity: o.e },
    law: { kind: 'newton' },
    integrator: o.integrator,
    softening_kpc: 0,
    timestep_Myr: P_Myr / o.stepsPerPeriod,
    duration_Myr: o.periods * P_Myr,
    snapshotEvery: o.stepsPerPeriod,
  });
  return { spec, P_Myr };
}

/** Circular speed from the law's own pull on 128 probes per midplane ring about the centre of mass. */
export function forceCurve(sim: Simulation, radii: number[]): number[] {
  const p = sim.particles, c = centreOfMass(p), J = 128;
  const probes = { x: new Float64Array(radii.length * J), y: new Float64Array(radii.length * J), z: new Float64Array(radii.length * J).fill(c.z) };
  radii.forEach((R, r) => {
    for (let j = 0; j < J; j++) {
      probes.x[r * J + j] = c.x + R * Math.cos((2 * Math.PI * (j + 0.5)) / J);
      probes.y[r * J + j] = c.y + R * Math.sin((2 * Math.PI * (j + 0.5)) / J);
    }
  });
  const acc = allocateAccelerations(probes.x.length);
  sim.law.accelerations(p, probes, acc);
  return radii.map((R, r) => {
    let inward = 0;
    for (let k = r * J; k < (r + 1) * J; k++) inward -= (acc.ax[k] * (probes.x[k] - c.x) + acc.ay[k] * (probes.y[k] - c.y)) / R;
    return Math.sqrt(Math.max(0, (R * inward) / J));
  });
}

/** Every registered pair kernel at its sample parameters, through its own loops and through the generic ones. */
export function everyKernel(softening_kpc: number): PairKernel[] {
  return pairKernels().flatMap((def) => {
    const k = pairKernel(def, softening_kpc, def.sample);
    return [k, { ...k, generic: true }];
  });
}

