import type { ParticleState } from '../state';
import type { MassModel } from './massModel';

/** A named index range of particles (disk, bulge, primary, ...), for colouring and per-part statistics. */
export interface Component {
  label: string;
  start: number;
  count: number;
}

/** Initial conditions together with the analytic model they were drawn from. */
export interface InitialConditions {
  particles: ParticleState;
  massModel: MassModel;
  components: Component[];
}
