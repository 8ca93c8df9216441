import type { SolverSpec } from '../../spec/runSpec';
import { directSolver } from './direct';
import { treeSolver } from './tree';
import type { FieldSolver } from './types';

export type { FieldSolver, PairKernel, PairKernelDefinition } from './types';
export { directFieldRange, directPotentialRange } from './direct';
export { applyDirectKernelSetting, directKernelInUse, setDirectKernel } from './directWasm';
export type { DirectKernelChoice } from './directWasm';
export { buildOctree, treeFieldRange, treeGroups, treePotentialRange, treeWorkUnits } from './tree';
export type { Octree } from './tree';

export function makeSolver(spec: SolverSpec): FieldSolver {
  switch (spec.kind) {
    case 'direct':
      return directSolver;
    case 'tree':
      return treeSolver(spec.theta);
  }
}
