// Threads: one large direct-sum run through the worker's pool, alone on one
// thread and then split across two, with the results compared bit for bit.
import { RunPool, SPLIT_MIN_PARTICLES } from '../../worker/pool';
import type { RunResult } from '../../shared/engine';
import { plummerRun } from './specs';

export interface ThreadFigures {
  n: number;
  steps: number;
  threads: number;
  singleSeconds: number;
  splitSeconds: number;
  speedup: number;
  /** Target chunks the helper threads computed in the split run: 0 would mean it was never split. */
  helperChunks: number;
  /** Same snapshots and energies from both: splitting must not change a bit. */
  identical: boolean;
}

async function timedRun(pool: RunPool, n: number, steps: number): Promise<{ seconds: number; result: RunResult; helped: number }> {
  // A short split run first, so thread start-up and module loading stay out of the timing.
  const warm = pool.start(plummerRun(Math.max(n, SPLIT_MIN_PARTICLES), 2), () => undefined);
  await warm.result;
  await warm.helped;
  const t = performance.now();
  const handle = pool.start(plummerRun(n, steps), () => undefined);
  const result = await handle.result;
  const seconds = (performance.now() - t) / 1000;
  return { seconds, result, helped: await handle.helped };
}

function sameResults(a: RunResult, b: RunResult): boolean {
  const frames = (r: RunResult) => r.snapshots.map((s) => Array.from(s.positions));
  const energies = (r: RunResult) => r.diagnostics.map((d) => d.totalEnergy);
  return JSON.stringify(frames(a)) === JSON.stringify(frames(b)) && JSON.stringify(energies(a)) === JSON.stringify(energies(b));
}

export async function benchThreads({ n = 6_000, steps = 40, threads = 2 } = {}): Promise<ThreadFigures> {
  const single = new RunPool(1);
  const split = new RunPool(threads);
  try {
    const one = await timedRun(single, n, steps);
    const many = await timedRun(split, n, steps);
    return {
      n,
      steps,
      threads,
      singleSeconds: one.seconds,
      splitSeconds: many.seconds,
      speedup: one.seconds / many.seconds,
      helperChunks: many.helped,
      identical: sameResults(one.result, many.result),
    };
  } finally {
    await Promise.all([single.close(), split.close()]);
  }
}
