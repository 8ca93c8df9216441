// Every pair kernel the solvers can sum, declared by the law modules that own
// them. A law with a pair potential of its own adds its definition here (one
// line); the direct sum, the tree and the thread split find it by name.
import type { PairKernelDefinition } from '../solvers/types';
import { newtonPairKernel } from './newton';
import { yukawaPairKernel } from './yukawa';

export const PAIR_KERNELS: readonly PairKernelDefinition[] = [newtonPairKernel, yukawaPairKernel];

export function pairKernelDefinition(name: string): PairKernelDefinition {
  const found = PAIR_KERNELS.find((k) => k.name === name);
  if (!found) throw new Error(`unknown pair kernel "${name}" (registered: ${PAIR_KERNELS.map((k) => k.name).join(', ')})`);
  return found;
}
