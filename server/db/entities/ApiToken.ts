import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { User } from './User';

// A personal API token. Only a hash of the secret is kept; the secret is shown once.
export const ApiToken = defineEntity({
  name: 'ApiToken',
  tableName: 'api_tokens',
  properties: {
    id: p.integer().primary().autoincrement(),
    user: () => p.manyToOne(User).index().deleteRule('cascade'),
    name: p.string(),
    prefix: p.string(),
    hash: p.string().unique(),
    createdAt: p.datetime().onCreate(() => new Date()),
    lastUsedAt: p.datetime().nullable(),
    expiresAt: p.datetime(),
  },
});
export type ApiToken = InferEntity<typeof ApiToken>;
