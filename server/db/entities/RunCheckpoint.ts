import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { Run } from './Run';

// The latest checkpoint of a run: the engine's RunCheckpoint, serialised with
// node:v8 (typed arrays kept as they are). A run taken over by another worker,
// or extended after it finished, carries on from it.
export const RunCheckpoint = defineEntity({
  name: 'RunCheckpoint',
  tableName: 'run_checkpoints',
  properties: {
    run: () => p.oneToOne(Run).primary().owner().deleteRule('cascade'),
    step: p.integer(),
    data: p.blob(),
    takenAt: p.datetime(),
  },
});
export type RunCheckpoint = InferEntity<typeof RunCheckpoint>;
