import type { EntityManager } from '@mikro-orm/postgresql';
import { Allocation, Cohort, CohortMember, Run, UsageEntry, type User } from '../db/entities';
import { ROLE_LIMITS, type AccountUsage, type QuotaLimits, type Role, type UploadLimits } from '../../shared/api/accounts';

// Quotas come from three places, most specific first: an admin's per-user grant,
// then (for students) the most generous of their cohorts' quotas, then the role.
export { COHORT_CEILING, ROLE_LIMITS } from '../../shared/api/accounts';

export const LIMIT_KEYS = ['maxParticles', 'maxSteps', 'maxConcurrentRuns', 'dailyInteractions', 'maxUploadBytes', 'maxUploadRows'] as const satisfies readonly (keyof QuotaLimits)[];

export const ACTIVE_STATUSES = ['queued', 'running'] as const;

/** The UTC calendar day the daily budget is counted in, as YYYY-MM-DD. */
export function budgetDay(now = new Date()): string {
  return now.toISOString().slice(0, 10);
}

function nextDayStart(day: string): Date {
  const d = new Date(`${day}T00:00:00.000Z`);
  d.setUTCDate(d.getUTCDate() + 1);
  return d;
}

function limitsFrom(pick: (k: keyof QuotaLimits) => number): QuotaLimits {
  return {
    maxParticles: pick('maxParticles'),
    maxSteps: pick('maxSteps'),
    maxConcurrentRuns: pick('maxConcurrentRuns'),
    dailyInteractions: pick('dailyInteractions'),
    maxUploadBytes: pick('maxUploadBytes'),
    maxUploadRows: pick('maxUploadRows'),
  };
}

/** What a cohort gives its students; a limit the cohort leaves unset (null) is the student default. */
export function cohortLimits(c: Cohort): QuotaLimits {
  return limitsFrom((k) => c[k] ?? ROLE_LIMITS.student[k]);
}

export async function effectiveLimits(em: EntityManager, user: User): Promise<QuotaLimits> {
  let base = ROLE_LIMITS[user.role as Role];
  if (user.role === 'student') {
    const memberships = await em.find(CohortMember, { user: user.id }, { populate: ['cohort'] });
    if (memberships.length) {
      const quotas = memberships.map((m) => cohortLimits(m.cohort as Cohort));
      base = limitsFrom((k) => Math.max(...quotas.map((q) => q[k])));
    }
  }
  const grant = await em.findOne(Allocation, { user: user.id });
  if (!grant) return base;
  return limitsFrom((k) => grant[k] ?? base[k]);
}

/** Size and row limits on an uploaded table: the person's effective quota. */
export async function uploadLimits(em: EntityManager, user: User): Promise<UploadLimits> {
  const { maxUploadBytes, maxUploadRows } = await effectiveLimits(em, user);
  return { maxUploadBytes, maxUploadRows };
}

export async function interactionsOn(em: EntityManager, userId: number, day: string): Promise<number> {
  const [row] = await em.execute<{ used: string }[]>('select coalesce(sum(interactions), 0)::text as used from usage_ledger where user_id = ? and day = ?', [userId, day]);
  return Number(row.used);
}

export async function activeRuns(em: EntityManager, userId: number): Promise<number> {
  return em.count(Run, { owner: userId, status: { $in: [...ACTIVE_STATUSES] } });
}

export async function accountUsage(em: EntityManager, user: User): Promise<AccountUsage> {
  const day = budgetDay();
  const [limits, interactionsToday, active] = await Promise.all([effectiveLimits(em, user), interactionsOn(em, user.id, day), activeRuns(em, user.id)]);
  return {
    limits,
    used: { interactionsToday, activeRuns: active },
    remaining: {
      interactionsToday: Math.max(0, limits.dailyInteractions - interactionsToday),
      concurrentRuns: Math.max(0, limits.maxConcurrentRuns - active),
    },
    day,
    resetsAt: nextDayStart(day).toISOString(),
  };
}

/**
 * Takes the user's allocation row FOR UPDATE, creating it first if need be. Held until
 * the surrounding transaction ends, it makes one user's admissions run one at a time.
 */
export async function lockAllocation(em: EntityManager, userId: number): Promise<Allocation> {
  await em.execute('insert into allocations (user_id) values (?) on conflict do nothing', [userId]);
  const [row] = await em.execute<Record<string, unknown>[]>('select * from allocations where user_id = ? for update', [userId]);
  return em.map(Allocation, row);
}

/**
 * Gives back to the ledger the part of a run's cost that was never computed (all of it for a
 * run that never started), on the day it was charged. Called once, where the run's status
 * leaves queued or running, inside the transaction that changes it.
 */
export function refundUncomputed(em: EntityManager, run: Run, fractionComputed: number): void {
  const refund = Math.floor(run.costInteractions * (1 - Math.min(1, Math.max(0, fractionComputed))));
  if (refund <= 0) return;
  em.create(UsageEntry, { user: run.owner, day: budgetDay(run.createdAt), interactions: -refund, runs: 0 });
}
