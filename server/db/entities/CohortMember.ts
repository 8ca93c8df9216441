import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { Cohort } from './Cohort';
import { User } from './User';

export const CohortMember = defineEntity({
  name: 'CohortMember',
  tableName: 'cohort_members',
  primaryKeys: ['cohort', 'user'],
  properties: {
    cohort: () => p.manyToOne(Cohort).primary().deleteRule('cascade'),
    user: () => p.manyToOne(User).primary().index().deleteRule('cascade'),
    joinedAt: p.datetime().onCreate(() => new Date()),
  },
});
export type CohortMember = InferEntity<typeof CohortMember>;
