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

// Body of POST /api/runs/:id/extend: carry a finished run on by this much more simulated time.
export const extendRunBodySchema = z
  .object({
    more_Myr: z.number().positive('more_Myr must be above 0').max(1e6, 'more_Myr is at most 1e6'),
  })
  .strict();
export type ExtendRunBody = z.infer<typeof extendRunBodySchema>;
