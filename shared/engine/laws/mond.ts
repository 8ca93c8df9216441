import { z } from 'zod';
import { newtonKernel } from './newton';
import { accelFromSI } from '../units';
import { defineLaw, type LawFitFamily, type LawInfo } from './types';
import type { EngineWarning } from '../timescales';

const schema = z
  .strictObject({
    kind: z.literal('mond'),
    interpolation: z
      .enum(['simple', 'standard', 'rar'])
      .default('simple')
      .describe('simple (Famaey & Binney 2005), standard (Milgrom 1983), rar: the radial-acceleration-relation fit (McGaugh, Lelli & Schombert 2016)')
      .meta({ title: 'Interpolating function', optionLabels: { simple: 'simple ν', standard: 'standard ν', rar: 'RAR ν' } }),
    a0_m_s2: z
      .number()
      .min(1e-12)
      .max(1e-8)
      .default(1.2e-10)
      .describe('acceleration scale; 1.2e-10 m/s^2 as in Begeman, Broeils & Sanders 1991')
      .meta({ title: 'a₀' }),
  })
  .describe('MOND, algebraic form: a = nu(|g_N|/a0) g_N on each particle');

type MondParams = z.infer<typeof schema>;

/** nu(y) with y = |g_N| / a0 > 0: the boost of the Newtonian field. */
export function mondNu(interpolation: MondParams['interpolation'], y: number): number {
  switch (interpolation) {
    case 'simple':
      return 0.5 + Math.sqrt(0.25 + 1 / y);
    case 'standard':
      return Math.sqrt(0.5 + 0.5 * Math.sqrt(1 + 4 / (y * y)));
    case 'rar':
      return 1 / -Math.expm1(-Math.sqrt(y));
  }
}

/** |g| from |g_N|, both (km/s)^2/kpc. */
export function mondAcceleration(p: MondParams, gN: number): number {
  if (gN <= 0) return 0;
  const a0 = accelFromSI(p.a0_m_s2);
  return mondNu(p.interpolation, gN / a0) * gN;
}

const LABELS: Record<MondParams['interpolation'], string> = {
  simple: 'MOND (simple ν)',
  standard: 'MOND (standard ν)',
  rar: 'MOND (RAR ν)',
};

/** One fit per interpolating function: a0 fixed or shared and free, mass-to-light ratios free. */
const fitFor = (interpolation: MondParams['interpolation']): LawFitFamily => ({
  id: `mond-${interpolation}`,
  label: LABELS[interpolation],
  extra: 'boost',
  shared: (o) => (o.a0 === 'free' ? [{ name: 'a0', unit: 'm/s^2', scale: 1e-10, min: 1e-11, max: 1e-9, starts: [0.7e-10, 1.2e-10, 2e-10] }] : []),
  own: () => [],
  acceleration(shared, _own, o) {
    const law: MondParams = { kind: 'mond', interpolation, a0_m_s2: o.a0 === 'free' ? shared[0] : o.a0_m_s2 };
    return (model, R) => mondAcceleration(law, model.newtonAccel(R));
  },
});

const info = (p: MondParams): LawInfo => ({
  kind: 'mond',
  label: LABELS[p.interpolation],
  conservesEnergy: false,
  conservesMomentum: false,
  conservesAngularMomentum: false,
  hasPotential: false,
  validity:
    'The algebraic form is exact only for symmetric (spherical, cylindrical, planar) configurations; elsewhere it approximates the field equations of MOND. ' +
    'For N-body runs use the field form (QUMOND), which has a potential and conserves momentum; keep this form for rotation curves and short, quick runs.',
  notes:
    'Each particle\'s own Newtonian field is boosted by ν(|g_N|/a0), so the forces are not pairwise: particle noise makes an isolated system push itself, ' +
    'and there is no potential. Momentum and energy drifts here are artefacts of the algebraic form, not MOND physics and not integrator error.',
  readings: {
    meaningful: 'Rotation curves (analytic, and measured from the forces at t = 0) and structure over a few crossing times: Lagrangian radii, the Clausius ratio, the shape of a disk.',
    notMeaningful: 'Total momentum, energy, and the drift of the centre of mass: they grow from the particle noise of the algebraic form (less with more particles) and say nothing about MOND.',
  },
});

export const mondLaw = defineLaw({
  kind: 'mond',
  schema,
  label: 'MOND, algebraic form',
  shortLabel: 'MOND (algebraic)',
  colour: 'amber',
  preset: { kind: 'mond', interpolation: 'simple', a0_m_s2: 1.2e-10 },
  virial: 'clausius',
  pairsWithReference: true,
  fits: [fitFor('simple'), fitFor('standard'), fitFor('rar')],
  info,
  warnings(_params, { traits }): EngineWarning[] {
    if (traits.geometry !== 'flattened') return [];
    return [{
      code: 'algebraic-mond-approximate',
      severity: 'info',
      message: 'algebraic MOND is exact only for symmetric configurations; for disks and encounters it approximates the field equations (QUMOND, Milgrom 2010), and the momentum, energy and centre drift of such a run are artefacts of the algebraic form: read its curves and short-time structure only, or use the field form',
      source: 'Milgrom 2010',
    }];
  },
  create(params, { solver, softening_kpc }) {
    const kernel = newtonKernel(softening_kpc);
    return {
      info: info(params),
      accelerations(sources, targets, out) {
        solver.field(sources, targets, kernel, out);
        for (let i = 0; i < targets.x.length; i++) {
          const gN = Math.hypot(out.ax[i], out.ay[i], out.az[i]);
          if (gN === 0) continue;
          const boost = mondAcceleration(params, gN) / gN;
          out.ax[i] *= boost;
          out.ay[i] *= boost;
          out.az[i] *= boost;
        }
      },
    };
  },
  modelAcceleration: (params, model, R) => mondAcceleration(params, model.newtonAccel(R)),
});
