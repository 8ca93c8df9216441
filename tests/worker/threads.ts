// What the thread-split tests share: the pool's task file and a wait for a helper thread.
import path from 'node:path';

export const taskFile = path.resolve(__dirname, '../../worker/task.ts');

export async function until(cond: () => boolean, what: string): Promise<void> {
  for (const started = Date.now(); !cond(); await new Promise((r) => setTimeout(r, 20))) {
    if (Date.now() - started > 60_000) throw new Error(`timed out waiting for ${what}`);
  }
}
