import { z } from 'zod';
import { pairPotentialEnergy, scratchFor } from './pairwise';
import { defineLaw, type LawInfo } from './types';
import { definePairKernel, pairKernel } from '../solvers/types';

const { exp } = Math;

/**
 * phi(s) = (1 + alpha e^(-s/lambda)) / s. With e = alpha e^(-s/lambda) and L = lambda
 * (our own differentiation, checked against finite differences in the tests):
 * D1 = -(1 + e (1 + s/L)) / s^3, D2 = 3/s^5 + e (s^2 + 3 L s + 3 L^2) / (L^2 s^5),
 * D3 = -15/s^7 - e (s^3 + 6 L s^2 + 15 L^2 s + 15 L^3) / (L^3 s^7).
 */
export const yukawaPairKernel = definePairKernel({
  name: 'yukawa',
  params: ['alpha', 'lambda_kpc'],
  sample: [0.5, 2],
  potential: (s, [alpha, L]) => (1 + alpha * exp(-s / L)) / s,
  pull: (s, [alpha, L]) => (1 + alpha * exp(-s / L) * (1 + s / L)) / (s * s * s),
  derivatives(s, [alpha, L], out) {
    const e = alpha * exp(-s / L), i = 1 / s, i2 = i * i, i3 = i2 * i, i5 = i3 * i2, i7 = i5 * i2;
    out[0] = -i3 - (e * (s + L) * i3) / L;
    out[1] = 3 * i5 + (e * (s * s + 3 * L * s + 3 * L * L) * i5) / (L * L);
    out[2] = -15 * i7 - (e * (s * s * s + 6 * L * s * s + 15 * L * L * s + 15 * L * L * L) * i7) / (L * L * L);
  },
});

const schema = z
  .strictObject({
    kind: z.literal('yukawa'),
    alpha: z.number().min(-1).max(10).describe('strength of the fifth force relative to Newton').meta({ title: 'Strength α' }),
    lambda_kpc: z.number().positive().max(1e4).describe('range of the fifth force').meta({ title: 'Range λ' }),
  })
  .describe('Newton plus a Yukawa fifth force: Phi = -G m / r (1 + alpha e^(-r/lambda)), softened');

type YukawaParams = z.infer<typeof schema>;

const info = (p: YukawaParams): LawInfo => ({
  kind: 'yukawa',
  label: `Yukawa (α ${p.alpha}, λ ${p.lambda_kpc} kpc)`,
  conservesEnergy: true,
  conservesMomentum: true,
  conservesAngularMomentum: true,
  hasPotential: true,
  validity: 'A phenomenological fifth force, valid wherever its pair potential is assumed; softened like Newton (r replaced by sqrt(r^2 + eps^2)).',
  notes: `Central pairwise force with a potential: energy, momentum and angular momentum are conserved. A disk balanced for it takes Toomre's Q with G (1 + α), the pull at separations well below λ, so its Q is the same stability margin as under Newton (σ_R ${(1 + p.alpha).toFixed(2)} times larger).`,
});

export const yukawaLaw = defineLaw({
  kind: 'yukawa',
  schema,
  label: 'Newton + Yukawa fifth force',
  shortLabel: 'Yukawa',
  colour: 'rose',
  // Typical textbook magnitudes (from memory), not a fit to any system.
  preset: { kind: 'yukawa', alpha: 0.5, lambda_kpc: 10 },
  virial: 'clausius',
  pairKernel: yukawaPairKernel,
  info,
  create(params, { solver, softening_kpc }) {
    const kernel = pairKernel(yukawaPairKernel, softening_kpc, [params.alpha, params.lambda_kpc]);
    const scratch = scratchFor();
    return {
      info: info(params),
      accelerations: (sources, targets, out) => solver.field(sources, targets, kernel, out),
      potentialEnergy: (sources) => pairPotentialEnergy(solver, kernel, sources, scratch),
    };
  },
  // Below lambda the pair pull is (1 + alpha) times Newton's: Toomre's Q of a disk balanced for the law takes G (1 + alpha).
  localCoupling: (params) => 1 + params.alpha,
  modelAcceleration: (params, model, R) => model.newtonAccel(R) + params.alpha * model.screenedAccel(R, params.lambda_kpc),
});
