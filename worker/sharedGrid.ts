// A field-form run's grid work split across pool threads over shared memory.
//
// The grid's working arrays (node masses, potential, fields, the Poisson work
// array, the kernels' transforms) live in one SharedArrayBuffer the pool
// allocates from the spec. On the first force evaluation the run's thread
// writes the grid's setup beside them (plain data, as JSON: numbers survive it
// exactly) and fills in the kernels. From then on each pass of an evaluation
// (lines of a transform, lines of nodes) is one round of the split run
// (sharedField.ts): every thread, the run's own included, computes the chunks
// it claims with its own view of the grid over the same arrays, and the end of
// the round is the barrier before the next pass. A line is computed by the same
// code whichever thread takes it, so the result is bit-identical to one thread's.
import { lawModule } from '../shared/engine/laws/registry';
import type { GridThreads } from '../shared/engine/solvers/grid';
import type { RunSpec } from '../shared/spec';

/** The shared memory of one run's grid. Plain data: it reaches pool threads by structured clone, the buffers shared. */
export interface SharedGrid {
  /** The law whose grid it is: a helper thread takes its view of the grid from the law's module. */
  law: string;
  /** Lengths of the arrays laid end to end in `arrays`, in doubles. */
  lengths: number[];
  arrays: SharedArrayBuffer;
  /** Byte count (Int32 at 0) then the setup's JSON bytes. */
  setup: SharedArrayBuffer;
}

/** Room for the setup's JSON: a few hundred bytes in practice. */
const SETUP_BYTES = 4096;

/** Shared room for the grid of a run whose law has one; none for other laws. */
export function sharedGridFor({ law, softening_kpc }: Pick<RunSpec, 'law' | 'softening_kpc'>): SharedGrid | undefined {
  const lengths = lawModule(law.kind).grid?.lengths(law, softening_kpc);
  if (!lengths) return undefined;
  return { law: law.kind, lengths, arrays: new SharedArrayBuffer(8 * lengths.reduce((a, b) => a + b, 0)), setup: new SharedArrayBuffer(SETUP_BYTES) };
}

function carve(g: SharedGrid): Float64Array[] {
  let at = 0;
  return g.lengths.map((length) => {
    const a = new Float64Array(g.arrays, 8 * at, length);
    at += length;
    return a;
  });
}

/**
 * The run's thread's side: publishes the setup and hands out the shared arrays;
 * `round(pass, count)` runs one pass as a round of the split run and returns when every chunk is done.
 */
export class SplitGrid implements GridThreads {
  /** The shared arrays serve one grid: a second one opened in the same run gets none and works alone. */
  private opened = false;

  constructor(private readonly g: SharedGrid, private readonly round: (pass: number, count: number) => void) {}

  open(setup: object, lengths: readonly number[]): Float64Array[] | undefined {
    if (this.opened) return undefined;
    if (lengths.length !== this.g.lengths.length || lengths.some((l, k) => l !== this.g.lengths[k])) return undefined;
    const bytes = new TextEncoder().encode(JSON.stringify(setup));
    if (bytes.length > SETUP_BYTES - 4) return undefined;
    new Uint8Array(this.g.setup, 4).set(bytes);
    // Seen by other threads once a round opens (the round's atomic store publishes it).
    new Int32Array(this.g.setup, 0, 1)[0] = bytes.length;
    this.opened = true;
    return carve(this.g);
  }

  run(pass: number, count: number): void {
    this.round(pass, count);
  }
}

/**
 * Any thread's side: computes units [from, to) of a pass, with a view of the
 * grid built on first use from the published setup.
 */
export function gridWorker(g: SharedGrid): (pass: number, from: number, to: number) => void {
  const grid = lawModule(g.law).grid;
  if (!grid) throw new Error(`force law "${g.law}" has no grid`);
  let view: ReturnType<typeof grid.view> | undefined;
  return (pass, from, to) => {
    if (!view) {
      const length = new Int32Array(g.setup, 0, 1)[0];
      if (length === 0) throw new Error('a grid pass before the grid was set up');
      view = grid.view(JSON.parse(new TextDecoder().decode(new Uint8Array(g.setup, 4, length).slice())), carve(g));
    }
    view.range(pass, from, to);
  };
}
