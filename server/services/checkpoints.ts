import { serialize, deserialize } from 'node:v8';
import type { EntityManager } from '@mikro-orm/postgresql';
import { RunCheckpoint } from '../db/entities';
import type { RunCheckpoint as EngineCheckpoint } from '../../shared/engine';

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

export async function checkpointStep(em: EntityManager, runId: string): Promise<number | null> {
  const row = await em.findOne(RunCheckpoint, { run: runId }, { fields: ['step'], disableIdentityMap: true });
  return row?.step ?? null;
}
