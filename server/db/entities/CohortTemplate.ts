import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import type { RunSpec } from '../../../shared/spec';
import { Cohort } from './Cohort';
import { User } from './User';

// A run submission an instructor publishes for a cohort's students to clone.
export const CohortTemplate = defineEntity({
  name: 'CohortTemplate',
  tableName: 'cohort_templates',
  properties: {
    id: p.integer().primary().autoincrement(),
    cohort: () => p.manyToOne(Cohort).index().deleteRule('cascade'),
    name: p.string(),
    description: p.text().default(''),
    spec: p.json<RunSpec>(),
    pairLaw: p.json<RunSpec['law']>().nullable(),
    createdBy: () => p.manyToOne(User),
    createdAt: p.datetime().onCreate(() => new Date()),
  },
});
export type CohortTemplate = InferEntity<typeof CohortTemplate>;
