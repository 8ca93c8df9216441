import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { ROLES, type Role } from '../../../shared/api/accounts';

export { ROLES, type Role };

export const User = defineEntity({
  name: 'User',
  tableName: 'users',
  properties: {
    id: p.integer().primary().autoincrement(),
    // The identity provider's stable account id and login name.
    providerId: p.string().unique(),
    login: p.string().unique(),
    name: p.string(),
    email: p.string().nullable(),
    role: p.enum([...ROLES]).default('student'),
    notifyOnFinish: p.boolean().default(false),
    createdAt: p.datetime().onCreate(() => new Date()),
    lastSignInAt: p.datetime().nullable(),
  },
});
export type User = InferEntity<typeof User>;
