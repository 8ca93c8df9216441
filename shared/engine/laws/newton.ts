import { z } from 'zod';
import { newtonKernel } from '../solvers/types';
import { pairPotentialEnergy, scratchFor } from './pairwise';
import { defineLaw, type LawInfo } from './types';

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
