import { LockMode, type EntityManager } from '@mikro-orm/postgresql';
import type { Queue } from 'bullmq';
import { ApiError } from '../errors';
import { Run, RunCheckpoint, type User } from '../db/entities';
import { extendRunBodySchema } from '../../shared/api/requests';
import { estimateInteractions, parseRunSpec, stepCount, issuePath } from '../../shared/spec';
import { queueCall, type RunJobData } from '../queue';
import { canManageRun } from './access';
import { admitRuns } from './admission';

/**
 * Carries a finished run on from its last state by more simulated time. The run's spec gets the
 * longer duration; the extra steps are charged like a new submission (same limits, concurrent slot
 * included), and the worker resumes from the checkpoint kept at its last step, so the steps already
 * computed are neither charged nor computed again. Its stored results stay readable until the
 * longer run replaces them.
 */
export async function extendRun(em: EntityManager, queue: Queue<RunJobData>, user: User, run: Run, body: unknown): Promise<Run> {
  if (!(await canManageRun(em, user, run))) throw new ApiError('FORBIDDEN', 'Only the run owner or an admin may extend this run');
  const parsed = extendRunBodySchema.safeParse(body);
  if (!parsed.success) {
    const issue = parsed.error.issues[0];
    const field = issuePath(issue) || 'body';
    throw new ApiError('BAD_REQUEST', `${field}: ${issue.message}`, { field });
  }
  if (run.status !== 'finished') throw new ApiError('CONFLICT', `Run is ${run.status}; only a finished run can be extended`);
  // The worker keeps one checkpoint per run, its latest (worker/store.ts).
  const kept = await em.findOne(RunCheckpoint, { run: run.id }, { fields: ['step'], disableIdentityMap: true });
  if (kept?.step !== run.steps) {
    throw new ApiError('CONFLICT', 'This run kept no state at its last step (it ran before checkpoints were kept), so it cannot be extended; submit a longer run instead');
  }
  const longer = parseRunSpec({ ...run.spec, duration_Myr: run.spec.duration_Myr + parsed.data.more_Myr });
  if (!longer.ok) {
    const issue = longer.issues[0];
    throw new ApiError('INVALID_SPEC', `more_Myr: the extended run is not valid: ${issue.path}: ${issue.message}`, { field: 'more_Myr' });
  }
  const spec = longer.spec;
  const steps = stepCount(spec);
  if (steps <= run.steps) throw new ApiError('BAD_REQUEST', `more_Myr: ${parsed.data.more_Myr} Myr adds no whole step of ${spec.timestep_Myr} Myr`, { field: 'more_Myr' });
  const extra = estimateInteractions(spec) - estimateInteractions(run.spec);

  // The queue must answer before anything is stored, as for a submission.
  await queueCall(queue, (c) => c.get('infall:ping'));
  await em.transactional(async (tx) => {
    // Locked and checked again, so two extensions at once cannot both pass.
    const row = await tx.findOneOrFail(Run, { id: run.id }, { lockMode: LockMode.PESSIMISTIC_WRITE });
    if (row.status !== 'finished' || row.steps !== run.steps) throw new ApiError('CONFLICT', 'The run changed meanwhile; load it again');
    await admitRuns(tx, user, [spec], [extra]);
    row.spec = spec;
    row.steps = steps;
    row.costInteractions = run.costInteractions + extra;
    row.progress = run.steps / steps;
    row.status = 'queued';
    row.finishedAt = null;
    row.error = null;
    row.cancelRequested = false;
  });
  // The finished job keeps the run's id in the queue; it makes way for the new one.
  await queueCall(queue, async () => {
    await (await queue.getJob(run.id))?.remove();
    await queue.add('run', { runId: run.id }, { jobId: run.id });
  });
  return em.findOneOrFail(Run, { id: run.id }, { populate: ['owner'], refresh: true });
}
