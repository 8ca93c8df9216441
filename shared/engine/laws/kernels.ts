// Every pair kernel the solvers can sum: those the law modules declare (`pairKernel`), so a
// law with a pair potential of its own adds nothing here; the direct sum, the tree and the
// thread split find a kernel by name.
import type { PairKernelDefinition } from '../solvers/types';
import { LAW_MODULES } from './list';

let kernels: readonly PairKernelDefinition[] | undefined;

/** Read on first use, not at load: the solvers that ask are themselves loaded by the law modules. */
export function pairKernels(): readonly PairKernelDefinition[] {
  kernels ??= LAW_MODULES.flatMap((m) => (m.pairKernel ? [m.pairKernel] : []));
  return kernels;
}

export function pairKernelDefinition(name: string): PairKernelDefinition {
  const found = pairKernels().find((k) => k.name === name);
  if (!found) throw new Error(`unknown pair kernel "${name}" (registered: ${pairKernels().map((k) => k.name).join(', ')})`);
  return found;
}
