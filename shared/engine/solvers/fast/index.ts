// Kernels with loops of their own, by registered kernel name. Optional: a
// kernel missing here runs the generic loops of its definition (pair.ts).
import type { PairLoops } from '../types';
import { newtonLoops } from './newton';
import { yukawaLoops } from './yukawa';

export const FAST_PATHS: ReadonlyMap<string, PairLoops> = new Map([
  ['newton', newtonLoops],
  ['yukawa', yukawaLoops],
]);
