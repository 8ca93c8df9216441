// Worker heartbeats in Redis: each worker process writes its line every few seconds
// (worker/heartbeat.ts); health reads them to tell how many workers are alive and whether
// their threads move.
import { config } from '../config';

export const HEARTBEAT_EVERY_MS = 5000;
/** A worker whose last beat is older than this counts as gone (three missed beats). */
export const HEARTBEAT_STALE_MS = 3 * HEARTBEAT_EVERY_MS;

export interface WorkerBeat {
  id: string;
  threads: number;
  /** Runs whose thread has been quiet for more than half its stall limit. */
  quietRuns: number;
  /** Threads the watchdog has terminated since the worker started. */
  terminatedThreads: number;
  at: number;
}

/** A hash: field = worker id, value = its last beat as JSON. */
export const heartbeatKey = () => `infall:${config.queueName}:workers`;

/** The Redis commands used here, which both ioredis and BullMQ's own client offer. */
export interface BeatClient {
  hset(key: string, data: Record<string, string>): Promise<unknown>;
  hgetall(key: string): Promise<Record<string, string>>;
  hdel(key: string, ...fields: string[]): Promise<unknown>;
}

/** Every beat on record, live or not. */
export async function allBeats(client: BeatClient): Promise<WorkerBeat[]> {
  return Object.values(await client.hgetall(heartbeatKey())).map((raw) => JSON.parse(raw) as WorkerBeat);
}

/** The beats of workers seen within HEARTBEAT_STALE_MS. */
export async function liveBeats(client: BeatClient, now = Date.now()): Promise<WorkerBeat[]> {
  return (await allBeats(client)).filter((b) => now - b.at <= HEARTBEAT_STALE_MS);
}
