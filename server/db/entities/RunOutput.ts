import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { Run } from './Run';

// The JSON part of a finished run: diagnostics series, curves, warnings.
// One row per run, written in the same transaction as its snapshots.
export const RunOutput = defineEntity({
  name: 'RunOutput',
  tableName: 'run_outputs',
  properties: {
    run: () => p.oneToOne(Run).primary().owner().deleteRule('cascade'),
    law: p.json<unknown>(),
    timescales: p.json<unknown>(),
    warnings: p.json<unknown>(),
    diagnostics: p.json<unknown>(),
    rotationCurves: p.json<unknown>(),
    summary: p.json<unknown>(),
    snapshotParticles: p.integer(),
    // Who the snapshot particles are: their indices in the run (uint32), masses (float64, Msun),
    // the labelled index ranges, and the engine that computed them. Null for runs stored before.
    particleIds: p.blob().nullable(),
    masses: p.blob().nullable(),
    components: p.json<unknown>().nullable(),
    engineVersion: p.string().nullable(),
  },
});
export type RunOutput = InferEntity<typeof RunOutput>;
