// Every force law the engine offers. A new law is one module plus one line here; registry.ts builds the
// spec's law union and every accessor from this list.
import { emergentLaw } from './emergent';
import { haloLaw } from './halo';
import { mondLaw } from './mond';
import { newtonLaw } from './newton';
import { qumondLaw } from './qumond';
import { yukawaLaw } from './yukawa';

export const LAW_MODULES = [
  newtonLaw,
  haloLaw,
  mondLaw,
  qumondLaw,
  emergentLaw,
  yukawaLaw,
] as const;
