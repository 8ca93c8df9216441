import { z } from 'zod';
import { densityCentre } from '../centre';
import { radialProfile, type RadialMassProfile } from '../radialProfile';
import { allocateAccelerations, type Accelerations, type Points } from '../state';
import type { Vector3 } from '../diagnostics';
import { newtonKernel } from '../solvers/types';
import { C_KM_S, G } from '../units';
import { defineLaw, type LawInfo } from './types';
import type { MassModel } from '../models/massModel';
import type { EngineWarning } from '../timescales';

const schema = z
  .strictObject({
    kind: z.literal('emergent'),
    H0_km_s_Mpc: z.number().min(20).max(200).default(70).describe('Hubble constant; sets a_M = c H0 / 6').meta({ title: 'H₀' }),
  })
  .describe('Emergent gravity, spherical form (Verlinde 2016), about the density centre and balanced so the system cannot push itself');

type EmergentParams = z.infer<typeof schema>;

/** a_M = c H0 / 6 in (km/s)^2/kpc (H0 converted from per-Mpc to per-kpc). */
export const emergentScale = (p: EmergentParams): number => (C_KM_S * (p.H0_km_s_Mpc / 1000)) / 6;

/**
 * Pull of the apparent dark mass at radius r: with
 * M_D(r)^2 = (a_M r^2 / G) d(M_B r)/dr, g_D = G M_D / r^2 = sqrt(G a_M d(M_B r)/dr) / r.
 */
export function apparentDarkAcceleration(aM: number, mass: number, slope: number, r: number): number {
  if (r === 0) return 0;
  return Math.sqrt(G * aM * (mass + r * slope)) / r;
}

const LABEL = 'Emergent gravity (spherical)';

const emergentAcceleration = (p: EmergentParams, model: MassModel, R: number): number =>
  model.newtonAccel(R) + apparentDarkAcceleration(emergentScale(p), model.enclosedMass(R), model.enclosedMassSlope(R), R);

const info = (): LawInfo => ({
  kind: 'emergent',
  label: LABEL,
  conservesEnergy: false,
  conservesMomentum: true,
  conservesAngularMomentum: false,
  hasPotential: false,
  validity:
    'Derived for quasi-static, roughly spherical, isolated systems; disks, encounters and systems far from equilibrium are outside its domain, so treat those results as illustrations.',
  notes:
    'Newtonian pairwise field plus the radial pull of the apparent dark mass. That pull comes from the particles\' spherically averaged mass profile ' +
    '(a kernel-smoothed cumulative mass, biweight kernel in r^3) taken about their density centre (shrinking spheres), so it follows the galaxy rather than stray particles. ' +
    'The apparent dark mass is a function of the baryons alone, so an isolated system must not push itself: the net pull, sum of m a over all particles, ' +
    'is removed by subtracting the same acceleration (net pull / total mass) from every particle and probe. Total momentum is then conserved to rounding with the direct solver. ' +
    'With the tree solver momentum is conserved only to the accuracy of the approximate forces. ' +
    'There is no potential, so energy is not defined and angular momentum is not conserved.',
  readings: {
    meaningful: 'Rotation curves, Lagrangian radii and the Clausius ratio of roughly spherical, quasi-static systems; total momentum and the centre of mass (balanced, so any drift is integration error).',
    notMeaningful: 'Energy (the law has no potential) and angular momentum; any result for disks, encounters or systems far from equilibrium beyond illustration.',
  },
});

/** The apparent-dark-mass pull towards the centre at every point (written, not added). */
function darkPull(aM: number, profile: RadialMassProfile, c: Vector3, at: Points, out: Accelerations): void {
  for (let i = 0; i < at.x.length; i++) {
    const dx = at.x[i] - c.x, dy = at.y[i] - c.y, dz = at.z[i] - c.z;
    const r = Math.sqrt(dx * dx + dy * dy + dz * dz);
    const g = r === 0 ? 0 : apparentDarkAcceleration(aM, profile.enclosedMass(r), profile.enclosedMassSlope(r), r) / r;
    out.ax[i] = -g * dx;
    out.ay[i] = -g * dy;
    out.az[i] = -g * dz;
  }
}

export const emergentLaw = defineLaw({
  kind: 'emergent',
  schema,
  label: LABEL,
  shortLabel: 'Emergent',
  colour: 'teal',
  preset: { kind: 'emergent', H0_km_s_Mpc: 70 },
  virial: 'clausius',
  fits: [{
    id: 'emergent',
    label: LABEL,
    extra: 'boost',
    shared: (o) => (o.H0 === 'free' ? [{ name: 'H0', unit: 'km/s/Mpc', scale: 70, min: 20, max: 200, starts: [50, 70, 100] }] : []),
    own: () => [],
    acceleration(shared, _own, o) {
      const law: EmergentParams = { kind: 'emergent', H0_km_s_Mpc: o.H0 === 'free' ? shared[0] : o.H0_km_s_Mpc };
      return (model, R) => emergentAcceleration(law, model, R);
    },
  }],
  info,
  warnings(_params, { traits }): EngineWarning[] {
    if (traits.geometry === 'spherical') return [];
    const flattened = traits.geometry === 'flattened';
    return [{
      code: 'outside-validity',
      severity: flattened ? 'warning' : 'info',
      message: flattened
        ? 'emergent gravity is derived for quasi-static spherical systems; for a disk or an encounter the apparent dark mass from the spherically averaged profile is only an illustration'
        : 'emergent gravity is derived for quasi-static spherical systems; check that the uploaded system is roughly spherical',
      source: 'Verlinde 2016',
    }];
  },
  create(params, { solver, softening_kpc }) {
    const kernel = newtonKernel(softening_kpc);
    const aM = emergentScale(params);
    let dark = allocateAccelerations(0), probes = allocateAccelerations(0);
    return {
      info: info(),
      accelerations(sources, targets, out) {
        solver.field(sources, targets, kernel, out);
        const c = densityCentre(sources);
        const profile = radialProfile(sources, c.x, c.y, c.z);
        // The pull on the sources themselves gives the net force to balance.
        const n = sources.m.length;
        if (dark.ax.length !== n) dark = allocateAccelerations(n);
        darkPull(aM, profile, c, sources, dark);
        let M = 0, fx = 0, fy = 0, fz = 0;
        for (let i = 0; i < n; i++) {
          const mi = sources.m[i];
          M += mi; fx += mi * dark.ax[i]; fy += mi * dark.ay[i]; fz += mi * dark.az[i];
        }
        const bx = fx / M, by = fy / M, bz = fz / M;
        if (targets !== sources) {
          if (probes.ax.length !== targets.x.length) probes = allocateAccelerations(targets.x.length);
          darkPull(aM, profile, c, targets, probes);
        }
        const add = targets === sources ? dark : probes;
        for (let i = 0; i < targets.x.length; i++) {
          out.ax[i] += add.ax[i] - bx;
          out.ay[i] += add.ay[i] - by;
          out.az[i] += add.az[i] - bz;
        }
      },
    };
  },
  modelAcceleration: (params, model, R) => emergentAcceleration(params, model, R),
});
