import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { User } from './User';

// The usage ledger: one row per admitted submission, charged against the UTC day.
export const UsageEntry = defineEntity({
  name: 'UsageEntry',
  tableName: 'usage_ledger',
  indexes: [{ properties: ['user', 'day'] }],
  properties: {
    id: p.integer().primary().autoincrement(),
    user: () => p.manyToOne(User).deleteRule('cascade'),
    day: p.date(),
    interactions: p.bigint('number'),
    runs: p.integer(),
    createdAt: p.datetime().onCreate(() => new Date()),
  },
});
export type UsageEntry = InferEntity<typeof UsageEntry>;
