import { z } from 'zod';
import { pairPotentialEnergy, scratchFor } from './pairwise';
import { defineLaw, type LawInfo } from './types';
import type { PairKernel } from '../solvers/types';

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
  label: `Yukawa (alpha ${p.alpha}, lambda ${p.lambda_kpc} kpc)`,
  conservesEnergy: true,
  conservesMomentum: true,
  conservesAngularMomentum: true,
  hasPotential: true,
  validity: 'A phenomenological fifth force, valid wherever its pair potential is assumed; softened like Newton (r replaced by sqrt(r^2 + eps^2)).',
  notes: 'Central pairwise force with a potential: energy, momentum and angular momentum are conserved.',
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
  info,
  create(params, { solver, softening_kpc }) {
    const kernel: PairKernel = {
      softening2_kpc2: softening_kpc * softening_kpc,
      yukawaAlpha: params.alpha,
      yukawaLambda_kpc: params.lambda_kpc,
    };
    const scratch = scratchFor();
    return {
      info: info(params),
      accelerations: (sources, targets, out) => solver.field(sources, targets, kernel, out),
      potentialEnergy: (sources) => pairPotentialEnergy(solver, kernel, sources, scratch),
    };
  },
  modelAcceleration: (params, model, R) => model.newtonAccel(R) + params.alpha * model.screenedAccel(R, params.lambda_kpc),
});
