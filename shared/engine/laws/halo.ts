import { z } from 'zod';
import { newtonKernel } from '../solvers/types';
import { G } from '../units';
import { pairPotentialEnergy, scratchFor } from './pairwise';
import { defineLaw, type LawInfo } from './types';
import type { EngineWarning } from '../timescales';
import type { Sources } from '../state';

const schema = z
  .strictObject({
    kind: z.literal('halo'),
    profile: z
      .enum(['nfw', 'cored-isothermal'])
      .describe('nfw: rho = rho0 / (x (1+x)^2) (Navarro, Frenk & White 1996); cored-isothermal: rho = rho0 / (1 + x^2); x = r / scale')
      .meta({ title: 'Halo profile', optionLabels: { nfw: 'NFW', 'cored-isothermal': 'cored isothermal' } }),
    scale_kpc: z.number().positive().max(1000).describe('NFW scale radius or isothermal core radius').meta({ title: 'Scale radius' }),
    density_Msun_kpc3: z.number().positive().max(1e12).describe('characteristic density rho0').meta({ title: 'Density ρ₀' }),
  })
  .describe('Newtonian gravity plus a static spherical dark halo fixed at the origin');

type HaloParams = z.infer<typeof schema>;

/** Halo mass inside r, Msun. */
export function haloEnclosedMass(p: HaloParams, r: number): number {
  const x = r / p.scale_kpc;
  const m0 = 4 * Math.PI * p.density_Msun_kpc3 * p.scale_kpc ** 3;
  if (p.profile === 'nfw') return m0 * (Math.log1p(x) - x / (1 + x));
  return m0 * (x - Math.atan(x));
}

/** Halo potential, (km/s)^2. NFW is zero at infinity; the isothermal one (divergent there) is zero at the centre. */
export function haloPotential(p: HaloParams, r: number): number {
  const x = r / p.scale_kpc;
  const k = 4 * Math.PI * G * p.density_Msun_kpc3 * p.scale_kpc ** 2;
  if (p.profile === 'nfw') return x === 0 ? -k : (-k * Math.log1p(x)) / x;
  if (x < 1e-4) return (k * x * x) / 6; // series of the form below, which cancels badly near 0
  return k * (Math.atan(x) / x - 1 + 0.5 * Math.log1p(x * x));
}

/** Magnitude of the halo's pull toward the origin, (km/s)^2/kpc. */
export function haloAcceleration(p: HaloParams, r: number): number {
  return r === 0 ? 0 : (G * haloEnclosedMass(p, r)) / (r * r);
}

const info = (p: HaloParams): LawInfo => ({
  kind: 'halo',
  label: p.profile === 'nfw' ? 'Newtonian + NFW halo' : 'Newtonian + cored isothermal halo',
  conservesEnergy: true,
  conservesMomentum: false,
  conservesAngularMomentum: true,
  hasPotential: true,
  validity: 'A rigid halo that does not respond to the particles: fine for a settled galaxy, not for mergers that would heat or move the halo.',
  notes:
    'The halo is an external field fixed at the origin: it changes the particles\' total momentum by its own pull (an impulse from outside, not an error), ' +
    'while energy and angular momentum about the origin are conserved. Energy drift is scaled by K0 + |W_self| (the halo term left out), ' +
    'so the halo potential\'s arbitrary zero point does not change it. 2K/|W| means nothing here; read the Clausius ratio.',
});

export const haloLaw = defineLaw({
  kind: 'halo',
  schema,
  label: 'Newtonian + static dark halo',
  shortLabel: 'Newton + halo',
  colour: 'lavender',
  // A typical galaxy halo's magnitude (from memory), not a fit to any galaxy.
  preset: { kind: 'halo', profile: 'nfw', scale_kpc: 15, density_Msun_kpc3: 7e6 },
  virial: 'clausius',
  info,
  warnings(_params, { traits }): EngineWarning[] {
    if (traits.systems < 2) return [];
    return [{
      code: 'halo-fixed-at-origin',
      severity: 'warning',
      message: 'the static halo sits at the origin (the initial centre of mass); both systems move through it, and neither carries a halo of its own',
      source: 'this engine',
    }];
  },
  create(params, { solver, softening_kpc }) {
    const kernel = newtonKernel(softening_kpc);
    const scratch = scratchFor();
    const external = (sources: Sources): number => {
      let w = 0;
      for (let i = 0; i < sources.m.length; i++) w += sources.m[i] * haloPotential(params, Math.hypot(sources.x[i], sources.y[i], sources.z[i]));
      return w;
    };
    return {
      info: info(params),
      accelerations(sources, targets, out) {
        solver.field(sources, targets, kernel, out);
        for (let i = 0; i < targets.x.length; i++) {
          const x = targets.x[i], y = targets.y[i], z = targets.z[i];
          const r = Math.sqrt(x * x + y * y + z * z);
          if (r === 0) continue;
          const g = haloAcceleration(params, r) / r;
          out.ax[i] -= g * x;
          out.ay[i] -= g * y;
          out.az[i] -= g * z;
        }
      },
      potentialEnergy: (sources) => pairPotentialEnergy(solver, kernel, sources, scratch) + external(sources),
      externalPotentialEnergy: external,
    };
  },
  modelAcceleration: (params, model, R) => model.newtonAccel(R) + haloAcceleration(params, R),
});
