import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { Run } from './Run';
import type { RunOutputData } from '../../../shared/api/contract';
import type { Component } from '../../../shared/engine';

// The JSON part of a finished run: diagnostics series, curves, warnings.
// One row per run, written in the same transaction as its snapshots.
export const RunOutput = defineEntity({
  name: 'RunOutput',
  tableName: 'run_outputs',
  properties: {
    run: () => p.oneToOne(Run).primary().owner().deleteRule('cascade'),
    // One column per part of the engine's output (RunOutputData), typed as the engine wrote it.
    law: p.json<RunOutputData['law']>(),
    timescales: p.json<RunOutputData['timescales']>(),
    warnings: p.json<RunOutputData['warnings']>(),
    diagnostics: p.json<RunOutputData['diagnostics']>(),
    rotationCurves: p.json<RunOutputData['rotationCurves']>(),
    summary: p.json<RunOutputData['summary']>(),
    snapshotParticles: p.integer(),
    // Who the snapshot particles are: their indices in the run (uint32), masses (float64, Msun),
    // the labelled index ranges, and the engine that computed them. Null for runs stored before.
    particleIds: p.blob().nullable(),
    masses: p.blob().nullable(),
    components: p.json<Component[]>().nullable(),
    engineVersion: p.string().nullable(),
  },
});
export type RunOutput = InferEntity<typeof RunOutput>;
