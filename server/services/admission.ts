import type { EntityManager } from '@mikro-orm/postgresql';
import { ApiError } from '../errors';
import { Run, type User } from '../db/entities';
import type { RunSpec } from '../../shared/spec';

const MAX_ACTIVE_RUNS = 4;

/**
 * Decides inside the submission transaction whether these runs may start.
 * Throws QUOTA_EXCEEDED naming the limit, the need and what is left.
 */
export async function admitRuns(em: EntityManager, user: User, specs: RunSpec[], _costs: number[]): Promise<void> {
  const active = await em.count(Run, { owner: user.id, status: { $in: ['queued', 'running'] } });
  if (active + specs.length > MAX_ACTIVE_RUNS) {
    throw new ApiError('QUOTA_EXCEEDED', `concurrent runs: limit ${MAX_ACTIVE_RUNS}, this submission needs ${specs.length}, ${Math.max(0, MAX_ACTIVE_RUNS - active)} left`, {
      details: { limit: 'concurrentRuns', max: MAX_ACTIVE_RUNS, needed: specs.length, remaining: Math.max(0, MAX_ACTIVE_RUNS - active) },
    });
  }
}
