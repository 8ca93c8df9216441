import type { EntityManager } from '@mikro-orm/postgresql';
import { ApiError } from '../errors';
import { UsageEntry, type User } from '../db/entities';
import { particleCount, stepCount, type RunSpec } from '../../shared/spec';
import type { QuotaRefusal } from '../../shared/api/accounts';
import { describeRefusal } from '../../shared/api/quotaWords';
import { activeRuns, budgetDay, effectiveLimits, interactionsOn, lockAllocation } from './quotas';
import { afterCommit } from './after-commit';
import { sendQuotaWarning } from './notifications';

export const WARN_FRACTION = 0.8;

// 403 when the run can never fit the limit, 429 when it would fit later.
function refuse(r: QuotaRefusal, status: 403 | 429, runs: number): ApiError {
  return new ApiError('QUOTA_EXCEEDED', describeRefusal(r, runs), { status, details: r });
}

/**
 * Decides inside the submission transaction whether these runs may start, and charges
 * the ledger. The user's allocation row stays locked until the transaction ends, so
 * parallel submissions are decided one after another against committed usage.
 * Throws QUOTA_EXCEEDED with a sentence naming the need, the limit and what is left.
 */
export async function admitRuns(em: EntityManager, user: User, specs: RunSpec[], costs: number[]): Promise<void> {
  const allocation = await lockAllocation(em, user.id);
  const limits = await effectiveLimits(em, user);

  for (const spec of specs) {
    const n = particleCount(spec);
    if (n > limits.maxParticles) throw refuse({ limit: 'maxParticles', max: limits.maxParticles, needed: n, remaining: limits.maxParticles }, 403, 1);
    const steps = stepCount(spec);
    if (steps > limits.maxSteps) throw refuse({ limit: 'maxSteps', max: limits.maxSteps, needed: steps, remaining: limits.maxSteps }, 403, 1);
  }

  const active = await activeRuns(em, user.id);
  const slots = Math.max(0, limits.maxConcurrentRuns - active);
  if (specs.length > slots) {
    throw refuse({ limit: 'maxConcurrentRuns', max: limits.maxConcurrentRuns, needed: specs.length, remaining: slots }, specs.length > limits.maxConcurrentRuns ? 403 : 429, specs.length);
  }

  const day = budgetDay();
  const used = await interactionsOn(em, user.id, day);
  const needed = costs.reduce((sum, c) => sum + Math.ceil(c), 0);
  const left = Math.max(0, limits.dailyInteractions - used);
  if (needed > left) {
    throw refuse({ limit: 'dailyInteractions', max: limits.dailyInteractions, needed, remaining: left }, needed > limits.dailyInteractions ? 403 : 429, specs.length);
  }

  em.create(UsageEntry, { user: user.id, day, interactions: needed, runs: specs.length });
  if (used + needed >= WARN_FRACTION * limits.dailyInteractions && allocation.warnedOn !== day) {
    allocation.warnedOn = day;
    const usedNow = used + needed;
    afterCommit(em, () => sendQuotaWarning(user, { used: usedNow, max: limits.dailyInteractions, day }));
  }
}
