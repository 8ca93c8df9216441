import type { EntityManager } from '@mikro-orm/postgresql';
import { ApiError } from '../errors';
import { Cohort, CohortMember, type Run, type User } from '../db/entities';

// Who may see and manage which runs: students and researchers their own, instructors
// also (read-only) the runs of their cohorts' members, admins all.

// Roles as they are now, on every request: an instructor reads a member's runs only while
// the member is still a student (a promoted student's new runs are their own), and only
// while the instructor is still an instructor.
async function studentIdsOf(em: EntityManager, where: { cohort: number } | { cohort: { instructor: number } }): Promise<number[]> {
  const members = await em.find(CohortMember, { ...where, user: { role: 'student' } }, { fields: ['user'] });
  return [...new Set(members.map((m) => (m.user as User).id))];
}

export async function visibleRunsFilter(em: EntityManager, user: User, cohort?: number): Promise<Record<string, unknown>> {
  if (cohort !== undefined) {
    if (user.role !== 'instructor' && user.role !== 'admin') throw new ApiError('FORBIDDEN', 'Only instructors and admins can list runs by cohort');
    const c = await em.findOne(Cohort, { id: cohort });
    if (!c || (user.role !== 'admin' && (c.instructor as User).id !== user.id)) throw new ApiError('NOT_FOUND', `No cohort ${cohort} of yours`);
    return { owner: { $in: await studentIdsOf(em, { cohort }) } };
  }
  if (user.role === 'admin') return {};
  if (user.role === 'instructor') return { owner: { $in: [user.id, ...(await studentIdsOf(em, { cohort: { instructor: user.id } }))] } };
  return { owner: user.id };
}

export async function canSeeRun(em: EntityManager, user: User, run: Run): Promise<boolean> {
  const ownerId = (run.owner as User).id;
  if (user.role === 'admin' || ownerId === user.id) return true;
  if (user.role !== 'instructor') return false;
  return (await em.count(CohortMember, { user: { id: ownerId, role: 'student' }, cohort: { instructor: user.id } })) > 0;
}

export async function canManageRun(_em: EntityManager, user: User, run: Run): Promise<boolean> {
  return user.role === 'admin' || (run.owner as User).id === user.id;
}
