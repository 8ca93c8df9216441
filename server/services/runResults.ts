import type { EntityManager } from '@mikro-orm/postgresql';
import { Run, RunOutput, RunSnapshot } from '../db/entities';
import type { RunResult } from '../../shared/engine';

// How the worker records a run's life in the database.

export async function markRunning(em: EntityManager, runId: string): Promise<Run | null> {
  const run = await em.findOne(Run, { id: runId });
  if (!run || run.status !== 'queued') return null; // cancelled while queued, or already handled
  run.status = 'running';
  run.startedAt = new Date();
  run.progress = 0;
  await em.flush();
  return run;
}

export async function recordProgress(em: EntityManager, runId: string, fraction: number): Promise<void> {
  await em.nativeUpdate(Run, { id: runId, status: 'running' }, { progress: fraction });
}

export async function isCancelRequested(em: EntityManager, runId: string): Promise<boolean> {
  const row = await em.findOne(Run, { id: runId }, { fields: ['cancelRequested'], disableIdentityMap: true });
  return row?.cancelRequested ?? false;
}

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
    });
    result.snapshots.forEach((s, frame) => {
      tx.create(RunSnapshot, {
        run: runId,
        frame,
        step: s.step,
        timeMyr: s.time_Myr,
        positions: Buffer.from(s.positions.buffer, s.positions.byteOffset, s.positions.byteLength),
      });
    });
    run.status = result.cancelled ? 'cancelled' : 'finished';
    run.progress = result.cancelled ? run.progress : 1;
    run.finishedAt = new Date();
  });
}

export async function markCancelled(em: EntityManager, runId: string): Promise<void> {
  await em.nativeUpdate(Run, { id: runId }, { status: 'cancelled', finishedAt: new Date() });
}

export async function markFailed(em: EntityManager, runId: string, reason: string): Promise<void> {
  await em.nativeUpdate(Run, { id: runId }, { status: 'failed', error: reason.slice(0, 2000), finishedAt: new Date() });
}
