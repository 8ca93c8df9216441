import { serialize, deserialize } from 'node:v8';
import { LockMode, type EntityManager } from '@mikro-orm/postgresql';
import { Run, RunCheckpoint, RunOutput, RunSnapshot } from '../server/db/entities';
import { refundUncomputed } from '../server/services/quotas';
import { ENGINE_VERSION, type RunCheckpoint as EngineCheckpoint, type RunResult } from '../shared/engine';
import type { RunOutputData } from '../shared/api/contract';

// The worker's writes: how a run's life, its checkpoints and its result reach the database.

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

/** The part of an engine result stored as JSON (the run_outputs row's JSON columns). */
export const outputData = ({ law, timescales, warnings, diagnostics, rotationCurves, summary }: RunResult): RunOutputData => ({ law, timescales, warnings, diagnostics, rotationCurves, summary });

/** Writes output, snapshots and the final status in one transaction: all or nothing. */
export async function storeResult(em: EntityManager, runId: string, result: RunResult): Promise<void> {
  await em.transactional(async (tx) => {
    const run = await tx.findOneOrFail(Run, { id: runId });
    await tx.nativeDelete(RunSnapshot, { run: runId });
    await tx.nativeDelete(RunOutput, { run: runId });
    tx.create(RunOutput, {
      run: runId,
      ...outputData(result),
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

// A run's latest checkpoint, one row per run. Only a later step replaces a stored
// one, so a slow write from a worker that lost the run cannot set it back.

export async function saveCheckpoint(em: EntityManager, runId: string, checkpoint: EngineCheckpoint): Promise<void> {
  const data = serialize(checkpoint);
  const step = checkpoint.state.step;
  await em.getConnection().execute(
    `insert into "run_checkpoints" ("run_id", "step", "data", "taken_at") values (?, ?, ?, now())
     on conflict ("run_id") do update set "step" = excluded."step", "data" = excluded."data", "taken_at" = excluded."taken_at"
     where "run_checkpoints"."step" < excluded."step"`,
    [runId, step, data],
  );
}

export async function loadCheckpoint(em: EntityManager, runId: string): Promise<EngineCheckpoint | null> {
  const row = await em.findOne(RunCheckpoint, { run: runId }, { disableIdentityMap: true });
  return row ? (deserialize(row.data as Buffer) as EngineCheckpoint) : null;
}
