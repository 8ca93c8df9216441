// Every initial-conditions model the engine offers. A new model is one module plus one line here
// (and one in systems.ts if an encounter may hold it); registry.ts builds the spec's model union
// and every accessor from this list.
import { diskModule } from './disk';
import { encounterModule } from './encounter';
import { hernquistModule } from './hernquist';
import { keplerModule } from './kepler';
import { plummerModule } from './plummer';
import { tableModule } from './table';

export const MODEL_MODULES = [
  keplerModule,
  plummerModule,
  hernquistModule,
  diskModule,
  encounterModule,
  tableModule,
] as const;
