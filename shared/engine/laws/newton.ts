import { z } from 'zod';
import { definePairKernel, pairKernel, type PairKernel } from '../solvers/types';
import { pairPotentialEnergy, scratchFor } from './pairwise';
import { defineLaw, type LawInfo } from './types';

/** Plummer-softened Newton: phi(s) = 1/s. */
export const newtonPairKernel = definePairKernel({
  name: 'newton',
  params: [],
  sample: [],
  potential: (s) => 1 / s,
  pull: (s) => 1 / (s * s * s),
  derivatives(s, _p, out) {
    const i2 = 1 / (s * s), i3 = i2 / s;
    out[0] = -i3; out[1] = 3 * i3 * i2; out[2] = -15 * i3 * i2 * i2;
  },
});

/** The softened Newtonian kernel, which the laws that scale or add to Newton's field also sum with. */
export const newtonKernel = (softening_kpc: number): PairKernel => pairKernel(newtonPairKernel, softening_kpc, []);

const info = (): LawInfo => ({
  kind: 'newton',
  label: 'Newtonian',
  conservesEnergy: true,
  conservesMomentum: true,
  conservesAngularMomentum: true,
  hasPotential: true,
  validity: 'Everywhere in the weak-field, slow-motion regime; softening changes forces within a few softening lengths.',
  notes: 'Plummer-softened pairwise sum. With the tree solver, momentum is conserved only to the accuracy of the approximate forces.',
});

export const newtonLaw = defineLaw({
  kind: 'newton',
  schema: z.strictObject({ kind: z.literal('newton') }).describe('Newtonian gravity, Plummer-softened'),
  label: 'Newtonian gravity',
  shortLabel: 'Newton',
  colour: 'periwinkle',
  preset: { kind: 'newton' },
  virial: 'potential',
  reference: true,
  pairKernel: newtonPairKernel,
  info,
  create(_params, { solver, softening_kpc }) {
    const kernel = newtonKernel(softening_kpc);
    const scratch = scratchFor();
    return {
      info: info(),
      accelerations: (sources, targets, out) => solver.field(sources, targets, kernel, out),
      potentialEnergy: (sources) => pairPotentialEnergy(solver, kernel, sources, scratch),
    };
  },
  modelAcceleration: (_params, model, R) => model.newtonAccel(R),
});
