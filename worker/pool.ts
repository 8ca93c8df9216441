import path from 'node:path';
import { MessageChannel } from 'node:worker_threads';
import { Piscina } from 'piscina';
import type { RunResult } from '../shared/engine';
import type { RunSpec } from '../shared/spec';
import type { RunProgress } from '../shared/api/contract';

export interface RunHandle {
  result: Promise<RunResult>;
  cancel(): void;
}

/** A pool of threads, each integrating one run at a time. */
export class RunPool {
  private readonly pool: Piscina;

  constructor(threads: number) {
    this.pool = new Piscina({
      filename: path.join(__dirname, 'task.ts'),
      minThreads: 1,
      maxThreads: threads,
      // The .ts task file needs the tsx loader in threads started outside tsx (e.g. Jest).
      execArgv: process.execArgv.some((a) => a.includes('tsx')) ? process.execArgv : ['--import', 'tsx'],
    });
  }

  start(spec: RunSpec, onProgress: (p: RunProgress) => void): RunHandle {
    const { port1, port2 } = new MessageChannel();
    const cancelFlag = new Int32Array(new SharedArrayBuffer(4));
    port1.on('message', onProgress);
    const result = this.pool
      .run({ spec, progressPort: port2, cancelFlag }, { transferList: [port2] })
      .finally(() => port1.close()) as Promise<RunResult>;
    return { result, cancel: () => Atomics.store(cancelFlag, 0, 1) };
  }

  close(): Promise<void> {
    return this.pool.destroy();
  }
}
