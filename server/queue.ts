import { Queue, QueueEvents, type ConnectionOptions } from 'bullmq';
import { EventEmitter } from 'node:events';
import { config } from './config';
import type { RunProgress } from '../shared/api/contract';

// BullMQ keeps handed-in ioredis clients open, so it gets options, not clients.
export const redisConnection: ConnectionOptions = { host: config.redis.host, port: config.redis.port, maxRetriesPerRequest: null };

export const RUN_ATTEMPTS = 3;

export interface RunJobData {
  runId: string;
}

export function openRunQueue(): Queue<RunJobData> {
  return new Queue<RunJobData>(config.queueName, {
    connection: redisConnection,
    // A job that throws (a lost database write, say) is tried three times, then failed for good
    // by the worker's final-failure handler (worker/processor.ts failForGood).
    defaultJobOptions: { attempts: RUN_ATTEMPTS, backoff: { type: 'exponential', delay: 5000 }, removeOnComplete: 1000, removeOnFail: 1000 },
  });
}

export type RunSignal = { kind: 'progress'; progress: RunProgress } | { kind: 'end' };

/**
 * One QueueEvents subscription per server process, fanned out to the
 * event streams of individual runs (keyed by run id, which is the job id).
 */
export class RunSignals {
  private readonly events: QueueEvents;
  private readonly hub = new EventEmitter();

  constructor() {
    this.hub.setMaxListeners(0);
    this.events = new QueueEvents(config.queueName, { connection: redisConnection });
    this.events.on('progress', ({ jobId, data }) => {
      if (data && typeof data === 'object') this.hub.emit(jobId, { kind: 'progress', progress: data as RunProgress });
    });
    for (const name of ['completed', 'failed'] as const) {
      this.events.on(name, ({ jobId }: { jobId: string }) => this.hub.emit(jobId, { kind: 'end' }));
    }
  }

  ready(): Promise<void> {
    return this.events.waitUntilReady().then(() => undefined);
  }

  subscribe(runId: string, listener: (s: RunSignal) => void): () => void {
    this.hub.on(runId, listener);
    return () => this.hub.off(runId, listener);
  }

  /** Lets a route announce the end of a run that never reached a worker (cancelled while queued). */
  announceEnd(runId: string): void {
    this.hub.emit(runId, { kind: 'end' });
  }

  close(): Promise<void> {
    return this.events.close();
  }
}
