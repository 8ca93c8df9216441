import type { SolverSpec } from '../../spec/runSpec';
import { directSolver } from './direct';
import type { FieldSolver } from './types';

export type { FieldSolver, PairKernel } from './types';
export { directFieldRange, directPotentialRange } from './direct';

export function makeSolver(spec: SolverSpec): FieldSolver {
  switch (spec.kind) {
    case 'direct':
      return directSolver;
    default:
      throw new Error(`solver "${spec.kind}" is not available yet`);
  }
}
