import { createHash } from 'node:crypto';
import fs from 'node:fs';
import path from 'node:path';
import { MessageChannel } from 'node:worker_threads';
import { buildSync } from 'esbuild';
import { Piscina } from 'piscina';
import type { RunCheckpoint, RunResult } from '../shared/engine';
import { estimateInteractions, particleCount, type RunSpec } from '../shared/spec';
import type { RunProgress } from '../shared/api/contract';
import { createSharedField, dismissHelper, stopSharedField, type SharedField } from './sharedField';
import { sharedGridFor } from './sharedGrid';
import { lawModule } from '../shared/engine/laws/registry';

/** Checkpointing of one run: where to start, how often to hand out a new one, and to whom. */
export interface RunCheckpointing {
  resumeFrom?: RunCheckpoint;
  every: { steps: number; ms: number };
  onCheckpoint(checkpoint: RunCheckpoint): void;
}

/**
 * A run thread that sends no progress for this long is taken as hung and terminated:
 * a fixed allowance for start-up plus the time one percent of the run's estimated
 * interactions would take at 1e7 per second, twenty times slower than the engine's
 * bench (our own bound). Progress is reported at least every 1 % of the steps.
 */
export const STALL_BASE_MS = 120_000;
const SLOWEST_INTERACTIONS_PER_MS = 1e4;
export const stallLimitMs = (spec: RunSpec): number => STALL_BASE_MS + estimateInteractions(spec) / 100 / SLOWEST_INTERACTIONS_PER_MS;
/** A cancelled run's thread gets this long to stop by itself before it is terminated. */
export const CANCEL_GRACE_MS = 10_000;
const WATCHDOG_EVERY_MS = 1000;

export interface RunHandle {
  result: Promise<RunResult>;
  cancel(): void;
  /** Target chunks computed by helper threads, once they have all left; 0 when the run was not split. */
  helped: Promise<number>;
}

/**
 * Direct-sum and tree runs from this size are split across free threads. Below
 * it a force evaluation takes a few milliseconds at most, where waking helpers
 * and copying positions would eat most of the gain (our own choice, from the bench).
 */
export const SPLIT_MIN_PARTICLES = 1500;

/**
 * The rule for splitting one run (direct sums and tree walks both split): large enough to pay.
 * A run whose law has a grid always splits: its passes take tens of milliseconds or more per evaluation whatever the particle count.
 */
export const splits = (spec: RunSpec): boolean => particleCount(spec) >= SPLIT_MIN_PARTICLES || Boolean(lawModule(spec.law.kind).grid);

let threadScript: string | undefined;
/**
 * task.ts and everything it imports as one JavaScript file, which the threads load as plain
 * JavaScript. A thread that loaded tsx instead would start an esbuild service process of its own,
 * which nobody reaps once piscina ends the thread (idle timeout, watchdog): a zombie process per
 * thread ended. Built once per process and named by its content, so processes of the same sources
 * share one file and a killed process leaves nothing new behind.
 */
export function bundledTask(): string {
  if (threadScript) return threadScript;
  const [out] = buildSync({ entryPoints: [path.join(__dirname, 'task.ts')], bundle: true, platform: 'node', format: 'cjs', target: 'node20', write: false, logLevel: 'error' }).outputFiles;
  // Beside the installed packages, where only their owner writes (a shared /tmp would let others put code there).
  const dir = path.join(__dirname, '..', 'node_modules', '.cache', 'infall-threads');
  // Hex, not esbuild's own hash, which may hold a '/'.
  const file = path.join(dir, `task-${createHash('sha256').update(out.contents).digest('hex').slice(0, 20)}.js`);
  if (!fs.existsSync(file)) {
    fs.mkdirSync(dir, { recursive: true });
    // Whole or absent: another process may be writing the same bytes.
    const part = `${file}.${process.pid}`;
    fs.writeFileSync(part, out.contents);
    fs.renameSync(part, file);
  }
  return (threadScript = file);
}

/**
 * A pool of threads, each integrating one run at a time. A large direct-sum
 * or tree run that starts while threads are free also gets those threads as helpers
 * for its force sum (see sharedField.ts); a run that arrives when every thread
 * is taken gets one back from a helper, so splitting never makes a run wait.
 */
export class RunPool {
  private readonly pool: Piscina;
  /** Tasks handed to piscina and not yet settled: runs and helpers. */
  private busy = 0;
  /** Split runs with their helpers still wanted. */
  private readonly lent = new Map<SharedField, number>();
  /** Set by close(): runs that fail from now on were stopped by it, not by their numbers. */
  closing = false;

  constructor(private readonly threads: number) {
    this.pool = new Piscina({
      filename: bundledTask(),
      minThreads: 1,
      maxThreads: threads,
      // Threads beyond the first stay a while, so the next split run finds its helpers warm.
      idleTimeout: 60_000,
      execArgv: [],
    });
  }

  /** Runs whose thread has been quiet for more than half its stall limit, and threads terminated so far. */
  readonly watch = { quiet: 0, terminated: 0 };
  /** Called when `watch` changes, so the heartbeat tells health at once rather than at its next beat. */
  onWatchChange: () => void = () => undefined;
  private setQuiet(): void {
    if (this.watch.quiet === this.quiet.size) return;
    this.watch.quiet = this.quiet.size;
    this.onWatchChange();
  }
  private readonly quiet = new Set<object>();

  start(spec: RunSpec, onProgress: (p: RunProgress) => void, checkpointing?: RunCheckpointing, limits: { stallMs?: number } = {}): RunHandle {
    // A run handed in while the pool closes fails like the runs it interrupts (the worker then
    // puts it back in the queue), rather than starting a new thread after the close.
    if (this.closing) return { result: Promise.reject(new Error('The worker is stopping')), cancel: () => undefined, helped: Promise.resolve(0) };
    if (this.busy >= this.threads) this.reclaimThread();
    const helpers = splits(spec) ? Math.max(0, this.threads - this.busy - 1) : 0;
    const theta = spec.solver.kind === 'tree' ? spec.solver.theta : undefined;
    const sharedField = helpers > 0 ? createSharedField(particleCount(spec), helpers, theta, sharedGridFor(spec)) : undefined;

    const { port1, port2 } = new MessageChannel();
    const cancelFlag = new Int32Array(new SharedArrayBuffer(4));
    // The result and the progress messages travel on two ports with no order between them:
    // the result counts once the task's last message (null) is in, so the final update is not lost.
    let drain: () => void = () => undefined;
    const drained = new Promise<void>((resolve) => (drain = resolve));
    // The watchdog: a thread that stops reporting, or ignores a cancel, is terminated (piscina
    // replaces it), and the run fails with the reason instead of holding the thread for ever.
    let lastSign = Date.now();
    let cancelledAt: number | null = null;
    let stopReason: string | null = null;
    const stallMs = limits.stallMs ?? stallLimitMs(spec);
    const abort = new AbortController();
    const me = {};
    const watchdog = setInterval(() => {
      const quietFor = Date.now() - lastSign;
      if (quietFor > stallMs / 2) this.quiet.add(me);
      this.setQuiet();
      if (quietFor > stallMs) stopReason = `the run sent no progress for ${Math.round(stallMs / 1000)} s and its thread was terminated`;
      else if (cancelledAt !== null && Date.now() - cancelledAt > CANCEL_GRACE_MS) stopReason = `the run did not stop within ${CANCEL_GRACE_MS / 1000} s of being cancelled and its thread was terminated`;
      if (stopReason && !abort.signal.aborted) {
        this.watch.terminated++;
        this.onWatchChange();
        abort.abort(new Error(stopReason));
      }
    }, WATCHDOG_EVERY_MS);
    port1.on('message', (p: RunProgress | { checkpoint: RunCheckpoint } | null) => {
      lastSign = Date.now();
      this.quiet.delete(me);
      this.setQuiet();
      if (p === null) drain();
      else if ('checkpoint' in p) checkpointing?.onCheckpoint(p.checkpoint);
      else onProgress(p);
    });
    const task = { spec, progressPort: port2, cancelFlag, sharedField, resumeFrom: checkpointing?.resumeFrom, checkpointEvery: checkpointing?.every };
    const run = this.pool.run(task, { transferList: [port2], signal: abort.signal });
    const settled = run.then(
      async (r: RunResult) => (await drained, r),
      (err: unknown) => {
        throw stopReason ? new Error(stopReason) : err;
      },
    );
    const result = this.track(settled).finally(() => {
      clearInterval(watchdog);
      this.quiet.delete(me);
      this.setQuiet();
      port1.close();
      // Helpers leave even if the run's thread died before it could tell them.
      if (sharedField) {
        stopSharedField(sharedField);
        this.lent.delete(sharedField);
      }
    }) as Promise<RunResult>;

    let helped: Promise<number> = Promise.resolve(0);
    if (sharedField) {
      this.lent.set(sharedField, helpers);
      // A helper that fails only means the run works with fewer threads.
      const tasks = Array.from({ length: helpers }, () => this.track(this.pool.run({ sharedField }, { name: 'fieldHelper' }) as Promise<number>).catch(() => 0));
      helped = Promise.all(tasks).then((counts) => counts.reduce((a, b) => a + b, 0));
    }
    const cancel = () => {
      Atomics.store(cancelFlag, 0, 1);
      cancelledAt ??= Date.now();
    };
    return { result, cancel, helped };
  }

  /** Dismisses one helper of a split run; its thread then takes the next queued task. */
  private reclaimThread(): void {
    for (const [field, wanted] of this.lent) {
      if (wanted === 0) continue;
      dismissHelper(field);
      this.lent.set(field, wanted - 1);
      return;
    }
  }

  private track<T>(task: Promise<T>): Promise<T> {
    this.busy++;
    return task.finally(() => this.busy--);
  }

  close(): Promise<void> {
    this.closing = true;
    for (const field of this.lent.keys()) stopSharedField(field);
    return this.pool.destroy();
  }
}
