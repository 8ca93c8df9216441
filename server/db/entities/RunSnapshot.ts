import { defineEntity, p, type InferEntity } from '@mikro-orm/core';
import { Run } from './Run';

// One downsampled frame: float32 x,y,z (kpc) and vx,vy,vz (km/s) interleaved, little-endian,
// as bytes. Frames stored before velocities were kept have none.
export const RunSnapshot = defineEntity({
  name: 'RunSnapshot',
  tableName: 'run_snapshots',
  primaryKeys: ['run', 'frame'],
  properties: {
    run: () => p.manyToOne(Run).primary().deleteRule('cascade'),
    frame: p.integer().primary(),
    step: p.integer(),
    timeMyr: p.double().$type<number>(),
    positions: p.blob(),
    velocities: p.blob().nullable(),
  },
});
export type RunSnapshot = InferEntity<typeof RunSnapshot>;
