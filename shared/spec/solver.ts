import { z } from 'zod';

export const solverSchema = z.discriminatedUnion('kind', [
  z.strictObject({ kind: z.literal('direct') }).describe('direct pairwise sum'),
  z
    .strictObject({ kind: z.literal('tree'), theta: z.number().min(0.1).max(1.5).default(0.6).describe('opening angle').meta({ title: 'Opening angle θ' }) })
    .describe('Barnes & Hut (1986) octree'),
]);

export type SolverSpec = z.infer<typeof solverSchema>;
