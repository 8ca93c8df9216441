import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { GALAXY_VISIBILITIES, type GalaxyCurve, type GalaxyMapping } from '../../../shared/api/galaxies';
import { Cohort } from './Cohort';
import { User } from './User';

// An observed rotation curve as uploaded: the raw file kept byte for byte beside the
// parsed curve, so what was read can always be checked against what was sent.
export const Galaxy = defineEntity({
  name: 'Galaxy',
  tableName: 'galaxies',
  properties: {
    id: p.integer().primary().autoincrement(),
    owner: () => p.manyToOne(User).index(),
    name: p.string(),
    visibility: p.enum([...GALAXY_VISIBILITIES]).default('private').index(),
    // Only for visibility 'cohort': the cohort whose members and instructor may see it.
    cohort: () => p.manyToOne(Cohort).nullable().index().deleteRule('set null'),
    // Demo galaxies made up for the seed say so on every screen.
    invented: p.boolean().default(false),
    fileName: p.string(),
    fileBytes: p.blob(),
    fileSize: p.integer(),
    mapping: p.json<GalaxyMapping>(),
    curve: p.json<GalaxyCurve>(),
    points: p.integer(),
    uploadedAt: p.datetime().onCreate(() => new Date()),
  },
});
export type Galaxy = InferEntity<typeof Galaxy>;
