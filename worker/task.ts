// The piscina thread's task: runs one simulation through the engine. It knows
// nothing of queues or databases; progress goes out through a MessagePort and
// cancelling comes in through a shared flag the parent sets.
import type { MessagePort } from 'node:worker_threads';
import { runSimulation, type RunResult } from '../shared/engine';
import type { RunSpec } from '../shared/spec';

export interface RunTask {
  spec: RunSpec;
  progressPort: MessagePort;
  cancelFlag: Int32Array; // over a SharedArrayBuffer; 1 means stop
}

export default function runTask({ spec, progressPort, cancelFlag }: RunTask): RunResult {
  try {
    return runSimulation(spec, {
      onProgress: (p) => progressPort.postMessage(p),
      shouldCancel: () => Atomics.load(cancelFlag, 0) === 1,
    });
  } finally {
    progressPort.close();
  }
}
