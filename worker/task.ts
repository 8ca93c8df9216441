// The piscina thread's tasks. The default one runs one simulation through the
// engine; it knows nothing of queues or databases: progress goes out through a
// MessagePort and cancelling comes in through a shared flag the parent sets.
// `fieldHelper` lends its thread to another task's split force sum.
import type { MessagePort } from 'node:worker_threads';
import { applyDirectKernelSetting, runSimulation, type RunCheckpoint, type RunResult } from '../shared/engine';
import type { RunSpec } from '../shared/spec';
import { serveSharedField, SplitSolver, stopSharedField, type SharedField } from './sharedField';

// Each pool thread picks its direct-sum kernel once; INFALL_DIRECT_KERNEL=js forces the typed-array one.
applyDirectKernelSetting(process.env.INFALL_DIRECT_KERNEL);

export interface RunTask {
  spec: RunSpec;
  progressPort: MessagePort;
  cancelFlag: Int32Array; // over a SharedArrayBuffer; 1 means stop
  /** Present when the pool lent helper threads to this run's direct sum or tree walk. */
  sharedField?: SharedField;
  /** Carry on from this checkpoint; new checkpoints go out on the port as `{ checkpoint }`. */
  resumeFrom?: RunCheckpoint;
  checkpointEvery?: { steps: number; ms: number };
}

export default function runTask({ spec, progressPort, cancelFlag, sharedField, resumeFrom, checkpointEvery }: RunTask): RunResult {
  try {
    const result = runSimulation(spec, {
      onProgress: (p) => progressPort.postMessage(p),
      shouldCancel: () => Atomics.load(cancelFlag, 0) === 1,
      snapshotVelocities: true, // stored with the frames for export
      ...(sharedField ? { solver: new SplitSolver(sharedField) } : {}),
      ...(resumeFrom ? { resumeFrom } : {}),
      ...(checkpointEvery ? { checkpointEvery, onCheckpoint: (checkpoint: RunCheckpoint) => progressPort.postMessage({ checkpoint }) } : {}),
    });
    progressPort.postMessage(null); // no more progress: see RunPool.start
    return result;
  } finally {
    if (sharedField) stopSharedField(sharedField);
    progressPort.close();
  }
}

/** Serves a split run's force sums until it ends or the pool dismisses this helper; returns the chunks it computed. */
export function fieldHelper({ sharedField }: { sharedField: SharedField }): number {
  return serveSharedField(sharedField);
}
