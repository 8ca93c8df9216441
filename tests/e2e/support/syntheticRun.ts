import type { RunDetail } from '../../../shared/api/contract';
import { encodeSnapshots, type SnapshotFrame, type SnapshotSet } from '../../../shared/api/snapshots';
import { lawInfo } from '../../../shared/engine';

// An invented finished run, served in place of the API's answer, so the animation can be
// measured with a fixed particle count independent of what the stack has computed.

export const SYNTHETIC_RUN_ID = '00000000-0000-4000-8000-00000000f95a';

/**
 * A rotating, slowly breathing galaxy of `n` particles over `frames` snapshots (invented):
 * 70% disk, 10% bulge, 20% halo, in that order, like the engine's models list their parts.
 */
export function syntheticSnapshots(n: number, frames: number): SnapshotSet {
  // Fixed pseudo-random radii and phases so every run of the test draws the same picture.
  let seed = 12345;
  const rand = () => ((seed = (seed * 1103515245 + 12345) % 2147483648) / 2147483648);
  const disk = Math.round(0.7 * n);
  const bulge = Math.round(0.1 * n);
  const component = Uint8Array.from({ length: n }, (_, i) => (i < disk ? 0 : i < disk + bulge ? 1 : 2));
  const scale = [3, 0.4, 9]; // kpc: disk scale length, bulge and halo radii
  const r = Float32Array.from(component, (c) => -Math.log(1 - rand() * 0.999) * scale[c]);
  const phi = Float32Array.from({ length: n }, () => rand() * 2 * Math.PI);
  // Height above the plane: thin for the disk, as wide as the radius for the bulge and halo.
  const z = Float32Array.from(component, (c, i) => (c === 0 ? (rand() - 0.5) * 0.6 : (2 * rand() - 1) * r[i]));
  const out: SnapshotFrame[] = [];
  for (let k = 0; k < frames; k++) {
    const t = k * 5;
    const positions = new Float32Array(3 * n);
    for (let i = 0; i < n; i++) {
      const omega = (component[i] === 2 ? 0.02 : 0.2) / (0.5 + r[i]); // faster inside: differential rotation
      const a = phi[i] + omega * t;
      const rr = Math.sqrt(Math.max(0, r[i] * r[i] - (component[i] === 0 ? 0 : z[i] * z[i]))) * (1 + 0.05 * Math.sin(0.1 * t));
      positions[3 * i] = rr * Math.cos(a);
      positions[3 * i + 1] = rr * Math.sin(a);
      positions[3 * i + 2] = z[i];
    }
    out.push({ step: k * 10, time_Myr: t, positions });
  }
  return { labels: ['disk', 'bulge', 'halo'], component, frames: out };
}

export function syntheticRun(n: number, frames: SnapshotFrame[], owner = { id: 0, login: 'invented', name: 'Invented benchmark' }): RunDetail {
  const law = { kind: 'newton' } as const;
  const times = frames.map((f) => f.time_Myr);
  const radii = Array.from({ length: 24 }, (_, k) => (k + 0.5) * 0.5);
  const measured = { meanRadius_kpc: radii, meanAzimuthal_km_s: radii.map((R) => 150 * (1 - Math.exp(-R / 2))), particleCounts: radii.map(() => 100) };
  const curve = (time_Myr: number) => ({ step: 0, time_Myr, radii_kpc: radii, planeCut_kpc: 0.5, ...measured, byComponent: [{ label: 'disk', ...measured }], circular_km_s: radii.map((R) => 160 * (1 - Math.exp(-R / 2))) });
  const origin = { x: 0, y: 0, z: 0 };
  const now = new Date().toISOString();
  return {
    id: SYNTHETIC_RUN_ID,
    name: `Animation benchmark, ${n} particles (invented)`,
    status: 'finished',
    progress: 1,
    modelKind: 'disk',
    lawKind: 'newton',
    particles: n,
    steps: frames[frames.length - 1].step,
    costInteractions: 0,
    pairId: null,
    error: null,
    createdAt: now,
    startedAt: now,
    finishedAt: now,
    owner,
    spec: { version: 1, model: { kind: 'disk', n, mass_Msun: 5e10, scaleLength_kpc: 3, scaleHeight_kpc: 0.3, toomreQ: 1.5 }, law, integrator: 'leapfrog', solver: { kind: 'direct' }, timestep_Myr: 0.5, duration_Myr: times[times.length - 1], softening_kpc: 0.1, snapshotEvery: 10, seed: 1 },
    output: {
      law: lawInfo(law),
      timescales: { halfMassRadius_kpc: 5, rmsSpeed_km_s: 150, crossingTime_Myr: 33, relaxationTime_Myr: 2500, orbitalPeriod_Myr: null, suggestedTimestep_Myr: 0.5, steps: 600, forceEvaluations: 600, interactions: 0 },
      warnings: [],
      diagnostics: times.map((t, k) => ({
        step: k * 10,
        time_Myr: t,
        kineticEnergy: 1,
        potentialEnergy: -2,
        totalEnergy: -1,
        energyDrift: k === 0 ? 0 : 1e-5 * Math.sin(k),
        momentum: { x: 0, y: 0, z: 0 },
        momentumDrift: 1e-15,
        angularMomentum: { x: 0, y: 0, z: 1 },
        angularMomentumDrift: 1e-14,
        virialRatio: 1,
        clausiusVirialRatio: 1,
        lagrangianRadii_kpc: { r10: 1, r50: 3, r90: 7 },
        toomreQ: null,
        centreOfMass: origin,
        centreOfMassVelocity: origin,
        densityCentre: origin,
      })),
      rotationCurves: { initial: curve(0), final: curve(times[times.length - 1]), analytic: { radii_kpc: radii, curves: [{ law: 'newton', label: 'Newtonian', v_km_s: radii.map((R) => 160 * (1 - Math.exp(-R / 2))) }] } },
      summary: { particleCount: n, totalSteps: 600, stepsCompleted: 600, forceEvaluations: 600, finalTime_Myr: times[times.length - 1], finalEnergyDrift: 1e-5, maxAbsEnergyDrift: 1e-5, finalMomentumDrift: 1e-15, finalAngularMomentumDrift: 1e-14, quantities: { energy: 'conserved', momentum: 'conserved', angularMomentum: 'conserved' }, equilibrium: { balancedFor: [{ system: 'disk', law: 'newton', label: 'Newtonian', ownLaw: true }], ownLaw: true, initialClausiusRatio: 1 } },
      snapshotParticles: n,
      frames: frames.map((f, k) => ({ frame: k, step: f.step, time_Myr: f.time_Myr })),
    },
  };
}

export const syntheticSnapshotBytes = (set: SnapshotSet) => Buffer.from(encodeSnapshots(set));
