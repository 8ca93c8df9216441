import { z } from 'zod';
import { runNameSchema } from '../spec/runSpec';

// Body of POST /api/runs. The spec itself is checked by the shared run-spec
// schema (so its errors name fields like "spec.model.n"); `pairLaw` asks for a
// second run with the same initial conditions under another force law. The name
// may sit here or in spec.name; given in both places, the two must agree.
export const submitRunBodySchema = z
  .object({
    name: runNameSchema.optional(),
    spec: z.unknown(),
    pairLaw: z.unknown().optional(),
  })
  .strict();
export type SubmitRunBody = z.infer<typeof submitRunBodySchema>;

export const listRunsQuerySchema = z
  .object({
    status: z.enum(['queued', 'running', 'finished', 'failed', 'cancelled']).optional(),
    law: z.string().max(40).optional(),
    cohort: z.coerce.number().int().positive().optional(),
    pair: z.uuid().optional(),
    limit: z.coerce.number().int().min(1).max(200).default(50),
  })
  .strict();
export type ListRunsQuery = z.infer<typeof listRunsQuerySchema>;
