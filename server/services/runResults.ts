import { LockMode, type EntityManager } from '@mikro-orm/postgresql';
import { Run, RunOutput, RunSnapshot, UsageEntry } from '../db/entities';
import { ENGINE_VERSION, type RunResult } from '../../shared/engine';
import { budgetDay } from './quotas';

// How the worker records a run's life in the database.

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

/** Ends a run that did not finish, refunding what it did not compute; a run already ended is left alone. */
async function endUnfinished(em: EntityManager, runId: string, status: 'cancelled' | 'failed', error?: string): Promise<void> {
  await em.transactional(async (tx) => {
    const run = await tx.findOne(Run, { id: runId, status: { $in: ['queued', 'running'] } }, { lockMode: LockMode.PESSIMISTIC_WRITE });
    if (!run) return;
    refundUncomputed(tx, run, run.status === 'queued' ? 0 : run.progress);
    run.status = status;
    run.finishedAt = new Date();
    if (error !== undefined) run.error = error.slice(0, 2000);
  });
}

/**
 * Takes a queued run for a worker. A run found running was left by a worker that stopped
 * without putting it back (killed, or its machine went away): the queue hands its job out again
 * and it starts over; the same spec and seed give the same numbers.
 */
export async function markRunning(em: EntityManager, runId: string): Promise<Run | null> {
  const run = await em.findOne(Run, { id: runId });
  if (!run || (run.status !== 'queued' && run.status !== 'running')) return null; // cancelled while queued, or already ended
  run.status = 'running';
  run.startedAt = new Date();
  run.progress = 0;
  await em.flush();
  return run;
}

/** Puts a run its worker is stopping for back in the queue's hands, as if never started. */
export async function markRequeued(em: EntityManager, runId: string): Promise<void> {
  await em.nativeUpdate(Run, { id: runId, status: 'running' }, { status: 'queued', progress: 0, startedAt: null });
}

export async function recordProgress(em: EntityManager, runId: string, fraction: number): Promise<void> {
  await em.nativeUpdate(Run, { id: runId, status: 'running' }, { progress: fraction });
}

export async function isCancelRequested(em: EntityManager, runId: string): Promise<boolean> {
  const row = await em.findOne(Run, { id: runId }, { fields: ['cancelRequested'], disableIdentityMap: true });
  return row?.cancelRequested ?? false;
}

// Typed arrays are stored as their bytes (little-endian on every machine Node runs on).
const bytesOf = (a: Float32Array | Float64Array | Uint32Array) => Buffer.from(a.buffer, a.byteOffset, a.byteLength);

/** Writes output, snapshots and the final status in one transaction: all or nothing. */
export async function storeResult(em: EntityManager, runId: string, result: RunResult): Promise<void> {
  await em.transactional(async (tx) => {
    const run = await tx.findOneOrFail(Run, { id: runId });
    await tx.nativeDelete(RunSnapshot, { run: runId });
    await tx.nativeDelete(RunOutput, { run: runId });
    tx.create(RunOutput, {
      run: runId,
      law: result.law,
      timescales: result.timescales,
      warnings: result.warnings,
      diagnostics: result.diagnostics,
      rotationCurves: result.rotationCurves,
      summary: result.summary,
      snapshotParticles: result.snapshots.length ? result.snapshots[0].positions.length / 3 : 0,
      particleIds: bytesOf(Uint32Array.from(result.snapshotParticles)),
      masses: bytesOf(Float64Array.from(result.snapshotMasses)),
      components: result.components,
      engineVersion: ENGINE_VERSION,
    });
    result.snapshots.forEach((s, frame) => {
      tx.create(RunSnapshot, {
        run: runId,
        frame,
        step: s.step,
        timeMyr: s.time_Myr,
        positions: bytesOf(s.positions),
        velocities: s.velocities ? bytesOf(s.velocities) : null,
      });
    });
    const computed = result.cancelled ? result.summary.stepsCompleted / Math.max(1, result.summary.totalSteps) : 1;
    refundUncomputed(tx, run, computed);
    run.progress = computed;
    run.status = result.cancelled ? 'cancelled' : 'finished';
    run.finishedAt = new Date();
  });
}

export async function markCancelled(em: EntityManager, runId: string): Promise<void> {
  await endUnfinished(em, runId, 'cancelled');
}

/** A failed run keeps the charge for the steps it computed (its last recorded progress). */
export async function markFailed(em: EntityManager, runId: string, reason: string): Promise<void> {
  await endUnfinished(em, runId, 'failed', reason);
}
