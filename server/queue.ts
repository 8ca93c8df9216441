import { Queue, QueueEvents, QueueEventsProducer, type ConnectionOptions } from 'bullmq';
import { EventEmitter } from 'node:events';
import type { Redis } from 'ioredis';
import { config } from './config';
import { ApiError, withTimeout } from './errors';
import type { RunProgress } from '../shared/api/contract';

// BullMQ keeps handed-in ioredis clients open, so it gets options, not clients.
export const redisConnection: ConnectionOptions = { host: config.redis.host, port: config.redis.port, password: config.redis.password, maxRetriesPerRequest: null };

export const RUN_ATTEMPTS = 3;

/**
 * A queue call a request waits on. While the connection to Redis is down it is refused at once
 * (ioredis would hold the command until Redis is back); otherwise it gets the service timeout.
 * Either way the request answers 503 naming the queue.
 */
export function queueCall<T>(queue: Queue, work: (client: Redis) => Promise<T>): Promise<T> {
  return withTimeout(
    // BullMQ's connection is an ioredis client underneath its narrower interface.
    queue.getBackend().client.then((c) => {
      const client = c as unknown as Redis;
      if (client.status !== 'ready') throw new ApiError('UNAVAILABLE', 'The queue is not answering; try again shortly');
      return work(client);
    }),
    'The queue',
    config.serviceTimeoutMs,
  );
}

export interface RunJobData {
  runId: string;
  /** How many times the reconciler has put this run back in the queue (see worker/reconciler.ts). */
  requeues?: number;
}

/** The queue-stream event that says a run ended outside a worker (cancelled while queued, failed by the reconciler). */
const RUN_ENDED_EVENT = 'run-ended';

/** Tells every server process's event streams that a run ended, through the queue's Redis event stream. */
export class RunEndAnnouncer {
  private readonly producer = new QueueEventsProducer(config.queueName, { connection: redisConnection });

  constructor() {
    this.producer.on('error', (err) => console.error(`[queue] announcer: ${err.message}`));
  }

  async announce(runId: string): Promise<void> {
    await this.producer.publishEvent({ eventName: RUN_ENDED_EVENT, jobId: runId }, 10_000);
  }

  close(): Promise<void> {
    return this.producer.close();
  }
}

export function openRunQueue(): Queue<RunJobData> {
  const queue = new Queue<RunJobData>(config.queueName, {
    connection: redisConnection,
    // A job that throws (a lost database write, say) is tried three times, then failed for good
    // by the worker's final-failure handler (worker/processor.ts failForGood).
    defaultJobOptions: { attempts: RUN_ATTEMPTS, backoff: { type: 'exponential', delay: 5000 }, removeOnComplete: 1000, removeOnFail: 1000 },
  });
  // A Redis outage is waited out (the connection retries); an unheard 'error' would end the process.
  queue.on('error', (err) => console.error(`[queue] ${err.message}`));
  return queue;
}

export type RunSignal = { kind: 'progress'; progress: RunProgress } | { kind: 'end' };

/**
 * One QueueEvents subscription per server process, fanned out to the
 * event streams of individual runs (keyed by run id, which is the job id).
 */
export class RunSignals {
  private readonly events: QueueEvents;
  private readonly hub = new EventEmitter();
  private readonly announcer = new RunEndAnnouncer();

  constructor() {
    this.hub.setMaxListeners(0);
    this.events = new QueueEvents(config.queueName, { connection: redisConnection });
    this.events.on('progress', ({ jobId, data }) => {
      if (data && typeof data === 'object') this.hub.emit(jobId, { kind: 'progress', progress: data as RunProgress });
    });
    for (const name of ['completed', 'failed', RUN_ENDED_EVENT] as const) {
      this.events.on(name as 'completed', ({ jobId }: { jobId: string }) => this.hub.emit(jobId, { kind: 'end' }));
    }
    // A Redis outage is waited out (the connection retries); it must not end the process.
    this.events.on('error', (err) => console.error(`[server] queue events: ${err.message}`));
  }

  ready(): Promise<void> {
    return this.events.waitUntilReady().then(() => undefined);
  }

  subscribe(runId: string, listener: (s: RunSignal) => void): () => void {
    this.hub.on(runId, listener);
    return () => this.hub.off(runId, listener);
  }

  /**
   * Lets a route announce the end of a run that never reached a worker (cancelled while queued):
   * at once here, and through Redis to the other server processes.
   */
  announceEnd(runId: string): void {
    this.hub.emit(runId, { kind: 'end' });
    void this.announcer.announce(runId).catch((err) => console.error(`[server] could not announce the end of ${runId}: ${err.message}`));
  }

  close(): Promise<void> {
    return Promise.all([this.events.close(), this.announcer.close()]).then(() => undefined);
  }
}
