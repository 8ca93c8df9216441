import { randomInt } from 'node:crypto';
import type { EntityManager } from '@mikro-orm/postgresql';
import { ApiError } from '../errors';
import { Cohort, CohortMember, type User } from '../db/entities';
import { limitText, type CohortMemberUsage, type CohortQuotaBody, type CohortSummary } from '../../shared/api/accounts';
import { accountUsage, cohortLimits, COHORT_CEILING, LIMIT_KEYS, ROLE_LIMITS } from './quotas';
import { toAccountUser } from './users';
import { sendCohortInvitation } from './notifications';

// No 0/O, 1/I/L: codes are read aloud and copied from slides.
const CODE_ALPHABET = '23456789ABCDEFGHJKMNPQRSTUVWXYZ';

export function newEnrolmentCode(): string {
  const pick = () => Array.from({ length: 4 }, () => CODE_ALPHABET[randomInt(CODE_ALPHABET.length)]).join('');
  return `${pick()}-${pick()}`;
}

function checkCeiling(quota: CohortQuotaBody): void {
  for (const k of LIMIT_KEYS) {
    const v = quota[k];
    if (v != null && v > COHORT_CEILING[k]) throw new ApiError('BAD_REQUEST', `quota.${k}: a cohort quota is at most ${limitText(k, COHORT_CEILING[k])}`, { field: `quota.${k}` });
  }
}

/** The row values of a quota: upload limits left out are stored as not set. */
const quotaColumns = (quota: CohortQuotaBody) => ({ ...quota, maxUploadBytes: quota.maxUploadBytes ?? null, maxUploadRows: quota.maxUploadRows ?? null });

export async function toCohortSummary(em: EntityManager, c: Cohort, viewer: User): Promise<CohortSummary> {
  await em.populate(c, ['instructor']);
  const instructor = c.instructor as User;
  const manages = viewer.role === 'admin' || instructor.id === viewer.id;
  return {
    id: c.id,
    name: c.name,
    instructor: { id: instructor.id, login: instructor.login, name: instructor.name },
    quota: cohortLimits(c),
    memberCount: await em.count(CohortMember, { cohort: c.id }),
    ...(manages ? { enrolmentCode: c.enrolmentCode } : {}),
    createdAt: c.createdAt.toISOString(),
  };
}

export async function createCohort(em: EntityManager, instructor: User, name: string, quota: CohortQuotaBody = ROLE_LIMITS.student): Promise<Cohort> {
  checkCeiling(quota);
  // 31^8 codes: a clash is unlikely enough to leave to the unique constraint.
  const c = em.create(Cohort, { name, instructor: instructor.id, enrolmentCode: newEnrolmentCode(), ...quotaColumns(quota) });
  await em.flush();
  return c;
}

/** Cohorts a user belongs to or runs; admins see all. */
export async function listCohorts(em: EntityManager, user: User): Promise<Cohort[]> {
  const where =
    user.role === 'admin' ? {} : { $or: [{ instructor: user.id }, { id: { $in: (await em.find(CohortMember, { user: user.id })).map((m) => (m.cohort as Cohort).id) } }] };
  return em.find(Cohort, where, { orderBy: { createdAt: 'desc' }, populate: ['instructor'] });
}

export function isManager(user: User, c: Cohort): boolean {
  // The role as it is now: an instructor demoted since creating the cohort no longer manages it.
  return user.role === 'admin' || (user.role === 'instructor' && (c.instructor as User).id === user.id);
}

/** A cohort the user runs, belongs to, or (admins) any; others get 404 so ids can't be probed. */
export async function findVisibleCohort(em: EntityManager, user: User, id: number): Promise<Cohort> {
  const c = await em.findOne(Cohort, { id }, { populate: ['instructor'] });
  if (c && (isManager(user, c) || (await em.count(CohortMember, { cohort: id, user: user.id })) > 0)) return c;
  throw new ApiError('NOT_FOUND', `No cohort ${id}`);
}

/** A cohort the user may change: its instructor or an admin. Members get 403, strangers 404. */
export async function findManagedCohort(em: EntityManager, user: User, id: number): Promise<Cohort> {
  const c = await findVisibleCohort(em, user, id);
  if (!isManager(user, c)) throw new ApiError('FORBIDDEN', "Only the cohort's instructor or an admin can do this");
  return c;
}

export async function joinCohort(em: EntityManager, student: User, code: string): Promise<Cohort> {
  const c = await em.findOne(Cohort, { enrolmentCode: code }, { populate: ['instructor'] });
  if (!c) throw new ApiError('NOT_FOUND', 'No cohort has that enrolment code; check it with your instructor', { field: 'code' });
  await em.execute('insert into cohort_members (cohort_id, user_id, joined_at) values (?, ?, now()) on conflict do nothing', [c.id, student.id]);
  return c;
}

export async function setCohortQuota(em: EntityManager, c: Cohort, quota: CohortQuotaBody): Promise<void> {
  checkCeiling(quota);
  Object.assign(c, quotaColumns(quota));
  await em.flush();
}

export async function rotateEnrolmentCode(em: EntityManager, c: Cohort): Promise<void> {
  c.enrolmentCode = newEnrolmentCode();
  await em.flush();
}

export async function cohortMembers(em: EntityManager, c: Cohort): Promise<CohortMemberUsage[]> {
  const members = await em.find(CohortMember, { cohort: c.id }, { populate: ['user'], orderBy: { joinedAt: 'asc' } });
  return Promise.all(
    members.map(async (m) => {
      const u = m.user as User;
      return { user: toAccountUser(u), joinedAt: m.joinedAt.toISOString(), usage: await accountUsage(em, u) };
    }),
  );
}

export async function inviteToCohort(c: Cohort, instructor: User, emails: string[]): Promise<number> {
  const unique = [...new Set(emails.map((e) => e.toLowerCase()))];
  await sendCohortInvitation(c, instructor, unique);
  return unique.length;
}
