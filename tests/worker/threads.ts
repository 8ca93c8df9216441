// What the thread-split tests share: the pool's task file and a wait for a helper thread.
import { bundledTask } from '../../worker/pool';

// The bundle the pool's threads load, so these threads start as the worker's do (no tsx, no esbuild service left behind).
export const taskFile = bundledTask();

export async function until(cond: () => boolean, what: string): Promise<void> {
  for (const started = Date.now(); !cond(); await new Promise((r) => setTimeout(r, 20))) {
    if (Date.now() - started > 60_000) throw new Error(`timed out waiting for ${what}`);
  }
}
