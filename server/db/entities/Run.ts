import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import type { RunSpec } from '../../../shared/spec';
import { RUN_STATUSES } from '../../../shared/api/contract';
import { User } from './User';
import { Galaxy } from './Galaxy';

export const Run = defineEntity({
  name: 'Run',
  tableName: 'runs',
  properties: {
    id: p.uuid().primary(),
    owner: () => p.manyToOne(User).index(),
    name: p.string(),
    spec: p.json<RunSpec>(),
    // Copied out of the spec so lists can filter without reading JSON.
    modelKind: p.string().index(),
    lawKind: p.string().index(),
    particles: p.integer(),
    steps: p.integer(),
    costInteractions: p.bigint('number'),
    // Two runs with the same initial conditions under two laws share a pair id.
    pairId: p.uuid().nullable().index(),
    // The galaxy whose fit built the run's initial conditions; kept as null if the galaxy goes.
    galaxy: () => p.manyToOne(Galaxy).nullable().index().deleteRule('set null'),
    status: p.enum([...RUN_STATUSES]).default('queued').index(),
    progress: p.double().$type<number>().default(0),
    error: p.text().nullable(),
    cancelRequested: p.boolean().default(false),
    createdAt: p.datetime().onCreate(() => new Date()),
    startedAt: p.datetime().nullable(),
    finishedAt: p.datetime().nullable(),
    // Set when the owner's end-of-run mail is claimed (for a pair: on both runs at once).
    notifiedAt: p.datetime().nullable(),
  },
});
export type Run = InferEntity<typeof Run>;
