import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import type { GalaxyFitRequest } from '../../../shared/api/galaxies';
import type { GalaxyFitReport } from '../../../shared/galaxy/fit';
import { Galaxy } from './Galaxy';
import { User } from './User';

// One fit request on one galaxy and what came out of it, per law.
export const GalaxyFit = defineEntity({
  name: 'GalaxyFit',
  tableName: 'galaxy_fits',
  properties: {
    id: p.integer().primary().autoincrement(),
    galaxy: () => p.manyToOne(Galaxy).index().deleteRule('cascade'),
    requestedBy: () => p.manyToOne(User),
    request: p.json<GalaxyFitRequest>(),
    results: p.json<GalaxyFitReport>(),
    createdAt: p.datetime().onCreate(() => new Date()),
  },
});
export type GalaxyFit = InferEntity<typeof GalaxyFit>;
