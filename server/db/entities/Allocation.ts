import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { User } from './User';

// One row per user who has submitted or been granted compute. Admission locks it
// (SELECT ... FOR UPDATE) so concurrent submissions of one user are decided one at a
// time. Non-null limits are an admin's grant and override role and cohort quotas.
export const Allocation = defineEntity({
  name: 'Allocation',
  tableName: 'allocations',
  properties: {
    user: () => p.oneToOne(User).primary().owner().deleteRule('cascade'),
    maxParticles: p.integer().nullable(),
    maxSteps: p.integer().nullable(),
    maxConcurrentRuns: p.integer().nullable(),
    dailyInteractions: p.bigint('number').nullable(),
    maxUploadBytes: p.integer().nullable(),
    maxUploadRows: p.integer().nullable(),
    // UTC day the 80 % budget warning was last sent, so it goes out once a day.
    warnedOn: p.date().nullable(),
  },
});
export type Allocation = InferEntity<typeof Allocation>;
