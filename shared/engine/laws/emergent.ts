import { z } from 'zod';
import { radialProfile } from '../radialProfile';
import { newtonKernel } from '../solvers/types';
import { C_KM_S, G } from '../units';
import { defineLaw, type LawInfo } from './types';

const schema = z
  .object({
    kind: z.literal('emergent'),
    H0_km_s_Mpc: z.number().min(20).max(200).default(70).describe('Hubble constant; sets a_M = c H0 / 6'),
  })
  .describe('Emergent gravity, spherical form (Verlinde 2016), about the centre of mass');

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

const info = (): LawInfo => ({
  kind: 'emergent',
  label: 'Emergent gravity (spherical)',
  conservesEnergy: false,
  conservesMomentum: false,
  conservesAngularMomentum: false,
  hasPotential: false,
  validity:
    'Derived for quasi-static, roughly spherical, isolated systems; disks, encounters and systems far from equilibrium are outside its domain, so treat those results as illustrations.',
  notes:
    'Newtonian pairwise field plus the radial pull of the apparent dark mass, from the particles\' spherically averaged profile about their centre of mass. No potential; energy and momentum are not conserved.',
});

export const emergentLaw = defineLaw({
  kind: 'emergent',
  schema,
  info,
  create(params, { solver, softening_kpc }) {
    const kernel = newtonKernel(softening_kpc);
    const aM = emergentScale(params);
    return {
      info: info(),
      accelerations(sources, targets, out) {
        solver.field(sources, targets, kernel, out);
        let M = 0, cx = 0, cy = 0, cz = 0;
        for (let i = 0; i < sources.m.length; i++) {
          const mi = sources.m[i];
          M += mi; cx += mi * sources.x[i]; cy += mi * sources.y[i]; cz += mi * sources.z[i];
        }
        cx /= M; cy /= M; cz /= M;
        const profile = radialProfile(sources, cx, cy, cz);
        for (let i = 0; i < targets.x.length; i++) {
          const dx = targets.x[i] - cx, dy = targets.y[i] - cy, dz = targets.z[i] - cz;
          const r = Math.sqrt(dx * dx + dy * dy + dz * dz);
          if (r === 0) continue;
          const g = apparentDarkAcceleration(aM, profile.enclosedMass(r), profile.enclosedMassSlope(r), r) / r;
          out.ax[i] -= g * dx;
          out.ay[i] -= g * dy;
          out.az[i] -= g * dz;
        }
      },
    };
  },
  modelAcceleration(params, model, R) {
    return model.newtonAccel(R) + apparentDarkAcceleration(emergentScale(params), model.enclosedMass(R), model.enclosedMassSlope(R), R);
  },
});
