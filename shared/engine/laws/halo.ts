import { z } from 'zod';
import { newtonKernel } from '../solvers/types';
import { G } from '../units';
import { pairPotentialEnergy, scratchFor } from './pairwise';
import { defineLaw, type FitParam, type LawFitFamily, type LawInfo } from './types';
import type { MassModel } from '../models/massModel';
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

/** Hubble constant that defines the NFW halo's virial radius (r200 where the mean density is 200 rho_crit). Common practice: 70 km/s/Mpc. */
export const HALO_H0_KM_S_MPC = 70;
/**
 * Concentration-mass relation for NFW halos at z = 0:
 * log10 c200 = a + b log10(M200 / (1e12 Msun/h)), b = -0.097 and a near 1.025
 * (Dutton & Maccio 2014, Planck cosmology; from memory). In a sample fit a is
 * the one shared halo scaling parameter; b is held.
 */
export const CM_SLOPE = -0.097;
export const CM_NORMALISATION = 1.025;
const LITTLE_H = HALO_H0_KM_S_MPC / 100;

/** NFW (r_s, rho0) from V200 and c200, H0 = HALO_H0 (Navarro, Frenk & White 1997 definitions). */
export function nfwFromV200(V200: number, c: number): { scale_kpc: number; density_Msun_kpc3: number; r200_kpc: number; M200_Msun: number } {
  const H = HALO_H0_KM_S_MPC / 1000; // km/s/kpc
  const r200 = V200 / (10 * H);
  const rhoCrit = (3 * H * H) / (8 * Math.PI * G);
  const deltaC = ((200 / 3) * c ** 3) / (Math.log1p(c) - c / (1 + c));
  return { scale_kpc: r200 / c, density_Msun_kpc3: deltaC * rhoCrit, r200_kpc: r200, M200_Msun: (V200 * V200 * r200) / G };
}

/** c200 on the concentration-mass relation with normalisation a. */
export function concentrationFor(V200: number, a: number): number {
  const { M200_Msun } = nfwFromV200(V200, 10);
  return 10 ** (a + CM_SLOPE * Math.log10((M200_Msun * LITTLE_H) / 1e12));
}

const haloAccel = (p: HaloParams) => (model: MassModel, R: number) => model.newtonAccel(R) + haloAcceleration(p, R);
const nfwParams = (V200: number, c: number): HaloParams => {
  const { scale_kpc, density_Msun_kpc3 } = nfwFromV200(V200, c);
  return { kind: 'halo', profile: 'nfw', scale_kpc, density_Msun_kpc3 };
};
const V200: FitParam = { name: 'V200', unit: 'km/s', scale: 100, min: 10, max: 500, starts: [60, 120, 250] };
const fittedValue = (fit: { params: { name: string; value: number }[] }, name: string): number => fit.params.find((p) => p.name === name)!.value;

const LABELS: Record<HaloParams['profile'], string> = {
  nfw: 'Newtonian + NFW halo',
  'cored-isothermal': 'Newtonian + cored isothermal halo',
};

/** Newton + an NFW halo (V200 and c200, or c200 from a shared concentration-mass relation in a sample), and + a cored isothermal halo. */
const FITS: LawFitFamily[] = [
  {
    id: 'nfw',
    label: LABELS.nfw,
    extra: 'halo',
    shared: (_o, sample) => (sample ? [{ name: 'cmNormalisation', unit: 'dex', scale: 1, min: 0.2, max: 2, starts: [0.8, CM_NORMALISATION, 1.3] }] : []),
    own: (_o, sample) => (sample ? [V200] : [V200, { name: 'c200', unit: '', scale: 10, min: 1, max: 50, starts: [5, 10, 20] }]),
    acceleration: (shared, own) => haloAccel(nfwParams(own[0], shared.length ? concentrationFor(own[0], shared[0]) : own[1])),
    derived(shared, own) {
      const c = shared.length ? concentrationFor(own[0], shared[0]) : own[1];
      const h = nfwFromV200(own[0], c);
      return { c200: c, r_s_kpc: h.scale_kpc, rho0_Msun_kpc3: h.density_Msun_kpc3, r200_kpc: h.r200_kpc, M200_Msun: h.M200_Msun };
    },
    runLaw: (fit) => ({ kind: 'halo', profile: 'nfw', scale_kpc: fit.derived.r_s_kpc, density_Msun_kpc3: fit.derived.rho0_Msun_kpc3 }),
  },
  {
    id: 'isothermal',
    label: LABELS['cored-isothermal'],
    extra: 'halo',
    shared: () => [],
    own: () => [
      { name: 'log10_rho0', unit: 'log10 Msun/kpc^3', scale: 1, min: 4, max: 11, starts: [6.5, 7.5, 8.5] },
      { name: 'r_core', unit: 'kpc', scale: 1, min: 0.05, max: 50, starts: [0.5, 2, 8] },
    ],
    acceleration: (_shared, own) => haloAccel({ kind: 'halo', profile: 'cored-isothermal', density_Msun_kpc3: 10 ** own[0], scale_kpc: own[1] }),
    runLaw: (fit) => ({ kind: 'halo', profile: 'cored-isothermal', scale_kpc: fittedValue(fit, 'r_core'), density_Msun_kpc3: 10 ** fittedValue(fit, 'log10_rho0') }),
  },
];

const info = (p: HaloParams): LawInfo => ({
  kind: 'halo',
  label: LABELS[p.profile],
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
  fits: FITS,
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
  modelAcceleration: (params, model, R) => haloAccel(params)(model, R),
});
