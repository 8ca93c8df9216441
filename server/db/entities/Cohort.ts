import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { User } from './User';

// A class or lab group run by one instructor. Its quota applies to its student members.
export const Cohort = defineEntity({
  name: 'Cohort',
  tableName: 'cohorts',
  properties: {
    id: p.integer().primary().autoincrement(),
    name: p.string(),
    enrolmentCode: p.string().unique(),
    instructor: () => p.manyToOne(User).index(),
    maxParticles: p.integer(),
    maxSteps: p.integer(),
    maxConcurrentRuns: p.integer(),
    dailyInteractions: p.bigint('number'),
    // Upload limits came later: null means the cohort gives the student default.
    maxUploadBytes: p.integer().nullable(),
    maxUploadRows: p.integer().nullable(),
    createdAt: p.datetime().onCreate(() => new Date()),
  },
});
export type Cohort = InferEntity<typeof Cohort>;
