import type { EntityManager } from '@mikro-orm/postgresql';
import { config } from '../config';
import { ApiError } from '../errors';
import { Allocation, User } from '../db/entities';
import type { AccountUser, AdminUser, AdminUsersQuery, AllocationBody, Role } from '../../shared/api/accounts';
import { effectiveLimits, LIMIT_KEYS, lockAllocation } from './quotas';

/** What the provider's user endpoint says about someone (GitHub-style fields). */
export interface ProviderProfile {
  id: string;
  login: string;
  name: string;
  email: string | null;
}

export function toAccountUser(u: User): AccountUser {
  return { id: u.id, login: u.login, name: u.name, role: u.role, email: u.email ?? null };
}

/** Finds or creates the user for a provider identity, refreshing what the provider may have changed. */
export async function upsertFromProfile(em: EntityManager, profile: ProviderProfile): Promise<User> {
  let user = await em.findOne(User, { providerId: profile.id });
  if (!user) {
    user = em.create(User, { providerId: profile.id, login: profile.login, name: profile.name, email: profile.email });
  }
  user.login = profile.login;
  user.name = profile.name;
  user.email = profile.email;
  user.lastSignInAt = new Date();
  if (config.auth.adminLogins.includes(profile.login)) user.role = 'admin';
  await em.flush();
  return user;
}

export async function listUsers(em: EntityManager, q: AdminUsersQuery): Promise<AdminUser[]> {
  const where: Record<string, unknown> = {};
  if (q.role) where.role = q.role;
  if (q.q) {
    const like = `%${q.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`;
    where.$or = [{ login: { $ilike: like } }, { name: { $ilike: like } }, { email: { $ilike: like } }];
  }
  const users = await em.find(User, where, { orderBy: { id: 'asc' }, limit: q.limit });
  return Promise.all(users.map((u) => toAdminUser(em, u)));
}

export async function findUser(em: EntityManager, id: number): Promise<User> {
  const user = await em.findOne(User, { id });
  if (!user) throw new ApiError('NOT_FOUND', `No user ${id}`);
  return user;
}

export async function toAdminUser(em: EntityManager, u: User): Promise<AdminUser> {
  const grant = await em.findOne(Allocation, { user: u.id });
  return {
    ...toAccountUser(u),
    createdAt: u.createdAt.toISOString(),
    lastSignInAt: u.lastSignInAt ? u.lastSignInAt.toISOString() : null,
    allocation: Object.fromEntries(LIMIT_KEYS.map((k) => [k, grant?.[k] ?? null])) as AdminUser['allocation'],
    limits: await effectiveLimits(em, u),
  };
}

export async function grantRole(em: EntityManager, admin: User, target: User, role: Role): Promise<void> {
  // Keeps at least the acting admin in place, so the last admin can't lock everyone out.
  if (target.id === admin.id && role !== 'admin') throw new ApiError('CONFLICT', 'Admins cannot take away their own admin role; ask another admin');
  target.role = role;
  await em.flush();
}

/** Changes an admin's grant under the same row lock admission takes. */
export async function setAllocation(em: EntityManager, target: User, body: AllocationBody): Promise<void> {
  await em.transactional(async (tx) => {
    const grant = await lockAllocation(tx, target.id);
    for (const k of LIMIT_KEYS) if (body[k] !== undefined) grant[k] = body[k];
  });
}

export async function updateSettings(em: EntityManager, user: User, notifyOnFinish: boolean): Promise<void> {
  user.notifyOnFinish = notifyOnFinish;
  await em.flush();
}
