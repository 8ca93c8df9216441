import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import type { GalaxySampleRequest } from '../../../shared/api/galaxies';
import type { SampleFitReport } from '../../../shared/galaxy/fit';
import { User } from './User';

// One joint fit across several galaxies: the request (galaxy ids included), the galaxies'
// names at the time, and the per-law result. Seen by the person who asked (and admins).
export const GalaxySample = defineEntity({
  name: 'GalaxySample',
  tableName: 'galaxy_samples',
  properties: {
    id: p.integer().primary().autoincrement(),
    requestedBy: () => p.manyToOne(User).index().deleteRule('cascade'),
    request: p.json<GalaxySampleRequest>(),
    galaxies: p.json<{ id: number; name: string }[]>(),
    results: p.json<SampleFitReport>(),
    createdAt: p.datetime().onCreate(() => new Date()),
  },
});
export type GalaxySample = InferEntity<typeof GalaxySample>;
