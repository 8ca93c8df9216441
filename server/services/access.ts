import type { EntityManager } from '@mikro-orm/postgresql';
import type { Run, User } from '../db/entities';

// Who may see and manage which runs. Owners and admins for now; cohort
// instructors are added with cohorts.

export async function visibleRunsFilter(_em: EntityManager, user: User, _cohort?: number): Promise<Record<string, unknown>> {
  if (user.role === 'admin') return {};
  return { owner: user.id };
}

export async function canSeeRun(_em: EntityManager, user: User, run: Run): Promise<boolean> {
  return user.role === 'admin' || (run.owner as User).id === user.id;
}

export async function canManageRun(_em: EntityManager, user: User, run: Run): Promise<boolean> {
  return user.role === 'admin' || (run.owner as User).id === user.id;
}
